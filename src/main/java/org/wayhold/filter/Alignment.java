package org.wayhold.filter;

import org.wayhold.filter.FilterState.Slot;

import static org.wayhold.filter.StateIndex.EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_NORTH;
import static org.wayhold.filter.StateIndex.GYRO_BIAS;
import static org.wayhold.filter.StateIndex.NORTH;
import static org.wayhold.filter.StateIndex.SIZE;
import static org.wayhold.filter.StateIndex.SPEED_SCALE;
import static org.wayhold.filter.StateIndex.YAW;

import java.util.Arrays;
import org.wayhold.geo.Angles;
import org.wayhold.sample.GnssFix;
import org.wayhold.settings.FilterSettings;

/**
 * Starts the filter: until a yaw exists it only remembers where the vehicle was (an anchor). The yaw
 * comes from the GNSS course when the vehicle moves fast enough, else from the displacement between
 * fixes once it exceeds {@code filter.heading_init_min_distance_m} while the wheels say the vehicle
 * moves. A reset returns here, keeping a calibration that is still plausible.
 */
final class Alignment {

    /** Largest gyro bias kept across a reset (rad/s): 5 deg/s, far beyond automotive yaw-rate sensors. */
    private static final double PLAUSIBLE_BIAS_RAD_PER_S = Math.toRadians(5.0);
    /** Largest wheel-speed scale error kept across a reset (unitless): 20%, beyond any tyre. */
    private static final double PLAUSIBLE_SCALE_ERROR = 0.2;

    private final FilterSettings settings;
    private final GnssNoise noise;
    private final PositionFix position;

    Alignment(FilterSettings settings, GnssNoise noise, PositionFix position) {
        this.settings = settings;
        this.noise = noise;
        this.position = position;
    }

    /**
     * Takes a fix while the filter is not initialised; initialises it when a yaw can be had.
     *
     * @param s      the state (modified)
     * @param fix    the fix
     * @param eastM  fix east (m, ENU)
     * @param northM fix north (m, ENU)
     * @param var    the fix's horizontal variance per axis (m^2)
     * @return always {@link GnssOutcome.Kind#INITIALIZING}: the fix started or anchored the state
     */
    GnssOutcome.Kind align(FilterState s, GnssFix fix, double eastM, double northM, double var) {
        double yaw = Double.NaN;
        double yawVar = Double.NaN;
        double minSpeed = settings.gnssVelocityMinSpeedMps();
        boolean moving = Math.abs(s.get(Slot.WHEEL_SPEED_MPS)) >= CourseSpeed.MOVING_SPEED_MPS;
        if (fix.hasCourse() && fix.hasSpeed() && fix.speedMps() >= minSpeed && moving) {
            yaw = Angles.headingDegToYawRad(fix.courseDeg());
            if (s.get(Slot.WHEEL_SPEED_MPS) < 0.0) {
                yaw = Angles.wrapPi(yaw + Math.PI);
            }
            double sigma = Math.max(settings.initialYawSigmaRad(),
                    Math.toRadians(settings.gnssCourseSigmaDeg()) * minSpeed / fix.speedMps());
            yawVar = sigma * sigma;
        } else if (!Double.isNaN(s.get(Slot.ANCHOR_EAST_M)) && moving) {
            double de = eastM - s.get(Slot.ANCHOR_EAST_M);
            double dn = northM - s.get(Slot.ANCHOR_NORTH_M);
            double dist = Math.hypot(de, dn);
            double odo = s.get(Slot.ODOMETER_M) - s.get(Slot.ANCHOR_ODOMETER_M);
            // The displacement must agree with the wheels' distance, or one of the two fixes is an
            // outlier and the direction between them means nothing: 3 sigma of two fixes plus 20% of
            // the distance for an uncalibrated scale and curved paths.
            boolean agrees = Math.abs(dist - odo) <= 3.0 * Math.sqrt(2.0 * var) + 0.2 * odo;
            if (dist >= settings.headingInitMinDistanceM() && agrees) {
                yaw = Math.atan2(dn, de);
                if (s.get(Slot.WHEEL_SPEED_MPS) < 0.0) {
                    yaw = Angles.wrapPi(yaw + Math.PI);
                }
                // Two fixes, each with variance var per axis, across dist: the direction's error.
                double sigma = Math.atan2(Math.sqrt(2.0 * var), dist);
                yawVar = Math.max(sigma * sigma, settings.initialYawSigmaRad() * settings.initialYawSigmaRad());
            } else if (!agrees) {
                s.set(Slot.ANCHOR_EAST_M, Double.NaN);
            }
        }
        if (Double.isNaN(yaw)) {
            if (Double.isNaN(s.get(Slot.ANCHOR_EAST_M)) || !moving) {
                s.set(Slot.ANCHOR_EAST_M, eastM);
                s.set(Slot.ANCHOR_NORTH_M, northM);
                s.set(Slot.ANCHOR_ODOMETER_M, s.get(Slot.ODOMETER_M));
            }
            return GnssOutcome.Kind.INITIALIZING;
        }
        start(s, eastM, northM, yaw, yawVar, var);
        return GnssOutcome.Kind.INITIALIZING;
    }

    /** Sets the initial state and covariance from a fix and a yaw. */
    private void start(FilterState s, double eastM, double northM, double yaw, double yawVar, double var) {
        double corrVar = noise.correlatedVarM2(var);
        s.set(Slot.CORRELATED_VAR_M2, corrVar);
        double bias = keptBias(s);
        double scale = keptScale(s);
        double biasVar = keptBiasVar(s);
        double scaleVar = keptScaleVar(s);
        double[] x = s.x;
        double[] p = s.p;
        Arrays.fill(x, 0.0);
        Arrays.fill(p, 0.0);
        // The fix is position + correlated error + white noise; with the error's estimate at zero, the
        // position error is (error + noise) and the error state's error is -(error): their covariance
        // is -sigma_corr^2.
        x[EAST] = eastM - position.antennaEastOffsetM(yaw);
        x[NORTH] = northM - position.antennaNorthOffsetM(yaw);
        x[YAW] = Angles.wrapPi(yaw);
        x[GYRO_BIAS] = bias;
        x[SPEED_SCALE] = scale;
        p[EAST * SIZE + EAST] = var;
        p[NORTH * SIZE + NORTH] = var;
        p[EAST * SIZE + GNSS_ERR_EAST] = -corrVar;
        p[GNSS_ERR_EAST * SIZE + EAST] = -corrVar;
        p[NORTH * SIZE + GNSS_ERR_NORTH] = -corrVar;
        p[GNSS_ERR_NORTH * SIZE + NORTH] = -corrVar;
        p[GNSS_ERR_EAST * SIZE + GNSS_ERR_EAST] = corrVar;
        p[GNSS_ERR_NORTH * SIZE + GNSS_ERR_NORTH] = corrVar;
        p[YAW * SIZE + YAW] = yawVar;
        p[GYRO_BIAS * SIZE + GYRO_BIAS] = biasVar;
        p[SPEED_SCALE * SIZE + SPEED_SCALE] = scaleVar;
        s.set(Slot.INITIALIZED, true);
        Reacquisition.end(s);
    }

    /**
     * Starts position and yaw afresh from the fixes that follow, keeping a plausible calibration. Used
     * when consecutive agreeing fixes sit so far outside the covariance that the estimate cannot be
     * trusted at all (a wrong initial yaw from an outlier, for example): no correction of such a state
     * is meaningful.
     */
    void reset(FilterState s, double eastM, double northM) {
        s.increment(FilterCounter.RESETS);
        s.set(Slot.INITIALIZED, false);
        Reacquisition.end(s);
        s.set(Slot.ANCHOR_EAST_M, eastM);
        s.set(Slot.ANCHOR_NORTH_M, northM);
        s.set(Slot.ANCHOR_ODOMETER_M, s.get(Slot.ODOMETER_M));
    }

    /**
     * Calibration survives a reset when it is plausible: the bias within {@link #PLAUSIBLE_BIAS_RAD_PER_S}
     * and the scale within {@link #PLAUSIBLE_SCALE_ERROR} of 1. Before the first initialisation the
     * state is all zeros and the scale counts as implausible, so the configured priors apply.
     */
    static boolean calibrationPlausible(FilterState s) {
        return Math.abs(s.x[GYRO_BIAS]) <= PLAUSIBLE_BIAS_RAD_PER_S
                && Math.abs(s.x[SPEED_SCALE] - 1.0) <= PLAUSIBLE_SCALE_ERROR;
    }

    private static double keptBias(FilterState s) {
        return calibrationPlausible(s) ? s.x[GYRO_BIAS] : 0.0;
    }

    /** The wheel-speed scale to count distance with while not initialised (unitless). */
    static double keptScale(FilterState s) {
        return calibrationPlausible(s) ? s.x[SPEED_SCALE] : 1.0;
    }

    private double keptBiasVar(FilterState s) {
        double b0 = settings.initialGyroBiasSigmaRadPerS();
        return calibrationPlausible(s) ? Math.max(s.p[GYRO_BIAS * SIZE + GYRO_BIAS], 0.0) : b0 * b0;
    }

    private double keptScaleVar(FilterState s) {
        double s0 = settings.initialSpeedScaleSigma();
        return calibrationPlausible(s) ? Math.max(s.p[SPEED_SCALE * SIZE + SPEED_SCALE], 0.0) : s0 * s0;
    }
}
