package org.wayhold.filter;

import org.wayhold.filter.FilterState.Slot;

import static org.wayhold.filter.StateIndex.SIZE;
import static org.wayhold.filter.StateIndex.SPEED_SCALE;
import static org.wayhold.filter.StateIndex.YAW;

import java.util.Arrays;
import org.wayhold.geo.Angles;
import org.wayhold.sample.GnssFix;
import org.wayhold.settings.FilterSettings;

/**
 * The measurement model of a GNSS course and speed over the ground: the course observes the yaw
 * (reversed when the wheels say the car reverses), the speed observes the scale times the wheel speed.
 * Used only when the vehicle moves fast enough for the course to mean something. Course noise shrinks
 * with speed (its error is roughly a velocity error divided by the speed).
 */
final class CourseSpeed {

    /** The wheels must say the vehicle moves for a course to be used (m/s). */
    static final double MOVING_SPEED_MPS = 0.5;

    private final FilterSettings settings;

    CourseSpeed(FilterSettings settings) {
        this.settings = settings;
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
        double courseYaw = Angles.headingDegToYawRad(fix.courseDeg());
        if (s.get(Slot.WHEEL_SPEED_MPS) < 0.0) {
            courseYaw = Angles.wrapPi(courseYaw + Math.PI);
        }
        double courseSigma = Math.toRadians(settings.gnssCourseSigmaDeg()) * Math.max(minSpeed, 1e-3)
                / fix.speedMps();
        double speedSigma = settings.gnssSpeedSigmaMps();
        double absWheel = Math.abs(s.get(Slot.WHEEL_SPEED_MPS));
        double[] h = u.h;
        Arrays.fill(h, 0.0);
        h[YAW] = 1.0;
        h[SIZE + SPEED_SCALE] = absWheel;
        u.r[0] = courseSigma * courseSigma;
        u.r[1] = 0.0;
        u.r[2] = 0.0;
        u.r[3] = speedSigma * speedSigma;
        u.nu[0] = Angles.wrapPi(courseYaw - s.x[YAW]);
        u.nu[1] = fix.speedMps() - s.x[SPEED_SCALE] * absWheel;
        u.prepare(s.p, 2);
        if (u.nis() > gateThreshold) {
            s.increment(FilterCounter.VELOCITY_GATED);
            return;
        }
        u.apply(s, 2);
    }
}
