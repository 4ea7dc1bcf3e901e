package org.wayhold.fusion;

import org.wayhold.pose.Ellipse95;
import org.wayhold.pose.NavState;

/**
 * One point of a fused track.
 *
 * @param t               time (s, vehicle clock)
 * @param latDeg          WGS-84 latitude (degrees), NaN when the position has none
 * @param lonDeg          WGS-84 longitude (degrees), NaN when the position has none
 * @param heightM         ellipsoidal height (m), NaN when the position has none
 * @param eastM           east in the drive's ENU frame (m)
 * @param northM          north (m)
 * @param upM             up (m)
 * @param headingDeg      heading, clockwise from true north (degrees, [0, 360)), NaN while initialising
 * @param headingSigmaDeg 1-sigma of the heading (degrees), NaN while initialising
 * @param speedMps        speed (m/s, signed), the forward filter's
 * @param covEastEastM2   horizontal covariance, east-east (m^2)
 * @param covEastNorthM2  horizontal covariance, east-north (m^2)
 * @param covNorthNorthM2 horizontal covariance, north-north (m^2)
 * @param ellipse95       95% error ellipse of the horizontal position
 * @param radius95M       radius of the circle holding the position with 95% probability (m)
 * @param state           the forward filter's navigation state at this time
 * @param reasons         the forward filter's reasons for caution, a set of
 *                        {@link org.wayhold.filter.Reason} bits
 * @param inGap           true when the point lies inside a GNSS gap of the log: no fix with a solution
 *                        for longer than {@code outage.gap_s} around it
 */
public record FusedPoint(double t, double latDeg, double lonDeg, double heightM, double eastM, double northM,
                         double upM, double headingDeg, double headingSigmaDeg, double speedMps,
                         double covEastEastM2, double covEastNorthM2, double covNorthNorthM2, Ellipse95 ellipse95,
                         double radius95M, NavState state, int reasons, boolean inGap) {

    public FusedPoint {
        if (!Double.isFinite(t)) {
            throw new IllegalArgumentException("t: must be a finite time in s, was " + t);
        }
        java.util.Objects.requireNonNull(ellipse95, "ellipse95");
        java.util.Objects.requireNonNull(state, "state");
    }

    /** True when the point has a geodetic position. */
    public boolean placed() {
        return Double.isFinite(latDeg) && Double.isFinite(lonDeg);
    }
}
