package org.wayhold.simulate;

import org.wayhold.settings.Check;

/**
 * The true state of the simulated vehicle's reference point at one instant.
 *
 * <p>The body frame: x forward along the road, y left, z up out of the road; it is yawed by
 * {@code yawRad} and, on a grade, pitched nose up by {@code gradeRad} (roll is not modelled).
 *
 * @param t              time (seconds on the vehicle's clock)
 * @param eastM          position east of the drive's origin (m, ENU)
 * @param northM         position north of the drive's origin (m, ENU)
 * @param yawRad         yaw (radians counter-clockwise from east, unwrapped: it keeps counting across turns)
 * @param speedMps       speed along the vehicle's forward axis, i.e. along the road (m/s, negative while
 *                       reversing); the horizontal speed is {@link #horizontalSpeedMps()}
 * @param yawRateRadPerS rate of turn about the vertical (rad/s, positive counter-clockwise seen from above)
 * @param distanceM      path length travelled along the road since the start, forward and reverse both
 *                       counted (m, >= 0)
 * @param upM            height above the drive's origin (m, ENU up); 0 on a flat road
 * @param gradeRad       road inclination under the car (rad, positive climbing forward); 0 on a flat road
 */
public record Truth(double t, double eastM, double northM, double yawRad, double speedMps,
                    double yawRateRadPerS, double distanceM, double upM, double gradeRad) {

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
        Check.finite("upM", upM, "m");
        Check.finite("gradeRad", gradeRad, "rad");
    }

    /** A state on a flat road (height 0, grade 0). */
    public Truth(double t, double eastM, double northM, double yawRad, double speedMps, double yawRateRadPerS,
                 double distanceM) {
        this(t, eastM, northM, yawRad, speedMps, yawRateRadPerS, distanceM, 0.0, 0.0);
    }

    /** Speed over the ground, horizontally (m/s, signed like {@link #speedMps()}): speed * cos(grade). */
    public double horizontalSpeedMps() {
        return speedMps * StrictMath.cos(gradeRad);
    }

    /**
     * East coordinate of a point fixed to the vehicle at the height of the reference point (m, ENU).
     *
     * @param forwardM distance ahead of the reference point along the body's x axis (m)
     * @param leftM    distance left of the reference point (m)
     */
    public double bodyPointEastM(double forwardM, double leftM) {
        return bodyPointEastM(forwardM, leftM, 0.0);
    }

    /**
     * North coordinate of a point fixed to the vehicle at the height of the reference point (m, ENU).
     *
     * @param forwardM distance ahead of the reference point along the body's x axis (m)
     * @param leftM    distance left of the reference point (m)
     */
    public double bodyPointNorthM(double forwardM, double leftM) {
        return bodyPointNorthM(forwardM, leftM, 0.0);
    }

    /**
     * East coordinate of a point fixed to the vehicle, such as the GNSS antenna (m, ENU): the body
     * offset pitched by the grade, then yawed.
     *
     * @param forwardM distance ahead of the reference point along the body's x axis (m)
     * @param leftM    distance left of the reference point (m)
     * @param upM      distance above the reference point along the body's z axis (m)
     */
    public double bodyPointEastM(double forwardM, double leftM, double upM) {
        double ahead = horizontalAheadM(forwardM, upM);
        return eastM + ahead * StrictMath.cos(yawRad) - leftM * StrictMath.sin(yawRad);
    }

    /**
     * North coordinate of a point fixed to the vehicle, such as the GNSS antenna (m, ENU).
     *
     * @param forwardM distance ahead of the reference point along the body's x axis (m)
     * @param leftM    distance left of the reference point (m)
     * @param upM      distance above the reference point along the body's z axis (m)
     */
    public double bodyPointNorthM(double forwardM, double leftM, double upM) {
        double ahead = horizontalAheadM(forwardM, upM);
        return northM + ahead * StrictMath.sin(yawRad) + leftM * StrictMath.cos(yawRad);
    }

    /**
     * Height of a point fixed to the vehicle (m, ENU up).
     *
     * @param forwardM distance ahead of the reference point along the body's x axis (m)
     * @param upM      distance above the reference point along the body's z axis (m)
     */
    public double bodyPointUpM(double forwardM, double upM) {
        if (gradeRad == 0.0) {
            return this.upM + upM;
        }
        return this.upM + forwardM * StrictMath.sin(gradeRad) + upM * StrictMath.cos(gradeRad);
    }

    /**
     * Horizontal distance ahead of the reference point of a body point: pitching the body nose up by
     * the grade turns (forward, up) into (forward cos - up sin, forward sin + up cos).
     */
    double horizontalAheadM(double forwardM, double upM) {
        if (gradeRad == 0.0) {
            return forwardM;
        }
        return forwardM * StrictMath.cos(gradeRad) - upM * StrictMath.sin(gradeRad);
    }
}
