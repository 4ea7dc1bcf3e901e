package org.wayhold.config;

import java.util.Optional;

/**
 * A configuration that cannot be used. The message starts with the full key path when one key is to
 * blame, for example {@code "filter.gnss_floor_m: must be a positive finite number, was -1.0"}, and
 * ends with the source it came from.
 */
public final class ConfigException extends RuntimeException {

    private final String key;
    private final String source;

    private ConfigException(String message, String key, String source, Throwable cause) {
        super(message, cause);
        this.key = key;
        this.source = source;
    }

    /** A problem with one key. */
    static ConfigException atKey(String key, String problem, String source) {
        return new ConfigException(key + ": " + problem + " (in " + source + ")", key, source, null);
    }

    /** A problem with the whole source, such as a YAML syntax error; {@code cause} may be null. */
    static ConfigException inSource(String problem, String source, Throwable cause) {
        return new ConfigException(source + ": " + problem, null, source, cause);
    }

    /** Full path of the offending key, such as {@code "vehicles.van_3.lever_arm_up_m"}, when one is to blame. */
    public Optional<String> key() {
        return Optional.ofNullable(key);
    }

    /** Where the configuration came from: a file path or a caller-given name. */
    public String source() {
        return source;
    }
}
