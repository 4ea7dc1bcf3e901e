package org.wayhold.simulate;

import org.wayhold.settings.Check;

/**
 * Error model of the simulated yaw-rate gyro: reading = (1 + scale error) * rate about the sensor's z
 * axis + bias(t) + white noise, where bias(t) starts at exactly {@code biasDegPerS} (a fixed value, not
 * drawn from the seed), then follows a random walk, plus the settling offset of {@code warmUp} when on.
 *
 * <p>The sensor is fixed to the body. On a level road its z axis is vertical and it senses the yaw
 * rate itself; on a grade the body is pitched by the grade angle, and the angular velocity (the yaw
 * rate about the vertical plus the pitch rate about the body's lateral axis) projects on the body z
 * axis as yaw rate times cos(grade): the pitch rate is perpendicular to body z and the vertical makes
 * the grade angle with it (rotation kinematics, derived by hand; roll is not modelled, roads are not
 * banked).
 *
 * @param rateHz                        sample rate (Hz, must divide 100 Hz)
 * @param biasDegPerS                   constant bias at the start (deg/s, signed)
 * @param biasRandomWalkDegPerSPerSqrtS random walk of the bias: its standard deviation grows as this
 *                                      times sqrt(elapsed seconds) (deg/s per sqrt(s), >= 0)
 * @param noiseDegPerS                  1-sigma white noise of one reading (deg/s, >= 0); the noise
 *                                      density is this divided by sqrt(rateHz)
 * @param scale                         scale-factor error (off by default)
 * @param warmUp                        bias settling after power-on (off by default)
 */
public record YawRateSettings(double rateHz, double biasDegPerS, double biasRandomWalkDegPerSPerSqrtS,
                              double noiseDegPerS, GyroScale scale, GyroWarmUp warmUp) {

    public YawRateSettings {
        Route.ticksPerSample("yawRate.rateHz", rateHz);
        Check.finite("yawRate.biasDegPerS", biasDegPerS, "deg/s");
        Check.nonNegative("yawRate.biasRandomWalkDegPerSPerSqrtS", biasRandomWalkDegPerSPerSqrtS,
                "deg/s per sqrt(s)");
        Check.nonNegative("yawRate.noiseDegPerS", noiseDegPerS, "deg/s");
        if (scale == null || warmUp == null) {
            throw new IllegalArgumentException("yawRate.scale, yawRate.warmUp: must be given (use GyroScale.off(), "
                    + "GyroWarmUp.off())");
        }
    }

    /** The classic model: no scale-factor error and no warm-up. */
    public YawRateSettings(double rateHz, double biasDegPerS, double biasRandomWalkDegPerSPerSqrtS,
                           double noiseDegPerS) {
        this(rateHz, biasDegPerS, biasRandomWalkDegPerSPerSqrtS, noiseDegPerS, GyroScale.off(), GyroWarmUp.off());
    }

    /** 100 Hz, +0.2 deg/s bias, 0.002 deg/s per sqrt(s) bias walk, 0.1 deg/s noise per reading. */
    public static YawRateSettings defaults() {
        return new YawRateSettings(100.0, 0.2, 0.002, 0.1);
    }

    /** The same rate with no bias, walk, noise, scale error or warm-up: the reading is the true body rate. */
    public YawRateSettings perfect() {
        return new YawRateSettings(rateHz, 0.0, 0.0, 0.0, GyroScale.off(), GyroWarmUp.off());
    }

    public YawRateSettings withBiasDegPerS(double value) {
        return new YawRateSettings(rateHz, value, biasRandomWalkDegPerSPerSqrtS, noiseDegPerS, scale, warmUp);
    }

    public YawRateSettings withBiasRandomWalkDegPerSPerSqrtS(double value) {
        return new YawRateSettings(rateHz, biasDegPerS, value, noiseDegPerS, scale, warmUp);
    }

    public YawRateSettings withNoiseDegPerS(double value) {
        return new YawRateSettings(rateHz, biasDegPerS, biasRandomWalkDegPerSPerSqrtS, value, scale, warmUp);
    }

    public YawRateSettings withScale(GyroScale value) {
        return new YawRateSettings(rateHz, biasDegPerS, biasRandomWalkDegPerSPerSqrtS, noiseDegPerS, value, warmUp);
    }

    public YawRateSettings withWarmUp(GyroWarmUp value) {
        return new YawRateSettings(rateHz, biasDegPerS, biasRandomWalkDegPerSPerSqrtS, noiseDegPerS, scale, value);
    }
}
