package org.wayhold.simulate;

import org.wayhold.settings.Check;

/**
 * Standstills of minutes along the route (congestion, a level crossing, a wait at a barrier): the car
 * brakes to rest, stands with GNSS still available, and drives off. The gyro's bias keeps moving
 * meanwhile (its random walk, and the warm-up of {@link GyroWarmUp} when on); a stationary car makes
 * that bias observable, which is what a filter's standstill handling has to get right.
 *
 * @param enabled   whether the route holds long stops
 * @param count     long stops on the route (>= 1)
 * @param durationS length of each (s, > 0)
 */
public record LongStops(boolean enabled, int count, double durationS) {

    /** Two stops of three minutes (common practice for congestion and level crossings). */
    public static LongStops off() {
        return new LongStops(false, 2, 180.0);
    }

    public LongStops {
        Check.atLeast("route.longStops.count", count, 1);
        Check.positive("route.longStops.durationS", durationS, "s");
    }

    /** The same magnitudes, switched on. */
    public LongStops on() {
        return new LongStops(true, count, durationS);
    }

    /** The same magnitudes, switched on or off. */
    public LongStops withEnabled(boolean value) {
        return new LongStops(value, count, durationS);
    }

    /** This many stops of this length (s), switched on. */
    public LongStops with(int stops, double eachS) {
        return new LongStops(true, stops, eachS);
    }
}
