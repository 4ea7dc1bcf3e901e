package org.wayhold.simulate;

/**
 * The kinds of marked stretches a route can hold. Each is a half-open interval of the drive; the
 * simulator reports them as {@link TimeWindow}s so tests and studies know where each effect happened.
 */
public enum Zone {
    /** GNSS denied: no fix has a time inside. */
    TUNNEL,
    /** Degraded GNSS between tall buildings: fixes missing, offset or biased. */
    CANYON,
    /** A multi-storey garage with a helical ramp: GNSS denied, height changes, a parking standstill. */
    GARAGE,
    /** A traffic-light queue: from the stop at the back of the queue to the launch on green. */
    QUEUE,
    /** A standstill of minutes (congestion, a level crossing). */
    LONG_STOP,
    /** A motorway stretch at 30-36 m/s, slip roads included. */
    MOTORWAY;

    /** Whether GNSS is denied inside a stretch of this kind. */
    boolean deniesGnss() {
        return this == TUNNEL || this == GARAGE;
    }
}
