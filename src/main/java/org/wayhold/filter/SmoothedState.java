package org.wayhold.filter;

/**
 * The smoothed estimate at one node: the state given all the data of its segment, before and after.
 * Positions in the session's ENU frame.
 *
 * @param tRel            time (s since the session epoch)
 * @param eastM           east of the vehicle reference point (m)
 * @param northM          north of the vehicle reference point (m)
 * @param yawRad          yaw, counter-clockwise from east (rad, (-pi, pi])
 * @param gyroBiasRadPerS gyro bias (rad/s)
 * @param speedScale      wheel-speed scale (unitless)
 * @param gyroScale       gyro scale (unitless)
 * @param covEastEastM2   variance of east (m^2)
 * @param covEastNorthM2  covariance of east and north (m^2)
 * @param covNorthNorthM2 variance of north (m^2)
 * @param varYawRad2      variance of yaw (rad^2)
 */
public record SmoothedState(double tRel, double eastM, double northM, double yawRad, double gyroBiasRadPerS,
                            double speedScale, double gyroScale, double covEastEastM2, double covEastNorthM2,
                            double covNorthNorthM2, double varYawRad2) {
}
