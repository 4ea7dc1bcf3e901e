package org.wayhold.filter;

import static org.wayhold.filter.StateIndex.EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_NORTH;
import static org.wayhold.filter.StateIndex.GYRO_BIAS;
import static org.wayhold.filter.StateIndex.GYRO_SCALE;
import static org.wayhold.filter.StateIndex.NORTH;
import static org.wayhold.filter.StateIndex.SIZE;
import static org.wayhold.filter.StateIndex.SPEED_SCALE;
import static org.wayhold.filter.StateIndex.YAW;

import org.wayhold.filter.FilterState.Slot;
import org.wayhold.settings.FilterSettings;

/**
 * The vehicle model's process noise Q over one step, added to P after {@link CovariancePrediction}.
 *
 * <p>Input noise, mapped through the input Jacobian of {@link MotionModel#step}: a white input error of
 * density q held over a step of dt has variance q / dt, so Q += G G' q / dt (G carries the factor dt).
 * The densities come from what the inputs really are, not only from the configured rates:
 * <ul>
 *   <li>wheel speed: the per-reading noise times the observed reading interval;</li>
 *   <li>yaw rate: the per-reading noise times the observed interval; an error proportional to the rate
 *       ({@code filter.gyro_rate_proportional_noise}: misalignment, body roll and pitch, timing), taken as
 *       correlated over {@link #RATE_ERROR_CORRELATION_S}; and half the change between the last two
 *       readings, which bounds how far the rate between them may stray from the line through them;</li>
 *   <li>an interrupted stream: its reading is held, and the true input may have changed since by up to
 *       {@link #MAX_ACCELERATION_MPS2} (or {@link #MAX_YAW_ACCELERATION_RAD_PER_S2}) times the age;
 *       a ramp a t integrates to a T^2 / 2, which a density (a t)^2 t reproduces;</li>
 *   <li>creeping: the speed's spread from {@link Standstill#creepSpeedSigmaMps}, correlated over the
 *       creep so far.</li>
 * </ul>
 * Sideslip moves the reference point off its yaw in turns: a lateral velocity of 1-sigma
 * {@code filter.sideslip_rad_per_mps2} times the lateral acceleration times the speed, correlated over
 * {@link #SIDESLIP_CORRELATION_S}, across the direction of travel. Random walks drive the gyro bias
 * and the two scale factors; the wheel-speed scale's variance is kept above what tyre growth between
 * the speed it was learnt at and the current speed may change it by
 * ({@code filter.rolling_radius_growth_at_30_mps}). The Gauss-Markov driving noise
 * keeps the GNSS error's steady-state variance (Brown and Hwang, 4th ed., sec. 4.2).
 */
final class ProcessNoise {

    /** Correlation time of the rate-proportional yaw-rate error (s): it follows the turn (common practice). */
    static final double RATE_ERROR_CORRELATION_S = 1.0;
    /** Correlation time of sideslip (s): it lasts about as long as the turn's lateral acceleration. */
    static final double SIDESLIP_CORRELATION_S = 1.0;
    /** Largest change of speed per second an interrupted wheel-speed stream may hide (m/s^2): firm braking. */
    static final double MAX_ACCELERATION_MPS2 = 3.0;
    /** Largest change of yaw rate per second an interrupted yaw-rate stream may hide (rad/s^2). */
    static final double MAX_YAW_ACCELERATION_RAD_PER_S2 = 0.5;
    /** The speed {@code filter.rolling_radius_growth_at_30_mps} is given at (m/s). */
    static final double TYRE_GROWTH_REFERENCE_MPS = 30.0;

    private final double wheelVar;
    private final double gyroVar;
    private final double rateProportional2;
    private final double sideslip2;
    private final double biasWalk2;
    private final double scaleWalk2;
    private final double gyroScaleWalk2;
    private final double wheelNominalIntervalS;
    private final double yawRateNominalIntervalS;
    private final double tyreGrowth;

    ProcessNoise(FilterSettings settings) {
        this.wheelVar = settings.wheelSpeedNoiseMps() * settings.wheelSpeedNoiseMps();
        this.gyroVar = settings.gyroNoiseRadPerS() * settings.gyroNoiseRadPerS();
        this.rateProportional2 = settings.gyroRateProportionalNoise() * settings.gyroRateProportionalNoise();
        this.sideslip2 = settings.sideslipRadPerMps2() * settings.sideslipRadPerMps2();
        double rwBias = settings.gyroBiasRandomWalkRadPerSPerSqrtS();
        this.biasWalk2 = rwBias * rwBias;
        double rwScale = settings.speedScaleRandomWalkPerSqrtS();
        this.scaleWalk2 = rwScale * rwScale;
        double rwGyroScale = settings.gyroScaleRandomWalkPerSqrtS();
        this.gyroScaleWalk2 = rwGyroScale * rwGyroScale;
        this.wheelNominalIntervalS = OdometryInterruption.wheelSpeedNominalIntervalS(settings);
        this.yawRateNominalIntervalS = OdometryInterruption.yawRateNominalIntervalS(settings);
        this.tyreGrowth = settings.rollingRadiusGrowthAt30Mps();
    }

    /** Seconds the wheel-speed stream has been silent past its usual interval, 0 when it is not. */
    double wheelGapS(FilterState s, double tRel) {
        return InputHold.wheelGapS(s, tRel, wheelNominalIntervalS);
    }

    /** Seconds the yaw-rate stream has been silent past its usual interval, 0 when it is not. */
    double yawRateGapS(FilterState s, double tRel) {
        return InputHold.yawRateGapS(s, tRel, yawRateNominalIntervalS);
    }

    /**
     * P += Q for one step.
     *
     * @param s               the state: P modified; inputs, modes and ages read
     * @param inputJac        the step's input Jacobian from {@link MotionModel#step} (not modified)
     * @param dtS             step length (s)
     * @param speedMps        the speed the step moved at (m/s, scaled)
     * @param omegaRadPerS    the turn rate the step turned at (rad/s)
     * @param creepSigmaMps   1-sigma of a creeping speed, 0 when not creeping (m/s)
     * @param learntSpeedMps  the speed the wheel-speed scale was learnt at (m/s, unsigned)
     * @param gnssDecay       exp(-dt / tau) of the GNSS error states
     */
    void add(FilterState s, double[] inputJac, double dtS, double speedMps, double omegaRadPerS,
             double creepSigmaMps, double learntSpeedMps, double gnssDecay) {
        double[] p = s.p;
        double tRel = s.get(Slot.T_REL);
        boolean standstill = s.is(Slot.STANDSTILL);
        if (!standstill) {
            double wheelDensity;
            if (creepSigmaMps > 0.0) {
                double creeping = Math.max(dtS, tRel - s.get(Slot.LAST_TURN_AT_REST_T_REL));
                wheelDensity = creepSigmaMps * creepSigmaMps * creeping;
            } else {
                double age = wheelGapS(s, tRel);
                double drift = MAX_ACCELERATION_MPS2 * age;
                wheelDensity = wheelVar * InputHold.wheelIntervalS(s, wheelNominalIntervalS) + drift * drift * age;
            }
            addOuter(p, inputJac, 0, wheelDensity / dtS);
            double rate = s.get(Slot.YAW_RATE_RAD_PER_S);
            double change = 0.5 * (rate - s.get(Slot.PREVIOUS_YAW_RATE_RAD_PER_S));
            double interval = InputHold.yawRateIntervalS(s, yawRateNominalIntervalS);
            double age = yawRateGapS(s, tRel);
            double drift = MAX_YAW_ACCELERATION_RAD_PER_S2 * age;
            double gyroDensity = (gyroVar + change * change) * interval
                    + rateProportional2 * rate * rate * RATE_ERROR_CORRELATION_S + drift * drift * age;
            addOuter(p, inputJac, 3, gyroDensity / dtS);
            // Sideslip: a lateral velocity across the direction of travel.
            double lateral = Math.sqrt(sideslip2) * Math.abs(speedMps * omegaRadPerS) * speedMps;
            double q = lateral * lateral * SIDESLIP_CORRELATION_S * dtS;
            if (q > 0.0) {
                double nE = -Math.sin(s.x[YAW]);
                double nN = Math.cos(s.x[YAW]);
                p[EAST * SIZE + EAST] += q * nE * nE;
                p[EAST * SIZE + NORTH] += q * nE * nN;
                p[NORTH * SIZE + EAST] += q * nE * nN;
                p[NORTH * SIZE + NORTH] += q * nN * nN;
            }
        }
        p[GYRO_BIAS * SIZE + GYRO_BIAS] += biasWalk2 * dtS;
        p[SPEED_SCALE * SIZE + SPEED_SCALE] += scaleWalk2 * dtS;
        // The rolling radius grows with the square of the speed, so a scale learnt at one speed may be
        // off at another by this share of (v^2 - v_learnt^2) / v_ref^2.
        double growth = tyreGrowth * (speedMps * speedMps - learntSpeedMps * learntSpeedMps)
                / (TYRE_GROWTH_REFERENCE_MPS * TYRE_GROWTH_REFERENCE_MPS);
        if (p[SPEED_SCALE * SIZE + SPEED_SCALE] < growth * growth) {
            // Raising one variance keeps P positive semi-definite.
            p[SPEED_SCALE * SIZE + SPEED_SCALE] = growth * growth;
        }
        p[GYRO_SCALE * SIZE + GYRO_SCALE] += gyroScaleWalk2 * dtS;
        double qGm = s.get(Slot.CORRELATED_VAR_M2) * (1.0 - gnssDecay * gnssDecay);
        p[GNSS_ERR_EAST * SIZE + GNSS_ERR_EAST] += qGm;
        p[GNSS_ERR_NORTH * SIZE + GNSS_ERR_NORTH] += qGm;
    }

    /** Adds v v' * scale to the (east, north, yaw) block of P, v = three entries of g from offset. */
    private static void addOuter(double[] p, double[] g, int offset, double scale) {
        for (int i = 0; i < 3; i++) {
            double gi = g[offset + i] * scale;
            if (gi == 0.0) {
                continue;
            }
            for (int j = 0; j < 3; j++) {
                p[i * SIZE + j] += gi * g[offset + j];
            }
        }
    }
}
