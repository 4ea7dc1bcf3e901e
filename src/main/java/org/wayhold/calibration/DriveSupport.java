package org.wayhold.calibration;

import java.util.EnumMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import org.wayhold.sample.FixType;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;

/**
 * What a set of drives can support, measured before any fit: a drive without fixes or odometry, or too
 * short, supports nothing and is refused; a drive without enough turning or speed changes leaves the
 * constants that need them at the configured values, and says why.
 *
 * <p>Thresholds (common practice, sized so that each constant moves the innovations by several sigma
 * of a standalone receiver's error): the gyro scale shows as a heading error proportional to the angle
 * turned, so it needs {@link #MIN_TURNED_DEG} of turning; the lever arm shows in turns only (on a
 * straight road it is indistinguishable from a position offset), so it needs {@link #MIN_TURNING_S}
 * of turning faster than 3 deg/s while moving; the latency moves the antenna along the track by speed
 * times latency, indistinguishable from a forward lever arm at one speed, so it needs
 * {@link #MIN_FAST_S} above 3 m/s with a speed spread of {@link #MIN_SPEED_SPREAD_MPS}; the odometer
 * scale needs {@link #MIN_DISTANCE_M} of driving.
 *
 * @param fixes          fixes with a solution (count)
 * @param wheelReadings  wheel-speed readings (count)
 * @param yawReadings    yaw-rate readings (count)
 * @param movingS        time moving faster than 0.5 m/s (s)
 * @param distanceM      distance driven, from the wheel speed (m)
 * @param turnedDeg      heading change turning faster than 3 deg/s while moving, by the gyro (deg)
 * @param turningS       time turning faster than 3 deg/s while moving faster than 1 m/s (s)
 * @param fastS          time faster than 3 m/s (s)
 * @param speedSpreadMps standard deviation of the speed while faster than 3 m/s (m/s)
 */
public record DriveSupport(int fixes, int wheelReadings, int yawReadings, double movingS, double distanceM,
                           double turnedDeg, double turningS, double fastS, double speedSpreadMps) {

    /** Driving time needed for any fit (s): several correlation times of the GNSS error. */
    public static final double MIN_MOVING_S = 300.0;
    /** Fixes needed for any fit (count). */
    public static final int MIN_FIXES = 300;
    /** Turning needed for the gyro scale (deg): two full circles' worth. */
    public static final double MIN_TURNED_DEG = 720.0;
    /** Turning time needed for the lever arm (s). */
    public static final double MIN_TURNING_S = 60.0;
    /** Time above 3 m/s needed for the latency (s). */
    public static final double MIN_FAST_S = 120.0;
    /** Speed spread needed for the latency (m/s). */
    public static final double MIN_SPEED_SPREAD_MPS = 1.5;
    /** Distance needed for the odometer scale (m). */
    public static final double MIN_DISTANCE_M = 2000.0;

    private static final double MOVING_MPS = 0.5;
    private static final double TURNING_MPS = 1.0;
    private static final double FAST_MPS = 3.0;
    private static final double TURN_RAD_PER_S = 0.05;
    /** Reading intervals longer than this are gaps and count for nothing (s). */
    private static final double MAX_INTERVAL_S = 1.0;

    /** Measures the drives. */
    public static DriveSupport of(List<CalibrationDrive> drives) {
        int fixes = 0;
        int wheels = 0;
        int yaws = 0;
        double moving = 0.0;
        double distance = 0.0;
        double turned = 0.0;
        double turning = 0.0;
        double fast = 0.0;
        double sum = 0.0;
        double sum2 = 0.0;
        for (CalibrationDrive d : drives) {
            double wheelT = Double.NaN;
            double wheel = 0.0;
            double yawT = Double.NaN;
            for (Sample s : d.samples()) {
                if (s instanceof GnssFix f && f.fix() != FixType.NONE) {
                    fixes++;
                } else if (s instanceof WheelSpeed w) {
                    wheels++;
                    double dt = s.t() - wheelT;
                    if (dt > 0.0 && dt <= MAX_INTERVAL_S) {
                        double v = Math.abs(wheel);
                        distance += v * dt;
                        if (v > MOVING_MPS) {
                            moving += dt;
                        }
                        if (v > FAST_MPS) {
                            fast += dt;
                            sum += v * dt;
                            sum2 += v * v * dt;
                        }
                    }
                    wheelT = s.t();
                    wheel = w.speedMps();
                } else if (s instanceof YawRate r) {
                    yaws++;
                    double dt = s.t() - yawT;
                    double rate = Math.abs(r.yawRateRadPerS());
                    if (dt > 0.0 && dt <= MAX_INTERVAL_S && rate > TURN_RAD_PER_S && Math.abs(wheel) > MOVING_MPS) {
                        turned += Math.toDegrees(rate * dt);
                        if (Math.abs(wheel) > TURNING_MPS) {
                            turning += dt;
                        }
                    }
                    yawT = s.t();
                }
            }
        }
        double mean = fast > 0.0 ? sum / fast : 0.0;
        double spread = fast > 0.0 ? Math.sqrt(Math.max(sum2 / fast - mean * mean, 0.0)) : 0.0;
        return new DriveSupport(fixes, wheels, yaws, moving, distance, turned, turning, fast, spread);
    }

    /**
     * Why the drives support no fit at all, or null when they support one.
     */
    public String refusal() {
        if (fixes == 0) {
            return "no GNSS fix with a solution: there are no innovations to fit";
        }
        if (wheelReadings == 0) {
            return "no wheel_speed lines: the filter has no odometry to calibrate";
        }
        if (yawReadings == 0) {
            return "no yaw_rate lines: the filter has no gyro to calibrate";
        }
        if (fixes < MIN_FIXES) {
            return String.format(Locale.ROOT, "too few GNSS fixes: %d with a solution, at least %d needed", fixes,
                    MIN_FIXES);
        }
        if (movingS < MIN_MOVING_S) {
            return String.format(Locale.ROOT, "too short: %.0f s of driving, at least %.0f s needed", movingS,
                    MIN_MOVING_S);
        }
        return null;
    }

    /**
     * The constants these drives cannot support, each with the reason; the rest (and every noise
     * parameter, which the likelihood itself judges) may be fitted.
     */
    public Map<Parameter, String> unsupported() {
        Map<Parameter, String> out = new EnumMap<>(Parameter.class);
        if (turnedDeg < MIN_TURNED_DEG) {
            out.put(Parameter.GYRO_SCALE, String.format(Locale.ROOT,
                    "%.0f deg of turning, at least %.0f deg needed", turnedDeg, MIN_TURNED_DEG));
        }
        if (turningS < MIN_TURNING_S) {
            String why = String.format(Locale.ROOT, "%.0f s of turning faster than 3 deg/s, at least %.0f s needed",
                    turningS, MIN_TURNING_S);
            out.put(Parameter.LEVER_FORWARD_M, why);
            out.put(Parameter.LEVER_LEFT_M, why);
        }
        if (fastS < MIN_FAST_S || speedSpreadMps < MIN_SPEED_SPREAD_MPS) {
            out.put(Parameter.GNSS_LATENCY_S, String.format(Locale.ROOT,
                    "%.0f s faster than 3 m/s with a speed spread of %.1f m/s, at least %.0f s and %.1f m/s needed",
                    fastS, speedSpreadMps, MIN_FAST_S, MIN_SPEED_SPREAD_MPS));
        }
        if (distanceM < MIN_DISTANCE_M) {
            out.put(Parameter.SPEED_SCALE, String.format(Locale.ROOT, "%.0f m driven, at least %.0f m needed",
                    distanceM, MIN_DISTANCE_M));
        }
        return out;
    }
}
