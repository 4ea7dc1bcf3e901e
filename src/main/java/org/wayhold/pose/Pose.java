package org.wayhold.pose;

import org.wayhold.geo.Geodetic;

/**
 * A fused pose as the service and the reports give it.
 *
 * @param t                 time (s, vehicle clock)
 * @param latDeg            WGS-84 latitude (degrees), NaN before the first fix
 * @param lonDeg            WGS-84 longitude (degrees), NaN before the first fix
 * @param altM              ellipsoidal height (m), NaN before the first fix
 * @param eastM             east in the session's ENU frame (m)
 * @param northM            north in the session's ENU frame (m)
 * @param upM               up in the session's ENU frame (m)
 * @param headingDeg        heading, clockwise from true north (degrees, [0, 360))
 * @param speedMps          speed (m/s, signed)
 * @param yawRateRadPerS    yaw rate with the gyro bias removed (rad/s, counter-clockwise positive)
 * @param covEastEastM2     horizontal covariance, east-east (m^2)
 * @param covEastNorthM2    horizontal covariance, east-north (m^2)
 * @param covNorthNorthM2   horizontal covariance, north-north (m^2)
 * @param headingSigmaDeg   1-sigma of the heading (degrees)
 * @param ellipse95         95% error ellipse
 * @param state             navigation state
 * @param outage            the current outage
 * @param gyroBiasRadPerS   estimated gyro bias (rad/s)
 * @param speedScale        estimated wheel-speed scale (unitless)
 * @param origin            origin of the session's ENU frame, null before the first fix
 * @param lastFixT          time of the last fix that corrected the estimate (s, vehicle clock), NaN if none
 * @param alertLimitM       95% radius beyond which the pose is {@code unreliable} without a fix (m)
 * @param radius95M         radius of the circle holding the position with 95% probability (m, {@link Radius95}),
 *                          NaN when the position is not known
 * @param reasons           why the pose deserves caution, a set of {@link org.wayhold.filter.Reason} bits
 */
public record Pose(double t, double latDeg, double lonDeg, double altM, double eastM, double northM, double upM,
                   double headingDeg, double speedMps, double yawRateRadPerS, double covEastEastM2,
                   double covEastNorthM2, double covNorthNorthM2, double headingSigmaDeg, Ellipse95 ellipse95,
                   NavState state, Outage outage, double gyroBiasRadPerS, double speedScale, Geodetic origin,
                   double lastFixT, double alertLimitM, double radius95M, int reasons) {

    /** The reasons, in the vocabulary's order. */
    public java.util.List<org.wayhold.filter.Reason> reasonList() {
        java.util.List<org.wayhold.filter.Reason> out = new java.util.ArrayList<>();
        for (org.wayhold.filter.Reason r : org.wayhold.filter.Reason.values()) {
            if (r.in(reasons)) {
                out.add(r);
            }
        }
        return out;
    }
}
