package org.wayhold.simulate;

import org.wayhold.settings.Check;

/**
 * Error model of the simulated GNSS receiver.
 *
 * <p>In open sky a fix is the true antenna position plus white noise plus a first-order Gauss-Markov
 * error per horizontal axis. The reported {@code sigma_h} is always the nominal total
 * sqrt(whiteNoiseM^2 + markovSigmaM^2): receivers do not know about multipath or outliers, which is
 * exactly what the filter must cope with.
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
 */
public record GnssSettings(double rateHz, double whiteNoiseM, double markovSigmaM, double markovTimeS,
                           double verticalNoiseM, double velocityNoiseMps, double courseMinSpeedMps,
                           double leverArmForwardM, double leverArmLeftM, double leverArmUpM,
                           double outliersPerHour, double outlierMinM, double outlierMaxM,
                           double multipathAfterExitS, double multipathMinM, double multipathMaxM,
                           double canyonFaultProbability, double canyonDropProbability) {

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
     * no multipath and no missing fixes in canyons (tunnels still deny fixes).
     */
    public GnssSettings perfect() {
        return new GnssSettings(rateHz, 0.0, 0.0, markovTimeS, 0.0, 0.0, courseMinSpeedMps,
                leverArmForwardM, leverArmLeftM, leverArmUpM, 0.0, outlierMinM, outlierMaxM,
                0.0, multipathMinM, multipathMaxM, 0.0, 0.0);
    }

    public GnssSettings withWhiteNoiseM(double value) {
        return new GnssSettings(rateHz, value, markovSigmaM, markovTimeS, verticalNoiseM, velocityNoiseMps,
                courseMinSpeedMps, leverArmForwardM, leverArmLeftM, leverArmUpM, outliersPerHour, outlierMinM,
                outlierMaxM, multipathAfterExitS, multipathMinM, multipathMaxM, canyonFaultProbability,
                canyonDropProbability);
    }

    public GnssSettings withMarkov(double sigmaM, double timeS) {
        return new GnssSettings(rateHz, whiteNoiseM, sigmaM, timeS, verticalNoiseM, velocityNoiseMps,
                courseMinSpeedMps, leverArmForwardM, leverArmLeftM, leverArmUpM, outliersPerHour, outlierMinM,
                outlierMaxM, multipathAfterExitS, multipathMinM, multipathMaxM, canyonFaultProbability,
                canyonDropProbability);
    }

    public GnssSettings withLeverArm(double forwardM, double leftM, double upM) {
        return new GnssSettings(rateHz, whiteNoiseM, markovSigmaM, markovTimeS, verticalNoiseM, velocityNoiseMps,
                courseMinSpeedMps, forwardM, leftM, upM, outliersPerHour, outlierMinM,
                outlierMaxM, multipathAfterExitS, multipathMinM, multipathMaxM, canyonFaultProbability,
                canyonDropProbability);
    }

    public GnssSettings withOutliers(double perHour, double minM, double maxM) {
        return new GnssSettings(rateHz, whiteNoiseM, markovSigmaM, markovTimeS, verticalNoiseM, velocityNoiseMps,
                courseMinSpeedMps, leverArmForwardM, leverArmLeftM, leverArmUpM, perHour, minM,
                maxM, multipathAfterExitS, multipathMinM, multipathMaxM, canyonFaultProbability,
                canyonDropProbability);
    }

    public GnssSettings withMultipath(double afterExitS, double minM, double maxM) {
        return new GnssSettings(rateHz, whiteNoiseM, markovSigmaM, markovTimeS, verticalNoiseM, velocityNoiseMps,
                courseMinSpeedMps, leverArmForwardM, leverArmLeftM, leverArmUpM, outliersPerHour, outlierMinM,
                outlierMaxM, afterExitS, minM, maxM, canyonFaultProbability, canyonDropProbability);
    }

    public GnssSettings withCanyon(double faultProbability, double dropProbability) {
        return new GnssSettings(rateHz, whiteNoiseM, markovSigmaM, markovTimeS, verticalNoiseM, velocityNoiseMps,
                courseMinSpeedMps, leverArmForwardM, leverArmLeftM, leverArmUpM, outliersPerHour, outlierMinM,
                outlierMaxM, multipathAfterExitS, multipathMinM, multipathMaxM, faultProbability, dropProbability);
    }
}
