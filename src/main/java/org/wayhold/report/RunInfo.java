package org.wayhold.report;

import java.time.Instant;
import java.time.temporal.ChronoUnit;
import java.util.List;
import org.wayhold.BuildInfo;

/**
 * Where a report came from: the tool's version and commit, the command line it was run with and when.
 *
 * @param version     the tool's version
 * @param commit      the git commit the tool was built from ({@code unknown} outside a checkout; with
 *                    {@code -dirty} when built with local changes)
 * @param commandLine the command and its arguments as given, each quoted where a shell would need it
 * @param date        when the report was made, ISO 8601 UTC to the second
 */
public record RunInfo(String version, String commit, String commandLine, String date) {

    public RunInfo {
        if (version == null || commit == null || commandLine == null || date == null) {
            throw new IllegalArgumentException("version, commit, command line and date: must be given");
        }
    }

    /** This build, the given arguments after the tool's own name, and the time {@code now}. */
    public static RunInfo of(List<String> args, Instant now) {
        BuildInfo b = BuildInfo.current();
        StringBuilder line = new StringBuilder("wayhold");
        for (String a : args) {
            line.append(' ').append(shellQuoted(a));
        }
        return new RunInfo(b.version(), b.commit() + (b.dirty() && !b.commit().equals(BuildInfo.UNKNOWN) ? "-dirty"
                : ""), line.toString(), now.truncatedTo(ChronoUnit.SECONDS).toString());
    }

    /** An argument as a POSIX shell would need it to read it back as one word. */
    static String shellQuoted(String a) {
        if (!a.isEmpty() && a.matches("[A-Za-z0-9_./:=,+@%-]+")) {
            return a;
        }
        return "'" + a.replace("'", "'\\''") + "'";
    }
}
