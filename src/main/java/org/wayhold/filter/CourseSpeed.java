package org.wayhold.filter;

import static org.wayhold.filter.StateIndex.GYRO_BIAS;
import static org.wayhold.filter.StateIndex.GYRO_SCALE;
import static org.wayhold.filter.StateIndex.LEVER_FORWARD;
import static org.wayhold.filter.StateIndex.LEVER_LEFT;
import static org.wayhold.filter.StateIndex.SIZE;
import static org.wayhold.filter.StateIndex.SPEED_SCALE;
import static org.wayhold.filter.StateIndex.YAW;

import java.util.Arrays;
import org.wayhold.geo.Angles;
import org.wayhold.sample.GnssFix;
import org.wayhold.settings.FilterSettings;

/**
 * The measurement model of a GNSS course and speed over the ground, which are the antenna's. In the
 * vehicle frame (x forward, y left) the antenna moves with the reference point's velocity plus
 * omega z x (forward, left), that is (a, b) = (v - omega left, omega forward): its course is the yaw
 * plus atan2(b, a) and its speed the length of (a, b). With the antenna at the reference point this is
 * the yaw (reversed when the car reverses) and the scaled wheel speed. Used only when the vehicle
 * moves fast enough for the course to mean something. Course noise shrinks with speed (its error is
 * roughly a velocity error divided by the speed).
 */
final class CourseSpeed {

    /** The wheels must say the vehicle moves for a course to be used (m/s). */
    static final double MOVING_SPEED_MPS = 0.5;

    private final FilterSettings settings;

    CourseSpeed(FilterSettings settings) {
        this.settings = settings;
    }

    /**
     * The steadier wheel speed a reading is checked against comes from two spans of wheel distance at
     * least this long each (s), {@link InputHold#wheelSpeedNowMps}: long enough to span several
     * readings of a sensor that counts teeth.
     */
    static final double MEAN_WINDOW_S = 0.2;
    /** ... and at most this long each (s): a slower stream gives no comparable speed. */
    static final double MAX_MEAN_WINDOW_S = 0.5;
    /** A reading further than this many of its sigmas from the steadier speed is not used as it is. */
    static final double STRAY_SIGMAS = 4.0;

    /**
     * Corrects the state with the fix's course and speed when it carries both and they apply.
     *
     * @param s             the state (modified)
     * @param u             the update mechanics
     * @param fix           the fix
     * @param gateThreshold chi-square gate on the two-row NIS (unitless)
     */
    void update(FilterState s, JosephUpdate u, GnssFix fix, double gateThreshold) {
        if (!fix.hasSpeed() || !fix.hasCourse() || s.is(FilterState.Slot.STANDSTILL)) {
            return;
        }
        // The wheel speed now. A reading that agrees with the wheel distance over the last spans
        // (InputHold.wheelSpeedNowMps) to within its configured noise is used as it is: exact for an
        // exact sensor, and current while the vehicle accelerates. One that strays further comes from a
        // sensor coarser than configured - one that counts teeth jumps by a tooth per reading - and the
        // steadier speed from the distance stands in for it.
        double reading = InputHold.wheelSpeedAt(s, s.get(FilterState.Slot.T_REL));
        double steady = InputHold.wheelSpeedNowMps(s, MEAN_WINDOW_S, MAX_MEAN_WINDOW_S);
        double wheelSigma = settings.wheelSpeedNoiseMps();
        double wheel = Double.isNaN(steady) || Math.abs(reading - steady) <= STRAY_SIGMAS * wheelSigma
                ? reading : steady;
        double minSpeed = settings.gnssVelocityMinSpeedMps();
        if (fix.speedMps() < minSpeed || Math.abs(wheel) < MOVING_SPEED_MPS
                || Math.abs(s.get(FilterState.Slot.WHEEL_SPEED_MPS)) < MOVING_SPEED_MPS) {
            return;
        }
        double[] x = s.x;
        double courseSigma = Math.toRadians(settings.gnssCourseSigmaDeg()) * Math.max(minSpeed, 1e-3)
                / fix.speedMps();
        double speedVar = settings.gnssSpeedSigmaMps() * settings.gnssSpeedSigmaMps()
                + x[SPEED_SCALE] * x[SPEED_SCALE] * wheelSigma * wheelSigma;
        double unbiased = s.get(FilterState.Slot.YAW_RATE_RAD_PER_S) - x[GYRO_BIAS];
        double omega = x[GYRO_SCALE] * unbiased;
        double fwd = x[LEVER_FORWARD];
        double left = x[LEVER_LEFT];
        double a = x[SPEED_SCALE] * wheel - omega * left;
        double b = omega * fwd;
        double n2 = a * a + b * b;
        double n = Math.sqrt(n2);
        // Derivatives of the course offset atan2(b, a) and of the speed |(a, b)| by omega.
        double dCourseDOmega = (b * left + a * fwd) / n2;
        double dSpeedDOmega = (b * fwd - a * left) / n;
        double[] h = u.h;
        Arrays.fill(h, 0.0);
        h[YAW] = 1.0;
        h[SPEED_SCALE] = -b * wheel / n2;
        h[GYRO_BIAS] = -x[GYRO_SCALE] * dCourseDOmega;
        h[GYRO_SCALE] = unbiased * dCourseDOmega;
        h[LEVER_FORWARD] = a * omega / n2;
        h[LEVER_LEFT] = b * omega / n2;
        h[SIZE + SPEED_SCALE] = a * wheel / n;
        h[SIZE + GYRO_BIAS] = -x[GYRO_SCALE] * dSpeedDOmega;
        h[SIZE + GYRO_SCALE] = unbiased * dSpeedDOmega;
        h[SIZE + LEVER_FORWARD] = b * omega / n;
        h[SIZE + LEVER_LEFT] = -a * omega / n;
        u.r[0] = courseSigma * courseSigma;
        u.r[1] = 0.0;
        u.r[2] = 0.0;
        u.r[3] = speedVar;
        double measuredYaw = Angles.headingDegToYawRad(fix.courseDeg());
        u.nu[0] = Angles.wrapPi(measuredYaw - (x[YAW] + Math.atan2(b, a)));
        u.nu[1] = fix.speedMps() - n;
        u.prepare(s.p, 2);
        PositionFix.freezeUnobservable(u, omega, n);
        if (u.nis() > gateThreshold) {
            java.util.Arrays.fill(u.frozen, false);
            s.increment(FilterCounter.VELOCITY_GATED);
            return;
        }
        u.apply(s, 2);
    }
}
