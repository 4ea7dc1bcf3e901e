package org.wayhold.settings;

/** Range checks for settings records; each message names the key, the value and the unit. */
final class Check {
    private Check() {
    }

    static double positive(String key, double value) {
        if (!(value > 0.0) || Double.isInfinite(value)) {
            throw new IllegalArgumentException(key + ": must be a positive finite number, was " + value);
        }
        return value;
    }

    static double nonNegative(String key, double value) {
        if (!(value >= 0.0) || Double.isInfinite(value)) {
            throw new IllegalArgumentException(key + ": must be a finite number >= 0, was " + value);
        }
        return value;
    }

    static double finite(String key, double value) {
        if (!Double.isFinite(value)) {
            throw new IllegalArgumentException(key + ": must be a finite number, was " + value);
        }
        return value;
    }

    static double openUnit(String key, double value) {
        if (!(value > 0.0 && value < 1.0)) {
            throw new IllegalArgumentException(key + ": must lie strictly between 0 and 1, was " + value);
        }
        return value;
    }

    static int atLeast(String key, int value, int min) {
        if (value < min) {
            throw new IllegalArgumentException(key + ": must be at least " + min + ", was " + value);
        }
        return value;
    }
}
