package org.wayhold.calibration;

import org.wayhold.simulate.GnssLatency;
import org.wayhold.simulate.GnssSettings;
import org.wayhold.simulate.GyroScale;
import org.wayhold.simulate.SimulationSettings;

/**
 * A simulated vehicle whose sensors differ from the filter's defaults in every parameter calibration
 * fits, and the values the filter should find for it. A scenario of our own.
 */
final class SimulatedTruth {

    static final double WHEEL_NOISE_MPS = 0.1;
    static final double GYRO_NOISE_DEG_PER_S = 0.2;
    static final double GNSS_WHITE_M = 0.5;
    static final double GNSS_MARKOV_M = 0.7;
    static final double GNSS_MARKOV_TIME_S = 60.0;
    static final double LATENCY_S = 0.12;
    static final double LEVER_FORWARD_M = -1.2;
    static final double LEVER_LEFT_M = 0.4;
    static final double GYRO_SCALE_ERROR = 0.012;
    static final double WHEEL_SCALE_ERROR = 0.01;
    /** Town to main-road speeds: the spread separates the latency from a forward lever arm. */
    static final double MIN_SPEED_MPS = 5.0;
    static final double MAX_SPEED_MPS = 20.0;
    /**
     * The fixes carry no course: the filter's course model leaves the latency out, so a latency shows
     * in the course as a turn-rate-proportional lag, which the course model can only explain as a
     * forward lever arm of -speed x latency.
     */
    static final double NO_COURSE_MPS = 1e9;

    private SimulatedTruth() {
    }

    static SimulationSettings settings(double minutes) {
        SimulationSettings d = SimulationSettings.defaults().withMinutes(minutes);
        d = d.withRoute(d.route().withSpeedRange(MIN_SPEED_MPS, MAX_SPEED_MPS));
        GnssSettings g = d.gnss();
        // Position-only fixes (no course: its minimum speed is out of reach), as the real drives have.
        GnssSettings positionOnly = new GnssSettings(g.rateHz(), GNSS_WHITE_M, GNSS_MARKOV_M, GNSS_MARKOV_TIME_S,
                g.verticalNoiseM(), g.velocityNoiseMps(), NO_COURSE_MPS, LEVER_FORWARD_M, LEVER_LEFT_M, 0.0,
                g.outliersPerHour(), g.outlierMinM(), g.outlierMaxM(), g.multipathAfterExitS(), g.multipathMinM(),
                g.multipathMaxM(), g.canyonFaultProbability(), g.canyonDropProbability(),
                GnssLatency.off().withEnabled(true).withLatencyS(LATENCY_S), g.canyonNlos());
        GnssSettings gnss = positionOnly;
        return d.withGnss(gnss)
                .withWheelSpeed(d.wheelSpeed().withNoiseMps(WHEEL_NOISE_MPS).withScaleError(WHEEL_SCALE_ERROR))
                .withYawRate(d.yawRate().withNoiseDegPerS(GYRO_NOISE_DEG_PER_S)
                        .withScale(GyroScale.off().withEnabled(true).withError(GYRO_SCALE_ERROR)));
    }

    /** The parameter values the filter should find, indexed by {@link Parameter#ordinal()}. */
    static double[] values(SimulationSettings s) {
        double[] v = new double[Parameter.values().length];
        v[Parameter.GNSS_WHITE_M.ordinal()] = s.gnss().whiteNoiseM();
        v[Parameter.GNSS_CORRELATED_M.ordinal()] = s.gnss().markovSigmaM();
        v[Parameter.GNSS_CORRELATION_TIME_S.ordinal()] = s.gnss().markovTimeS();
        v[Parameter.GYRO_BIAS_WALK.ordinal()] = Math.toRadians(s.yawRate().biasRandomWalkDegPerSPerSqrtS());
        v[Parameter.SPEED_SCALE_WALK.ordinal()] = 0.0;
        v[Parameter.GYRO_SCALE_WALK.ordinal()] = 0.0;
        v[Parameter.GNSS_LATENCY_S.ordinal()] = s.gnss().latency().enabled() ? s.gnss().latency().latencyS() : 0.0;
        v[Parameter.LEVER_FORWARD_M.ordinal()] = s.gnss().leverArmForwardM();
        v[Parameter.LEVER_LEFT_M.ordinal()] = s.gnss().leverArmLeftM();
        // The reading is (1 + e) times the truth, and the filter's scale multiplies the reading.
        v[Parameter.SPEED_SCALE.ordinal()] = 1.0 / (1.0 + s.wheelSpeed().scaleError());
        v[Parameter.GYRO_SCALE.ordinal()] = 1.0 / (1.0 + (s.yawRate().scale().enabled() ? s.yawRate().scale().error()
                : 0.0));
        return v;
    }
}
