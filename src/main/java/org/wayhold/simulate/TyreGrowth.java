package org.wayhold.simulate;

import org.wayhold.settings.Check;

/**
 * Tyre growth with speed: the belt of a spinning tyre is pulled outwards by its own centripetal load,
 * so the effective rolling radius grows by {@code growthAtReference * (v / referenceSpeedMps)^2} (the
 * hoop strain of a spinning ring is proportional to the square of its surface speed). The wheel sensor
 * turns revolutions into distance with a fixed circumference, so it reads {@code v / (1 + growth)}: the
 * odometer scale changes with speed, by about 0.07% at 10 m/s and 0.75% at 33 m/s with the defaults.
 *
 * @param enabled           whether the growth is applied
 * @param growthAtReference relative radius growth at the reference speed (unitless, in [0, 0.2))
 * @param referenceSpeedMps the speed at which the growth is {@code growthAtReference} (m/s, > 0)
 */
public record TyreGrowth(boolean enabled, double growthAtReference, double referenceSpeedMps) {

    /**
     * 0.75% at 33 m/s: motorway speed makes the rolling radius 0.5-1% larger than in town (common
     * practice).
     */
    public static final double DEFAULT_GROWTH = 0.0075;
    /** 33 m/s (about 120 km/h), a motorway speed. */
    public static final double DEFAULT_REFERENCE_SPEED_MPS = 33.0;

    public TyreGrowth {
        if (!(growthAtReference >= 0.0 && growthAtReference < 0.2)) {
            throw new IllegalArgumentException("wheelSpeed.tyreGrowth.growthAtReference: must lie in [0, 0.2) "
                    + "(unitless), was " + growthAtReference);
        }
        Check.positive("wheelSpeed.tyreGrowth.referenceSpeedMps", referenceSpeedMps, "m/s");
    }

    /** Off, with the default magnitudes ready for {@link #on()}. */
    public static TyreGrowth off() {
        return new TyreGrowth(false, DEFAULT_GROWTH, DEFAULT_REFERENCE_SPEED_MPS);
    }

    /** The same magnitudes, switched on. */
    public TyreGrowth on() {
        return new TyreGrowth(true, growthAtReference, referenceSpeedMps);
    }

    /** The same magnitudes, switched on or off. */
    public TyreGrowth withEnabled(boolean value) {
        return new TyreGrowth(value, growthAtReference, referenceSpeedMps);
    }

    /** This growth (fraction) at the reference speed (m/s), switched on. */
    public TyreGrowth withGrowth(double growth, double atSpeedMps) {
        return new TyreGrowth(true, growth, atSpeedMps);
    }

    /** Relative growth of the rolling radius at this speed (unitless; 0 when off). */
    public double growthAt(double speedMps) {
        if (!enabled) {
            return 0.0;
        }
        double r = speedMps / referenceSpeedMps;
        return growthAtReference * r * r;
    }
}
