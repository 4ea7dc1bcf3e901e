/**
 * Immutable sample records as they arrive from a vehicle: GNSS fixes, wheel speed, yaw rate, and
 * reference points used only for scoring.
 *
 * <p>Units and conventions, stated once for the whole project:
 * <ul>
 *   <li>{@code t} is seconds on the vehicle's own clock (for example UTC epoch seconds, about 1.8e9).
 *       Inside the filter times are taken relative to a session epoch so no precision is lost.</li>
 *   <li>Geodetic positions are WGS-84 latitude and longitude in degrees ({@code latDeg},
 *       {@code lonDeg}) and ellipsoidal height in metres ({@code altM}).</li>
 *   <li>Speeds are metres per second, signed: a negative wheel speed means reversing.</li>
 *   <li>Yaw rate is radians per second, positive counter-clockwise seen from above (z up, ISO 8855
 *       vehicle axes).</li>
 *   <li>Course and heading at the edges are degrees clockwise from true north, in [0, 360).</li>
 * </ul>
 *
 * <p>An optional numeric field that the sender left out is {@link Double#NaN} (or {@code -1} for a
 * satellite count); ingest rejects NaN and infinities in the input, so inside a record NaN can only
 * mean "not given". Each record offers a {@code has...} method so callers need not test NaN
 * themselves.
 */
package org.wayhold.sample;
