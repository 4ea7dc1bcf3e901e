package org.wayhold.simulate;

import org.wayhold.settings.Check;

/**
 * Error model of the simulated GNSS receiver.
 *
 * <p>In open sky a fix is the true antenna position plus white noise plus a first-order Gauss-Markov
 * error per horizontal axis. The reported {@code sigma_h} is always the nominal total
 * sqrt(whiteNoiseM^2 + markovSigmaM^2) (inside canyons with {@code canyonNlos} on, its own optimistic
 * figure): receivers do not know about multipath or outliers, which is exactly what the filter must
 * cope with. The antenna sits at the lever arm from the vehicle reference point, carried through the
 * truth's yaw and, on a grade, its pitch.
 *
 * @param rateHz                  fix rate (Hz, must divide 100 Hz)
 * @param whiteNoiseM             1-sigma white error per horizontal axis (m, >= 0)
 * @param markovSigmaM            stationary 1-sigma of the Gauss-Markov error per horizontal axis (m, >= 0)
 * @param markovTimeS             correlation time of the Gauss-Markov error (s, > 0)
 * @param verticalNoiseM          1-sigma white error of the altitude (m, >= 0)
 * @param velocityNoiseMps        1-sigma white error per horizontal axis of the velocity behind
 *                                {@code speed} and {@code course} (m/s, >= 0)
 * @param courseMinSpeedMps       {@code course} is left out below this measured ground speed (m/s, >= 0)
 * @param leverArmForwardM        antenna ahead of the vehicle reference point (m)
 * @param leverArmLeftM           antenna left of the vehicle reference point (m)
 * @param leverArmUpM             antenna above the vehicle reference point (m)
 * @param outliersPerHour         expected single outliers per hour of open-sky fixes (1/h, >= 0)
 * @param outlierMinM             smallest outlier offset (m)
 * @param outlierMaxM             largest outlier offset (m)
 * @param multipathAfterExitS     how long after each tunnel exit fixes carry multipath offsets (s, >= 0)
 * @param multipathMinM           smallest multipath offset (m)
 * @param multipathMaxM           largest multipath offset (m)
 * @param canyonFaultProbability  chance that a fix inside an urban canyon carries a multipath offset
 * @param canyonDropProbability   chance that a fix inside an urban canyon is missing
 * @param latency                 stamping fixes after their time of validity (off by default)
 * @param canyonNlos              slowly varying non-line-of-sight bias in canyons instead of the scattered
 *                                offsets (off by default)
 */
public record GnssSettings(double rateHz, double whiteNoiseM, double markovSigmaM, double markovTimeS,
                           double verticalNoiseM, double velocityNoiseMps, double courseMinSpeedMps,
                           double leverArmForwardM, double leverArmLeftM, double leverArmUpM,
                           double outliersPerHour, double outlierMinM, double outlierMaxM,
                           double multipathAfterExitS, double multipathMinM, double multipathMaxM,
                           double canyonFaultProbability, double canyonDropProbability,
                           GnssLatency latency, CanyonNlos canyonNlos) {

    /**
     * Antenna of the lever-arm what-if: 2 m behind the reference point, as when the antenna sits on the
     * roof's rear and the reference point is the front axle, and nobody told the filter (common
     * practice for a rig whose mounting was never measured).
     */
    public static final double UNCONFIGURED_LEVER_ARM_FORWARD_M = -2.0;
    /** Left offset of the lever-arm what-if (m): none unless asked for. */
    public static final double UNCONFIGURED_LEVER_ARM_LEFT_M = 0.0;
    /** Height of the lever-arm what-if (m): none unless asked for, the road plane as before. */
    public static final double UNCONFIGURED_LEVER_ARM_UP_M = 0.0;

    public GnssSettings {
        Route.ticksPerSample("gnss.rateHz", rateHz);
        Check.nonNegative("gnss.whiteNoiseM", whiteNoiseM, "m");
        Check.nonNegative("gnss.markovSigmaM", markovSigmaM, "m");
        Check.positive("gnss.markovTimeS", markovTimeS, "s");
        Check.nonNegative("gnss.verticalNoiseM", verticalNoiseM, "m");
        Check.nonNegative("gnss.velocityNoiseMps", velocityNoiseMps, "m/s");
        Check.nonNegative("gnss.courseMinSpeedMps", courseMinSpeedMps, "m/s");
        Check.finite("gnss.leverArmForwardM", leverArmForwardM, "m");
        Check.finite("gnss.leverArmLeftM", leverArmLeftM, "m");
        Check.finite("gnss.leverArmUpM", leverArmUpM, "m");
        Check.nonNegative("gnss.outliersPerHour", outliersPerHour, "1/h");
        Check.nonNegative("gnss.outlierMinM", outlierMinM, "m");
        Check.nonNegative("gnss.outlierMaxM", outlierMaxM, "m");
        Check.range("gnss.outlierMaxM", outlierMinM, outlierMaxM, "m");
        Check.nonNegative("gnss.multipathAfterExitS", multipathAfterExitS, "s");
        Check.nonNegative("gnss.multipathMinM", multipathMinM, "m");
        Check.nonNegative("gnss.multipathMaxM", multipathMaxM, "m");
        Check.range("gnss.multipathMaxM", multipathMinM, multipathMaxM, "m");
        Check.probability("gnss.canyonFaultProbability", canyonFaultProbability);
        Check.probability("gnss.canyonDropProbability", canyonDropProbability);
        if (latency == null || canyonNlos == null) {
            throw new IllegalArgumentException("gnss.latency, gnss.canyonNlos: must be given (use GnssLatency.off(), "
                    + "CanyonNlos.off())");
        }
    }

    /** The classic model: fixes stamped at their time of validity, scattered canyon offsets. */
    public GnssSettings(double rateHz, double whiteNoiseM, double markovSigmaM, double markovTimeS,
                        double verticalNoiseM, double velocityNoiseMps, double courseMinSpeedMps,
                        double leverArmForwardM, double leverArmLeftM, double leverArmUpM,
                        double outliersPerHour, double outlierMinM, double outlierMaxM,
                        double multipathAfterExitS, double multipathMinM, double multipathMaxM,
                        double canyonFaultProbability, double canyonDropProbability) {
        this(rateHz, whiteNoiseM, markovSigmaM, markovTimeS, verticalNoiseM, velocityNoiseMps, courseMinSpeedMps,
                leverArmForwardM, leverArmLeftM, leverArmUpM, outliersPerHour, outlierMinM, outlierMaxM,
                multipathAfterExitS, multipathMinM, multipathMaxM, canyonFaultProbability, canyonDropProbability,
                GnssLatency.off(), CanyonNlos.off());
    }

    /**
     * 5 Hz; 0.6 m white plus 0.8 m Gauss-Markov error with a 40 s correlation time (1.0 m total per
     * axis, a standalone receiver in open sky, common practice); 1.5 m vertical; 0.1 m/s velocity
     * noise; course from 1 m/s; antenna at the reference point; about one 20-40 m outlier every two
     * minutes; 2 s of 5-15 m multipath after each tunnel exit; in canyons 30% of fixes offset and 20%
     * missing.
     */
    public static GnssSettings defaults() {
        return new GnssSettings(5.0, 0.6, 0.8, 40.0, 1.5, 0.1, 1.0, 0.0, 0.0, 0.0,
                30.0, 20.0, 40.0, 2.0, 5.0, 15.0, 0.3, 0.2);
    }

    /** The nominal 1-sigma horizontal error per axis that every fix reports as {@code sigma_h} (m). */
    public double reportedSigmaHM() {
        return Math.sqrt(whiteNoiseM * whiteNoiseM + markovSigmaM * markovSigmaM);
    }

    /**
     * The same rate and antenna with no error of any kind: no noise, no correlated error, no outliers,
     * no multipath, no missing or biased fixes in canyons, no latency (tunnels still deny fixes).
     */
    public GnssSettings perfect() {
        return new GnssSettings(rateHz, 0.0, 0.0, markovTimeS, 0.0, 0.0, courseMinSpeedMps,
                leverArmForwardM, leverArmLeftM, leverArmUpM, 0.0, outlierMinM, outlierMaxM,
                0.0, multipathMinM, multipathMaxM, 0.0, 0.0, GnssLatency.off(), CanyonNlos.off());
    }

    public GnssSettings withWhiteNoiseM(double value) {
        return new GnssSettings(rateHz, value, markovSigmaM, markovTimeS, verticalNoiseM, velocityNoiseMps,
                courseMinSpeedMps, leverArmForwardM, leverArmLeftM, leverArmUpM, outliersPerHour, outlierMinM,
                outlierMaxM, multipathAfterExitS, multipathMinM, multipathMaxM, canyonFaultProbability,
                canyonDropProbability, latency, canyonNlos);
    }

    public GnssSettings withMarkov(double sigmaM, double timeS) {
        return new GnssSettings(rateHz, whiteNoiseM, sigmaM, timeS, verticalNoiseM, velocityNoiseMps,
                courseMinSpeedMps, leverArmForwardM, leverArmLeftM, leverArmUpM, outliersPerHour, outlierMinM,
                outlierMaxM, multipathAfterExitS, multipathMinM, multipathMaxM, canyonFaultProbability,
                canyonDropProbability, latency, canyonNlos);
    }

    public GnssSettings withLeverArm(double forwardM, double leftM, double upM) {
        return new GnssSettings(rateHz, whiteNoiseM, markovSigmaM, markovTimeS, verticalNoiseM, velocityNoiseMps,
                courseMinSpeedMps, forwardM, leftM, upM, outliersPerHour, outlierMinM,
                outlierMaxM, multipathAfterExitS, multipathMinM, multipathMaxM, canyonFaultProbability,
                canyonDropProbability, latency, canyonNlos);
    }

    public GnssSettings withOutliers(double perHour, double minM, double maxM) {
        return new GnssSettings(rateHz, whiteNoiseM, markovSigmaM, markovTimeS, verticalNoiseM, velocityNoiseMps,
                courseMinSpeedMps, leverArmForwardM, leverArmLeftM, leverArmUpM, perHour, minM,
                maxM, multipathAfterExitS, multipathMinM, multipathMaxM, canyonFaultProbability,
                canyonDropProbability, latency, canyonNlos);
    }

    public GnssSettings withMultipath(double afterExitS, double minM, double maxM) {
        return new GnssSettings(rateHz, whiteNoiseM, markovSigmaM, markovTimeS, verticalNoiseM, velocityNoiseMps,
                courseMinSpeedMps, leverArmForwardM, leverArmLeftM, leverArmUpM, outliersPerHour, outlierMinM,
                outlierMaxM, afterExitS, minM, maxM, canyonFaultProbability, canyonDropProbability, latency, canyonNlos);
    }

    public GnssSettings withCanyon(double faultProbability, double dropProbability) {
        return new GnssSettings(rateHz, whiteNoiseM, markovSigmaM, markovTimeS, verticalNoiseM, velocityNoiseMps,
                courseMinSpeedMps, leverArmForwardM, leverArmLeftM, leverArmUpM, outliersPerHour, outlierMinM,
                outlierMaxM, multipathAfterExitS, multipathMinM, multipathMaxM, faultProbability, dropProbability, latency, canyonNlos);
    }

    public GnssSettings withRateHz(double value) {
        return new GnssSettings(value, whiteNoiseM, markovSigmaM, markovTimeS, verticalNoiseM, velocityNoiseMps,
                courseMinSpeedMps, leverArmForwardM, leverArmLeftM, leverArmUpM, outliersPerHour, outlierMinM,
                outlierMaxM, multipathAfterExitS, multipathMinM, multipathMaxM, canyonFaultProbability,
                canyonDropProbability, latency, canyonNlos);
    }

    public GnssSettings withLatency(GnssLatency value) {
        return new GnssSettings(rateHz, whiteNoiseM, markovSigmaM, markovTimeS, verticalNoiseM, velocityNoiseMps,
                courseMinSpeedMps, leverArmForwardM, leverArmLeftM, leverArmUpM, outliersPerHour, outlierMinM,
                outlierMaxM, multipathAfterExitS, multipathMinM, multipathMaxM, canyonFaultProbability,
                canyonDropProbability, value, canyonNlos);
    }

    public GnssSettings withCanyonNlos(CanyonNlos value) {
        return new GnssSettings(rateHz, whiteNoiseM, markovSigmaM, markovTimeS, verticalNoiseM, velocityNoiseMps,
                courseMinSpeedMps, leverArmForwardM, leverArmLeftM, leverArmUpM, outliersPerHour, outlierMinM,
                outlierMaxM, multipathAfterExitS, multipathMinM, multipathMaxM, canyonFaultProbability,
                canyonDropProbability, latency, value);
    }

    /** The antenna of the lever-arm what-if: {@link #UNCONFIGURED_LEVER_ARM_FORWARD_M} and its siblings. */
    public GnssSettings withUnconfiguredLeverArm() {
        return withLeverArm(UNCONFIGURED_LEVER_ARM_FORWARD_M, UNCONFIGURED_LEVER_ARM_LEFT_M, UNCONFIGURED_LEVER_ARM_UP_M);
    }
}
