package org.wayhold.simulate;

import org.wayhold.settings.Check;

/**
 * The true state of the simulated vehicle's reference point at one instant.
 *
 * @param t              time (seconds on the vehicle's clock)
 * @param eastM          position east of the drive's origin (m, ENU)
 * @param northM         position north of the drive's origin (m, ENU)
 * @param yawRad         yaw (radians counter-clockwise from east, unwrapped: it keeps counting across turns)
 * @param speedMps       speed along the vehicle's forward axis (m/s, negative while reversing)
 * @param yawRateRadPerS rate of turn (rad/s, positive counter-clockwise seen from above)
 * @param distanceM      path length travelled since the start, forward and reverse both counted (m, >= 0)
 */
public record Truth(double t, double eastM, double northM, double yawRad, double speedMps,
                    double yawRateRadPerS, double distanceM) {

    public Truth {
        Check.finite("t", t, "s");
        Check.finite("eastM", eastM, "m");
        Check.finite("northM", northM, "m");
        Check.finite("yawRad", yawRad, "rad");
        Check.finite("speedMps", speedMps, "m/s");
        Check.finite("yawRateRadPerS", yawRateRadPerS, "rad/s");
        Check.finite("distanceM", distanceM, "m");
        if (distanceM < 0.0) {
            throw new IllegalArgumentException("distanceM: must be >= 0 m, was " + distanceM);
        }
    }

    /**
     * East coordinate of a point fixed to the vehicle, such as the GNSS antenna (m, ENU).
     *
     * @param forwardM distance ahead of the reference point (m)
     * @param leftM    distance left of the reference point (m)
     */
    public double bodyPointEastM(double forwardM, double leftM) {
        return eastM + forwardM * StrictMath.cos(yawRad) - leftM * StrictMath.sin(yawRad);
    }

    /**
     * North coordinate of a point fixed to the vehicle, such as the GNSS antenna (m, ENU).
     *
     * @param forwardM distance ahead of the reference point (m)
     * @param leftM    distance left of the reference point (m)
     */
    public double bodyPointNorthM(double forwardM, double leftM) {
        return northM + forwardM * StrictMath.sin(yawRad) + leftM * StrictMath.cos(yawRad);
    }
}
