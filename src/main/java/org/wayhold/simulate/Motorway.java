package org.wayhold.simulate;

import java.util.List;
import org.wayhold.settings.Check;

/**
 * Motorway stretches along the route: each starts with an on-ramp acceleration at 1.5 m/s^2 to a speed
 * drawn from {@code [minSpeedMps, maxSpeedMps]}, holds speeds in that band through gentle curves
 * (radius 1-3 km), and ends with the off-ramp back to town speeds. Paired with {@link TyreGrowth} the
 * odometer scale differs from the one in town.
 *
 * @param enabled     whether the route holds motorway stretches
 * @param stretchesS  length of each stretch, slip roads included (s, each >= 60), in route order
 * @param minSpeedMps slowest motorway speed (m/s, > 0)
 * @param maxSpeedMps fastest motorway speed (m/s, >= minSpeedMps, <= 70)
 */
public record Motorway(boolean enabled, List<Double> stretchesS, double minSpeedMps, double maxSpeedMps) {

    /** The shortest stretch: both slip roads (up to about 17 s each with the defaults) and some cruising (s). */
    static final double MIN_STRETCH_S = 60.0;

    /** One stretch of 180 s at 30-36 m/s (108-130 km/h, common practice for motorways). */
    public static Motorway off() {
        return new Motorway(false, List.of(180.0), 30.0, 36.0);
    }

    public Motorway {
        stretchesS = List.copyOf(stretchesS);
        if (stretchesS.isEmpty()) {
            throw new IllegalArgumentException("route.motorway.stretchesS: must hold at least one length");
        }
        for (double d : stretchesS) {
            if (!(d >= MIN_STRETCH_S) || Double.isInfinite(d)) {
                throw new IllegalArgumentException("route.motorway.stretchesS[]: must be at least " + MIN_STRETCH_S
                        + " s (two slip roads and some cruising), was " + d);
            }
        }
        Check.positive("route.motorway.minSpeedMps", minSpeedMps, "m/s");
        Check.range("route.motorway.maxSpeedMps", minSpeedMps, maxSpeedMps, "m/s");
        if (maxSpeedMps > 70.0) {
            throw new IllegalArgumentException("route.motorway.maxSpeedMps: must be at most 70 m/s, was " + maxSpeedMps);
        }
    }

    /** The same magnitudes, switched on. */
    public Motorway on() {
        return new Motorway(true, stretchesS, minSpeedMps, maxSpeedMps);
    }

    /** The same magnitudes, switched on or off. */
    public Motorway withEnabled(boolean value) {
        return new Motorway(value, stretchesS, minSpeedMps, maxSpeedMps);
    }

    /** These stretches (s each), switched on. */
    public Motorway withStretchesS(List<Double> value) {
        return new Motorway(true, value, minSpeedMps, maxSpeedMps);
    }

    /** This speed band (m/s), switched on. */
    public Motorway withSpeedMps(double minMps, double maxMps) {
        return new Motorway(true, stretchesS, minMps, maxMps);
    }

    /** The stretches when on, else none. */
    List<Double> activeStretchesS() {
        return enabled ? stretchesS : List.of();
    }
}
