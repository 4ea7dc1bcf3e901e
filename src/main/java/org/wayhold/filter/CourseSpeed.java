package org.wayhold.filter;

import org.wayhold.filter.FilterState.Slot;

import static org.wayhold.filter.StateIndex.GYRO_BIAS;
import static org.wayhold.filter.StateIndex.SIZE;
import static org.wayhold.filter.StateIndex.SPEED_SCALE;
import static org.wayhold.filter.StateIndex.YAW;

import java.util.Arrays;
import org.wayhold.geo.Angles;
import org.wayhold.sample.GnssFix;
import org.wayhold.settings.FilterSettings;
import org.wayhold.settings.VehicleProfile;

/**
 * The measurement model of a GNSS course and speed over the ground, which are the antenna's: the
 * course observes the yaw (reversed when the wheels say the car reverses) and, with a lever arm, the
 * turn rate; the speed observes the scale times the wheel speed.
 * Used only when the vehicle moves fast enough for the course to mean something. Course noise shrinks
 * with speed (its error is roughly a velocity error divided by the speed).
 */
final class CourseSpeed {

    /** The wheels must say the vehicle moves for a course to be used (m/s). */
    static final double MOVING_SPEED_MPS = 0.5;

    private final FilterSettings settings;
    private final double leverForwardM;
    private final double leverLeftM;

    CourseSpeed(FilterSettings settings, VehicleProfile profile) {
        this.settings = settings;
        this.leverForwardM = profile.leverArmForwardM();
        this.leverLeftM = profile.leverArmLeftM();
    }

    /**
     * Corrects the state with the fix's course and speed when it carries both and they apply.
     *
     * @param s             the state (modified)
     * @param u             the update mechanics
     * @param fix           the fix
     * @param gateThreshold chi-square gate on the two-row NIS (unitless)
     */
    void update(FilterState s, JosephUpdate u, GnssFix fix, double gateThreshold) {
        if (!fix.hasSpeed() || !fix.hasCourse() || s.is(Slot.STANDSTILL)) {
            return;
        }
        double minSpeed = settings.gnssVelocityMinSpeedMps();
        if (fix.speedMps() < minSpeed || Math.abs(s.get(Slot.WHEEL_SPEED_MPS)) < MOVING_SPEED_MPS) {
            return;
        }
        double wheel = s.get(Slot.WHEEL_SPEED_MPS);
        double courseSigma = Math.toRadians(settings.gnssCourseSigmaDeg()) * Math.max(minSpeed, 1e-3)
                / fix.speedMps();
        double speedSigma = settings.gnssSpeedSigmaMps();
        double[] h = u.h;
        Arrays.fill(h, 0.0);
        u.r[0] = courseSigma * courseSigma;
        u.r[1] = 0.0;
        u.r[2] = 0.0;
        u.r[3] = speedSigma * speedSigma;
        double measuredYaw = Angles.headingDegToYawRad(fix.courseDeg());
        if (leverForwardM == 0.0 && leverLeftM == 0.0) {
            // The antenna moves with the reference point: its course is the yaw (reversed when the car
            // reverses) and its speed the scaled wheel speed.
            if (wheel < 0.0) {
                measuredYaw = Angles.wrapPi(measuredYaw + Math.PI);
            }
            double absWheel = Math.abs(wheel);
            h[YAW] = 1.0;
            h[SIZE + SPEED_SCALE] = absWheel;
            u.nu[0] = Angles.wrapPi(measuredYaw - s.x[YAW]);
            u.nu[1] = fix.speedMps() - s.x[SPEED_SCALE] * absWheel;
        } else {
            // The antenna's velocity in the vehicle frame (x forward, y left) is the reference point's
            // plus omega z x (forward, left): (v - omega left, omega forward). Its course is the yaw plus
            // the direction of that vector, its speed the vector's length; in a turn both differ from
            // the reference point's by the lever arm.
            double omega = s.get(Slot.YAW_RATE_RAD_PER_S) - s.x[GYRO_BIAS];
            double a = s.x[SPEED_SCALE] * wheel - omega * leverLeftM;
            double b = omega * leverForwardM;
            double n2 = a * a + b * b;
            double speed = Math.sqrt(n2);
            h[YAW] = 1.0;
            h[SPEED_SCALE] = -b * wheel / n2;
            h[GYRO_BIAS] = -(a * leverForwardM + b * leverLeftM) / n2;
            h[SIZE + SPEED_SCALE] = a * wheel / speed;
            h[SIZE + GYRO_BIAS] = (a * leverLeftM - b * leverForwardM) / speed;
            u.nu[0] = Angles.wrapPi(measuredYaw - (s.x[YAW] + Math.atan2(b, a)));
            u.nu[1] = fix.speedMps() - speed;
        }
        u.prepare(s.p, 2);
        if (u.nis() > gateThreshold) {
            s.increment(FilterCounter.VELOCITY_GATED);
            return;
        }
        u.apply(s, 2);
    }
}
