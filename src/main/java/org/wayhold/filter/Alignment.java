package org.wayhold.filter;

import static org.wayhold.filter.StateIndex.EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_NORTH;
import static org.wayhold.filter.StateIndex.GNSS_LATENCY;
import static org.wayhold.filter.StateIndex.GYRO_BIAS;
import static org.wayhold.filter.StateIndex.GYRO_SCALE;
import static org.wayhold.filter.StateIndex.LEVER_FORWARD;
import static org.wayhold.filter.StateIndex.LEVER_LEFT;
import static org.wayhold.filter.StateIndex.NORTH;
import static org.wayhold.filter.StateIndex.SIZE;
import static org.wayhold.filter.StateIndex.SPEED_SCALE;
import static org.wayhold.filter.StateIndex.YAW;

import java.util.Arrays;
import org.wayhold.filter.FilterState.Slot;
import org.wayhold.geo.Angles;
import org.wayhold.sample.GnssFix;
import org.wayhold.settings.FilterSettings;
import org.wayhold.settings.VehicleProfile;

/**
 * Starts the filter: until a yaw exists it only remembers where the vehicle was (an anchor). The yaw
 * comes from the GNSS course when the vehicle moves fast enough, else from the displacement between
 * fixes once it exceeds {@code filter.heading_init_min_distance_m} while the wheels say the vehicle
 * moves. A reset returns here, keeping a calibration that is still plausible.
 *
 * <p>The first state takes the sensor constants from the vehicle profile (lever arm, latency, scale
 * factors) with their uncertainties, and the position from the fix: reference point = fix - lever arm
 * rotated by the yaw + the distance driven during the latency - the correlated GNSS error. The
 * covariance is that linear map applied to the uncertainties of its inputs, so position, yaw, lever
 * arm, latency and GNSS error start correlated as they are.
 */
final class Alignment {

    /** Largest gyro bias kept across a reset (rad/s): 5 deg/s, far beyond automotive yaw-rate sensors. */
    private static final double PLAUSIBLE_BIAS_RAD_PER_S = Math.toRadians(5.0);
    /** Largest wheel-speed or gyro scale error kept across a reset (unitless): 20%, beyond any sensor. */
    private static final double PLAUSIBLE_SCALE_ERROR = 0.2;

    /** States carried across a reset when the calibration is plausible. */
    private static final int[] CALIBRATION = {GYRO_BIAS, SPEED_SCALE, GYRO_SCALE, LEVER_FORWARD, LEVER_LEFT,
        GNSS_LATENCY};

    private final FilterSettings settings;
    private final VehicleProfile profile;
    private final GnssNoise noise;
    private final double[] prior = new double[SIZE];
    private final double[] priorVar = new double[SIZE];

    Alignment(FilterSettings settings, VehicleProfile profile, GnssNoise noise) {
        this.settings = settings;
        this.profile = profile;
        this.noise = noise;
        prior[GYRO_BIAS] = 0.0;
        priorVar[GYRO_BIAS] = sq(settings.initialGyroBiasSigmaRadPerS());
        prior[SPEED_SCALE] = profile.speedScale();
        priorVar[SPEED_SCALE] = sq(settings.initialSpeedScaleSigma());
        prior[GYRO_SCALE] = profile.gyroScale();
        priorVar[GYRO_SCALE] = sq(settings.initialGyroScaleSigma());
        prior[LEVER_FORWARD] = profile.leverArmForwardM();
        priorVar[LEVER_FORWARD] = sq(profile.leverArmSigmaM());
        prior[LEVER_LEFT] = profile.leverArmLeftM();
        priorVar[LEVER_LEFT] = sq(profile.leverArmSigmaM());
        prior[GNSS_LATENCY] = profile.gnssLatencyS();
        priorVar[GNSS_LATENCY] = sq(profile.gnssLatencySigmaS());
    }

    /** The configured value of a calibration state, before any fix moved it. */
    double prior(int state) {
        return prior[state];
    }

    /** The configured variance of a calibration state. */
    double priorVar(int state) {
        return priorVar[state];
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
        double wheel = s.get(Slot.WHEEL_SPEED_MPS);
        boolean moving = Math.abs(wheel) >= CourseSpeed.MOVING_SPEED_MPS;
        if (fix.hasCourse() && fix.hasSpeed() && fix.speedMps() >= minSpeed && moving) {
            yaw = Angles.headingDegToYawRad(fix.courseDeg());
            if (wheel < 0.0) {
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
                if (wheel < 0.0) {
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
        double[] x = s.x;
        double[] p = s.p;
        double[] keptValue = new double[CALIBRATION.length];
        double[] keptVar = new double[CALIBRATION.length];
        boolean keep = x[SPEED_SCALE] != 0.0 && calibrationPlausible(s);
        for (int i = 0; i < CALIBRATION.length; i++) {
            int k = CALIBRATION[i];
            keptValue[i] = keep ? x[k] : prior[k];
            keptVar[i] = keep ? Math.max(p[k * SIZE + k], 0.0) : priorVar[k];
        }
        Arrays.fill(x, 0.0);
        Arrays.fill(p, 0.0);
        for (int i = 0; i < CALIBRATION.length; i++) {
            x[CALIBRATION[i]] = keptValue[i];
            p[CALIBRATION[i] * SIZE + CALIBRATION[i]] = keptVar[i];
        }
        x[YAW] = Angles.wrapPi(yaw);
        p[YAW * SIZE + YAW] = yawVar;
        // pos = fix - R(yaw) lever + v L (cos, sin)(yaw) - gnss error: its mean, and its sensitivity J to
        // the inputs with uncertainty (the fix's white part, the GNSS error, yaw, lever arm, latency).
        double c = Math.cos(yaw);
        double sn = Math.sin(yaw);
        double fwd = x[LEVER_FORWARD];
        double left = x[LEVER_LEFT];
        double v = x[SPEED_SCALE] * s.get(Slot.WHEEL_SPEED_MPS);
        double ahead = v * x[GNSS_LATENCY];
        x[EAST] = eastM - (fwd * c - left * sn) + ahead * c;
        x[NORTH] = northM - (fwd * sn + left * c) + ahead * sn;
        // The fix is position + correlated error + white noise; with the error's estimate at zero, the
        // position error is (error + noise) and the error state's error is -(error): their covariance
        // is -sigma_corr^2.
        p[EAST * SIZE + EAST] = var;
        p[NORTH * SIZE + NORTH] = var;
        p[EAST * SIZE + GNSS_ERR_EAST] = -corrVar;
        p[GNSS_ERR_EAST * SIZE + EAST] = -corrVar;
        p[NORTH * SIZE + GNSS_ERR_NORTH] = -corrVar;
        p[GNSS_ERR_NORTH * SIZE + NORTH] = -corrVar;
        p[GNSS_ERR_EAST * SIZE + GNSS_ERR_EAST] = corrVar;
        p[GNSS_ERR_NORTH * SIZE + GNSS_ERR_NORTH] = corrVar;
        // d(pos)/d(yaw), d(pos)/d(lever forward, left), d(pos)/d(latency)
        double[][] sens = {
            {fwd * sn + left * c - ahead * sn, -fwd * c + left * sn + ahead * c},
            {-c, -sn},
            {sn, -c},
            {v * c, v * sn},
        };
        int[] from = {YAW, LEVER_FORWARD, LEVER_LEFT, GNSS_LATENCY};
        for (int a = 0; a < from.length; a++) {
            double va = p[from[a] * SIZE + from[a]];
            // Cov(pos, input) = J va; Var(pos) += J J' va (the inputs are independent of each other).
            for (int i = 0; i < 2; i++) {
                int pi = i == 0 ? EAST : NORTH;
                p[pi * SIZE + from[a]] = sens[a][i] * va;
                p[from[a] * SIZE + pi] = sens[a][i] * va;
                for (int j = 0; j < 2; j++) {
                    int pj = j == 0 ? EAST : NORTH;
                    p[pi * SIZE + pj] += sens[a][i] * sens[a][j] * va;
                }
            }
        }
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
     * and both scales within {@link #PLAUSIBLE_SCALE_ERROR} of 1.
     */
    static boolean calibrationPlausible(FilterState s) {
        return Math.abs(s.x[GYRO_BIAS]) <= PLAUSIBLE_BIAS_RAD_PER_S
                && Math.abs(s.x[SPEED_SCALE] - 1.0) <= PLAUSIBLE_SCALE_ERROR
                && Math.abs(s.x[GYRO_SCALE] - 1.0) <= PLAUSIBLE_SCALE_ERROR;
    }

    /** The wheel-speed scale to count distance with while not initialised (unitless). */
    double keptScale(FilterState s) {
        return s.x[SPEED_SCALE] != 0.0 && calibrationPlausible(s) ? s.x[SPEED_SCALE] : prior[SPEED_SCALE];
    }

    private static double sq(double v) {
        return v * v;
    }
}
