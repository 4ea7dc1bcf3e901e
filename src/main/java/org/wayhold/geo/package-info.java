/**
 * Geodesy for wayhold: the WGS-84 ellipsoid, geodetic and Earth-centred coordinates, the local
 * east-north-up frame the filter works in, angle conventions, and projected coordinates for export.
 *
 * <p>Units and frames, stated once for the whole project:
 * <ul>
 *   <li><b>Geodetic</b> ({@link org.wayhold.geo.Geodetic}): WGS-84 latitude and longitude in degrees
 *       ({@code latDeg} in [-90, 90], positive north; {@code lonDeg} in [-180, 180], positive east)
 *       and ellipsoidal height in metres ({@code altM}). Out-of-range values are rejected, never
 *       wrapped.</li>
 *   <li><b>ECEF</b> ({@link org.wayhold.geo.Ecef}): metres from the ellipsoid's centre, x towards
 *       (0 deg, 0 deg), z towards the north pole, y completing a right-handed frame.</li>
 *   <li><b>ENU</b> ({@link org.wayhold.geo.Enu}, {@link org.wayhold.geo.LocalFrame}): metres in
 *       the tangent plane at a session's origin; x east, y north, z up along the ellipsoid normal at
 *       the origin.</li>
 *   <li><b>Yaw</b>: radians, counter-clockwise from east (the ENU x axis), used everywhere inside;
 *       a yaw rate is radians per second, positive counter-clockwise seen from above (z up, ISO
 *       8855 vehicle axes).</li>
 *   <li><b>Heading</b>: degrees clockwise from true north, in [0, 360), used only at the edges
 *       (input course, output {@code heading_deg}). An axis direction, such as an error ellipse's
 *       major axis, is degrees clockwise from true north in [0, 180).</li>
 * </ul>
 *
 * <p>{@link org.wayhold.geo.Angles} is the one place that converts between yaw and heading:
 * heading = 90 deg - yaw. Worked example: driving north, yaw = pi/2 and heading 0 deg; driving
 * east, yaw = 0 and heading 90 deg. A positive yaw rate turns a north-bound car west, so its
 * heading decreases: a yaw rate of +0.1 rad/s is a heading rate of -5.73 deg/s.
 *
 * <p>Sources: WGS-84 constants from NIMA TR8350.2 (3rd edition, 2000); geodetic/ECEF/ENU formulas
 * from IOGP Publication 373-7-2 (Geomatics Guidance Note 7, part 2), EPSG methods 9602, 9836 and
 * 9837; the ECEF-to-geodetic inverse from H. Vermeille, Journal of Geodesy 76 (2002) 451-454.
 */
package org.wayhold.geo;
