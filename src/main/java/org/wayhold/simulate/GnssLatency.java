package org.wayhold.simulate;

import org.wayhold.settings.Check;

/**
 * Fix latency: a receiver computes each fix after the epoch it describes and the logger stamps it on
 * arrival. A fix valid at time t (position, velocity, course: the truth at t) carries {@code t + latencyS}
 * as its {@code t}. At 15 m/s a 0.15 s latency puts the fix 2.25 m behind the car along the track.
 *
 * @param enabled  whether fixes are stamped late
 * @param latencyS delay between a fix's time of validity and its stamp (s, >= 0, a whole number of 10 ms
 *                 ticks so every stamp stays on the simulator's grid)
 */
public record GnssLatency(boolean enabled, double latencyS) {

    /**
     * 0.15 s: receivers deliver a fix 100-200 ms after its epoch once computation and the serial
     * link are counted (common practice).
     */
    public static final double DEFAULT_LATENCY_S = 0.15;

    public GnssLatency {
        Check.nonNegative("gnss.latency.latencyS", latencyS, "s");
        double ticks = latencyS * Route.TICKS_PER_S;
        if (Math.abs(ticks - Math.rint(ticks)) > 1e-6) {
            throw new IllegalArgumentException("gnss.latency.latencyS: must be a whole number of "
                    + Route.TICK_S + " s ticks, was " + latencyS + " s");
        }
    }

    /** Off, with the default magnitude ready for {@link #on()}. */
    public static GnssLatency off() {
        return new GnssLatency(false, DEFAULT_LATENCY_S);
    }

    /** The same magnitude, switched on. */
    public GnssLatency on() {
        return new GnssLatency(true, latencyS);
    }

    /** The same magnitudes, switched on or off. */
    public GnssLatency withEnabled(boolean value) {
        return new GnssLatency(value, latencyS);
    }

    /** This latency (s), switched on. */
    public GnssLatency withLatencyS(double value) {
        return new GnssLatency(true, value);
    }

    /** The delay in 10 ms ticks (0 when off). */
    long ticks() {
        return enabled ? Math.round(latencyS * Route.TICKS_PER_S) : 0L;
    }
}
