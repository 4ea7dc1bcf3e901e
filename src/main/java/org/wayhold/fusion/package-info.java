/**
 * A whole recorded drive fused after the fact ({@code wayhold fuse}): the forward filter's track, as
 * the live service would have given it, and the Rauch-Tung-Striebel smoothed track, each point of it
 * estimated from the data before and after it.
 *
 * <p>Frames and units: WGS-84 latitude and longitude (degrees) and ellipsoidal height (m) at the edges;
 * east, north and up in metres in the drive's local ENU frame (origin at its first fix with a solution,
 * as a session takes it); heading clockwise from true north in degrees; times in seconds on the
 * vehicle's clock.
 */
package org.wayhold.fusion;
