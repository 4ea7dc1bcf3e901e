package org.wayhold.settings;

/**
 * A settings value that a settings record refuses. It carries the key it blames as a field, so the
 * configuration reader can name the key without reading the message; the message is
 * {@code "KEY: PROBLEM"}, for example {@code "filter.gnss_floor_m: must be a positive finite number, was -1.0"}.
 */
public final class SettingsException extends IllegalArgumentException {

    private final String key;
    private final String problem;

    /**
     * @param key     full key path, such as {@code "server.port"}; {@code vehicles.*.KEY} for a vehicle
     *                profile, which does not know its own name
     * @param problem what is wrong with the value, naming the value and its unit
     */
    public SettingsException(String key, String problem) {
        super(key + ": " + problem);
        this.key = key;
        this.problem = problem;
    }

    /** Full path of the key at fault. */
    public String key() {
        return key;
    }

    /** What is wrong, without the key. */
    public String problem() {
        return problem;
    }
}
