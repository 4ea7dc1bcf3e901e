package org.wayhold.simulate;

/** Range checks for the simulation settings; each message names the field, the value and the unit. */
final class Require {
    private Require() {
    }

    static void finite(String field, double value, String unit) {
        if (!Double.isFinite(value)) {
            throw new IllegalArgumentException(field + ": must be a finite number of " + unit + ", was " + value);
        }
    }

    static void positive(String field, double value, String unit) {
        if (!(value > 0.0) || Double.isInfinite(value)) {
            throw new IllegalArgumentException(field + ": must be a positive finite number of " + unit
                    + ", was " + value);
        }
    }

    static void nonNegative(String field, double value, String unit) {
        if (!(value >= 0.0) || Double.isInfinite(value)) {
            throw new IllegalArgumentException(field + ": must be a finite number of " + unit + " >= 0, was "
                    + value);
        }
    }

    static void probability(String field, double value) {
        if (!(value >= 0.0 && value <= 1.0)) {
            throw new IllegalArgumentException(field + ": must be a probability in [0, 1], was " + value);
        }
    }

    static void range(String field, double min, double max, String unit) {
        if (max < min) {
            throw new IllegalArgumentException(field + ": the upper bound " + max + " " + unit
                    + " is below the lower bound " + min + " " + unit);
        }
    }

    /**
     * A sample rate must divide the 100 Hz tick grid so every sample falls on a tick.
     *
     * @return ticks between samples
     */
    static int gridRate(String field, double rateHz) {
        positive(field, rateHz, "Hz");
        double ticks = Route.TICKS_PER_S / rateHz;
        long whole = Math.round(ticks);
        if (whole < 1 || Math.abs(ticks - whole) > 1e-9) {
            throw new IllegalArgumentException(field + ": must divide " + Route.TICKS_PER_S
                    + " Hz (for example 100, 50, 25, 20, 10, 5, 1), was " + rateHz + " Hz");
        }
        return (int) whole;
    }
}
