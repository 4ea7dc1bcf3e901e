package org.wayhold.simulate;

import org.wayhold.settings.Check;

/**
 * A height profile for the generated route: the road's grade (rise over run) is a piecewise-linear
 * function of the distance driven, with a new grade drawn uniformly from
 * {@code [-maxGradePct, maxGradePct]} every {@code minLengthM}-{@code maxLengthM} metres. The speed
 * profile and the turns stay those of the flat route with the same seed (the grades come from their
 * own random stream); what changes is that the car climbs and descends, so it covers less ground per
 * metre of road and its gyro is pitched.
 *
 * @param enabled     whether the route has a height profile
 * @param maxGradePct steepest grade (percent rise over run, in (0, 30])
 * @param minLengthM  shortest distance between two grade changes (m, > 0)
 * @param maxLengthM  longest distance between two grade changes (m, >= minLengthM)
 */
public record Hills(boolean enabled, double maxGradePct, double minLengthM, double maxLengthM) {

    /**
     * Up to 6%, changing every 150-400 m: rolling country on main roads, whose design guides keep grades
     * to a few percent (common practice).
     */
    public static Hills off() {
        return new Hills(false, 6.0, 150.0, 400.0);
    }

    public Hills {
        if (!(maxGradePct > 0.0 && maxGradePct <= 30.0)) {
            throw new IllegalArgumentException("route.hills.maxGradePct: must lie in (0, 30] percent, was "
                    + maxGradePct);
        }
        Check.positive("route.hills.minLengthM", minLengthM, "m");
        Check.positive("route.hills.maxLengthM", maxLengthM, "m");
        Check.range("route.hills.maxLengthM", minLengthM, maxLengthM, "m");
    }

    /** The same magnitudes, switched on. */
    public Hills on() {
        return new Hills(true, maxGradePct, minLengthM, maxLengthM);
    }

    /** The same magnitudes, switched on or off. */
    public Hills withEnabled(boolean value) {
        return new Hills(value, maxGradePct, minLengthM, maxLengthM);
    }

    /** This steepest grade (percent), switched on. */
    public Hills withMaxGradePct(double value) {
        return new Hills(true, value, minLengthM, maxLengthM);
    }
}
