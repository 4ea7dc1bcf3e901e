/**
 * Track files of fused drives ({@code wayhold fuse}): CSV with the unit of every column in its header,
 * GeoJSON (RFC 7946) and GPX 1.1.
 *
 * <p>Frames and units: WGS-84 latitude and longitude in degrees and ellipsoidal height in metres; east,
 * north and up in metres in the drive's local ENU frame; heading clockwise from true north in degrees;
 * times as seconds on the vehicle's clock in CSV and GeoJSON, and as UTC date-times (taking those
 * seconds as Unix epoch seconds) where a format needs one (GPX, GeoJSON's {@code time}).
 */
package org.wayhold.tracks;
