package org.wayhold.simulate;

/**
 * A fix the simulator deliberately spoiled (or left out), so tests can tell the filter's reaction to
 * it from its reaction to ordinary noise.
 *
 * @param t             the fix's {@code t} (seconds on the vehicle's clock): its stamp, later than its time of
 *                      validity when {@link GnssLatency} is on
 * @param kind          what happened to it
 * @param offsetEastM   extra error added east on top of the ordinary noise (m; 0 for a dropped fix)
 * @param offsetNorthM  extra error added north on top of the ordinary noise (m; 0 for a dropped fix)
 */
public record GnssFault(double t, Kind kind, double offsetEastM, double offsetNorthM) {

    /** The kinds of spoiled fixes. */
    public enum Kind {
        /** A single large jump in open sky. */
        OUTLIER,
        /** One of the offset fixes in the first seconds after a tunnel exit. */
        EXIT_MULTIPATH,
        /** An offset fix inside an urban canyon. */
        CANYON_MULTIPATH,
        /** A fix missing inside an urban canyon (not in the samples). */
        CANYON_DROPPED,
        /** A fix inside an urban canyon carrying the slowly varying non-line-of-sight bias of {@link CanyonNlos}. */
        CANYON_NLOS
    }

    public GnssFault {
        if (!Double.isFinite(t)) {
            throw new IllegalArgumentException("t: must be a finite number of seconds, was " + t);
        }
        if (kind == null) {
            throw new IllegalArgumentException("kind: must be given");
        }
        if (!Double.isFinite(offsetEastM) || !Double.isFinite(offsetNorthM)) {
            throw new IllegalArgumentException("offsetEastM, offsetNorthM: must be finite metres, were "
                    + offsetEastM + ", " + offsetNorthM);
        }
    }

    /** Size of the extra horizontal error (m). */
    public double offsetM() {
        return Math.hypot(offsetEastM, offsetNorthM);
    }
}
