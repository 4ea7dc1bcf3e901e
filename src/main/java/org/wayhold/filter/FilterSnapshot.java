package org.wayhold.filter;

/**
 * An immutable copy of what the filter knows at one time. Positions in the session's ENU frame.
 *
 * <p>Before the filter is initialised the position is the newest fix's (the alignment anchor) with
 * that fix's variance, or NaN with NaN variances before any fix: a pose never shows certainty it does
 * not have.
 *
 * @param tRel                  time of the estimate (s since the session epoch)
 * @param initialized           false until a position and a yaw exist
 * @param eastM                 east of the vehicle reference point (m)
 * @param northM                north of the vehicle reference point (m)
 * @param upM                   up of the vehicle reference point (m)
 * @param yawRad                yaw, counter-clockwise from east (rad, [-pi, pi))
 * @param gyroBiasRadPerS       estimated gyro bias (rad/s)
 * @param speedScale            estimated wheel-speed scale (unitless)
 * @param gyroScale             estimated gyro scale (unitless)
 * @param gnssErrEastM          estimated correlated GNSS error, east (m)
 * @param gnssErrNorthM         estimated correlated GNSS error, north (m)
 * @param leverForwardM         estimated antenna position ahead of the reference point (m)
 * @param leverLeftM            estimated antenna position left of the reference point (m)
 * @param gnssLatencyS          estimated GNSS time-stamp latency (s)
 * @param covEastEastM2         variance of east (m^2)
 * @param covEastNorthM2        covariance of east and north (m^2)
 * @param covNorthNorthM2       variance of north (m^2)
 * @param varYawRad2            variance of yaw (rad^2)
 * @param varGyroBias           variance of the gyro bias ((rad/s)^2)
 * @param varSpeedScale         variance of the speed scale (unitless^2)
 * @param varGyroScale          variance of the gyro scale (unitless^2)
 * @param varUpM2               variance of up (m^2)
 * @param speedMps              current speed, scale-corrected wheel speed (m/s, signed)
 * @param yawRateRadPerS        current yaw rate, bias and scale corrected (rad/s)
 * @param standstill            true while a standstill is confirmed
 * @param odometerM             distance driven since the session began (m)
 * @param lastUsedFixTRel       time of the last fix that corrected the state (s since epoch), NaN if none
 * @param lastFixTRel           time of the last fix received (s since epoch), NaN if none
 * @param lastOutcome           the decision on the last fix received, null if none yet
 * @param odometerAtLastUsedFixM odometer at the last used fix (m), NaN if none
 * @param reasons               the filter's cautions, a set of {@link Reason} bits
 * @param counts                running counts of decisions and repairs
 */
public record FilterSnapshot(double tRel, boolean initialized, double eastM, double northM, double upM,
                             double yawRad, double gyroBiasRadPerS, double speedScale, double gyroScale,
                             double gnssErrEastM, double gnssErrNorthM, double leverForwardM, double leverLeftM,
                             double gnssLatencyS, double covEastEastM2, double covEastNorthM2,
                             double covNorthNorthM2, double varYawRad2, double varGyroBias,
                             double varSpeedScale, double varGyroScale, double varUpM2, double speedMps,
                             double yawRateRadPerS, boolean standstill, double odometerM, double lastUsedFixTRel,
                             double lastFixTRel, GnssOutcome lastOutcome, double odometerAtLastUsedFixM,
                             int reasons, FilterCounts counts) {
}
