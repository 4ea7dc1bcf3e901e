package org.wayhold.settings;

/**
 * Range checks for settings records here and in {@code org.wayhold.simulate}. Each failure is a
 * {@link SettingsException} that carries the key and whose message names the key, the bad value and, where the caller
 * gives one, the unit ({@code "gnss.markovTimeS: must be a positive finite number of s, was -1.0"});
 * keys whose name already carries the unit ({@code filter.gnss_floor_m}) use the forms without one.
 * Each check returns the value it accepted.
 */
public final class Check {
    private Check() {
    }

    public static double positive(String key, double value) {
        return positive(key, value, null);
    }

    /** A finite number greater than 0, in unit ({@code null} for none). */
    public static double positive(String key, double value, String unit) {
        if (!(value > 0.0) || Double.isInfinite(value)) {
            throw new SettingsException(key, "must be a positive finite number" + of(unit) + ", was " + value);
        }
        return value;
    }

    public static double nonNegative(String key, double value) {
        return nonNegative(key, value, null);
    }

    /** A finite number of at least 0, in unit ({@code null} for none). */
    public static double nonNegative(String key, double value, String unit) {
        if (!(value >= 0.0) || Double.isInfinite(value)) {
            throw new SettingsException(key, "must be a finite number" + of(unit) + " >= 0, was " + value);
        }
        return value;
    }

    public static double finite(String key, double value) {
        return finite(key, value, null);
    }

    /** Any finite number, in unit ({@code null} for none). */
    public static double finite(String key, double value, String unit) {
        if (!Double.isFinite(value)) {
            throw new SettingsException(key, "must be a finite number" + of(unit) + ", was " + value);
        }
        return value;
    }

    /** A number strictly between 0 and 1 (a probability that may be neither impossible nor certain). */
    public static double openUnit(String key, double value) {
        if (!(value > 0.0 && value < 1.0)) {
            throw new SettingsException(key, "must lie strictly between 0 and 1, was " + value);
        }
        return value;
    }

    /** A probability in [0, 1]. */
    public static double probability(String key, double value) {
        if (!(value >= 0.0 && value <= 1.0)) {
            throw new SettingsException(key, "must be a probability in [0, 1], was " + value);
        }
        return value;
    }

    public static int atLeast(String key, int value, int min) {
        if (value < min) {
            throw new SettingsException(key, "must be at least " + min + ", was " + value);
        }
        return value;
    }

    /**
     * The upper bound max of a range is not below its lower bound min, both in unit; key names the
     * upper bound.
     */
    public static void range(String key, double min, double max, String unit) {
        if (max < min) {
            throw new SettingsException(key, "the upper bound " + max + " " + unit
                    + " is below the lower bound " + min + " " + unit);
        }
    }

    /** A finite value within [min, max] of unit. */
    public static double within(String key, double value, double min, double max, String unit) {
        if (!(value >= min && value <= max)) {
            throw new IllegalArgumentException(key + ": must lie in [" + min + ", " + max + "]"
                    + (unit == null || unit.isEmpty() ? "" : " " + unit) + ", was " + value);
        }
        return value;
    }

    private static String of(String unit) {
        return unit == null ? "" : " of " + unit;
    }
}
