package org.wayhold.simulate;

import org.wayhold.settings.Check;

/**
 * Error model of the simulated yaw-rate gyro: reading = true rate + bias(t) + white noise, where
 * bias(t) starts at exactly {@code biasDegPerS} (a fixed value, not drawn from the seed) and then
 * follows a random walk.
 *
 * @param rateHz                        sample rate (Hz, must divide 100 Hz)
 * @param biasDegPerS                   constant bias at the start (deg/s, signed)
 * @param biasRandomWalkDegPerSPerSqrtS random walk of the bias: its standard deviation grows as this
 *                                      times sqrt(elapsed seconds) (deg/s per sqrt(s), >= 0)
 * @param noiseDegPerS                  1-sigma white noise of one reading (deg/s, >= 0); the noise
 *                                      density is this divided by sqrt(rateHz)
 */
public record YawRateSettings(double rateHz, double biasDegPerS, double biasRandomWalkDegPerSPerSqrtS,
                              double noiseDegPerS) {

    public YawRateSettings {
        Route.ticksPerSample("yawRate.rateHz", rateHz);
        Check.finite("yawRate.biasDegPerS", biasDegPerS, "deg/s");
        Check.nonNegative("yawRate.biasRandomWalkDegPerSPerSqrtS", biasRandomWalkDegPerSPerSqrtS,
                "deg/s per sqrt(s)");
        Check.nonNegative("yawRate.noiseDegPerS", noiseDegPerS, "deg/s");
    }

    /** 100 Hz, +0.2 deg/s bias, 0.002 deg/s per sqrt(s) bias walk, 0.1 deg/s noise per reading. */
    public static YawRateSettings defaults() {
        return new YawRateSettings(100.0, 0.2, 0.002, 0.1);
    }

    /** The same rate with no bias, walk or noise: the reading is the true yaw rate. */
    public YawRateSettings perfect() {
        return new YawRateSettings(rateHz, 0.0, 0.0, 0.0);
    }

    public YawRateSettings withBiasDegPerS(double value) {
        return new YawRateSettings(rateHz, value, biasRandomWalkDegPerSPerSqrtS, noiseDegPerS);
    }

    public YawRateSettings withBiasRandomWalkDegPerSPerSqrtS(double value) {
        return new YawRateSettings(rateHz, biasDegPerS, value, noiseDegPerS);
    }

    public YawRateSettings withNoiseDegPerS(double value) {
        return new YawRateSettings(rateHz, biasDegPerS, biasRandomWalkDegPerSPerSqrtS, value);
    }
}
