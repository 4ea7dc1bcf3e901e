package org.wayhold.pose;

/**
 * The current GNSS outage, if any.
 *
 * @param active  true while no usable fix has arrived for longer than the configured gap
 * @param sinceT  time of the last usable fix before the gap (s, vehicle clock), NaN when not active
 * @param seconds time since that fix (s), 0 when not active
 * @param meters  distance driven since that fix (m), 0 when not active
 */
public record Outage(boolean active, double sinceT, double seconds, double meters) {

    public static final Outage NONE = new Outage(false, Double.NaN, 0.0, 0.0);
}
