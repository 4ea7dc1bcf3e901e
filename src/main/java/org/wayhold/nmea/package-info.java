/**
 * GNSS fixes from NMEA 0183 text (GGA and RMC sentences), as {@link org.wayhold.sample.GnssFix} samples.
 *
 * <p>Units and frames: latitude and longitude in WGS-84 degrees (north and east positive), heights in
 * metres above the ellipsoid (GGA's altitude above mean sea level plus its geoid separation), speed in
 * m/s (RMC gives knots: 1 kn = 1852 m / 3600 s), course in degrees clockwise from true north, time in
 * UTC epoch seconds (RMC's date with the sentence's UTC time of day). No JSON or web library here.
 */
package org.wayhold.nmea;
