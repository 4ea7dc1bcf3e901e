/**
 * From filter snapshots to poses: navigation state, outage tracking, the 95% error ellipse and the
 * bounded pose history of each vehicle.
 *
 * <p>Frames and units: {@code east/north/up} are metres in the session's local ENU frame whose origin
 * is the session's first accepted fix (or a configured origin); latitude and longitude are WGS-84
 * degrees; {@code headingDeg} is degrees clockwise from true north in [0, 360); the ellipse
 * orientation is degrees clockwise from true north in [0, 180); {@code t} is seconds on the vehicle's
 * clock (not relative).
 */
package org.wayhold.pose;
