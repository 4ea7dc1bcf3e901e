/**
 * Writers of the offline score report: {@code report.json}, {@code outages.csv} and a self-contained
 * {@code report.html} with plots drawn by JFreeChart into inline SVG.
 *
 * <p>Units and frames: distances and errors in metres; times in seconds (window starts on the log's own
 * clock, offsets from the log's first sample); positions as WGS-84 latitude and longitude in degrees,
 * or east and north in metres in each log's ENU frame (origin at its first fix); NEES unitless.
 */
package org.wayhold.report;
