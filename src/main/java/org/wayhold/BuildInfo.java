package org.wayhold;

import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.util.Properties;

/**
 * What was built: the project version and the git commit, written into {@code org/wayhold/build.properties}
 * by the Maven build (resource filtering). A build outside a git checkout, or classes that did not go
 * through Maven's resource step, read {@value #UNKNOWN} for what they lack.
 *
 * @param version the Maven project version, such as {@code 0.1.0-SNAPSHOT}
 * @param commit  the abbreviated commit id the build was made from, or {@value #UNKNOWN}
 * @param dirty   true when tracked files differed from that commit at build time
 */
public record BuildInfo(String version, String commit, boolean dirty) {

    public static final String UNKNOWN = "unknown";
    private static final String RESOURCE = "build.properties";

    public BuildInfo {
        version = known(version);
        commit = known(commit);
    }

    /** The build of the running classes. */
    public static BuildInfo current() {
        return Holder.CURRENT;
    }

    /** Reads the build properties from a stream (null for none). */
    static BuildInfo read(InputStream in) throws IOException {
        Properties p = new Properties();
        if (in != null) {
            p.load(in);
        }
        return new BuildInfo(p.getProperty("version"), p.getProperty("commit"),
                Boolean.parseBoolean(known(p.getProperty("dirty"))));
    }

    /** {@code 0.1.0 (commit 1a2b3c4d5e6f)}, with {@code -dirty} after a commit built with local changes. */
    public String describe() {
        return version + " (commit " + commit + (dirty && !commit.equals(UNKNOWN) ? "-dirty" : "") + ")";
    }

    /** A value left blank, or still the build's placeholder because it was never filtered, is unknown. */
    private static String known(String value) {
        return value == null || value.isBlank() || value.contains("${") ? UNKNOWN : value.trim();
    }

    private static final class Holder {
        static final BuildInfo CURRENT = load();

        private static BuildInfo load() {
            try (InputStream in = BuildInfo.class.getResourceAsStream(RESOURCE)) {
                return read(in);
            } catch (IOException e) {
                throw new UncheckedIOException("org/wayhold/" + RESOURCE + " cannot be read", e);
            }
        }
    }
}
