package org.wayhold.simulate;

import org.wayhold.settings.Check;

/**
 * Error model of the simulated wheel-speed sensor: reading = true speed * (1 + scaleError) + white
 * noise, then rounded to the quantum. A vehicle standing still reads exactly zero (no wheel pulses).
 *
 * @param rateHz     sample rate (Hz, must divide 100 Hz)
 * @param scaleError scale-factor error (unitless fraction: 0.01 means the sensor reads 1% high), in (-0.5, 0.5)
 * @param noiseMps   1-sigma white noise of one reading (m/s, >= 0)
 * @param quantumMps resolution the reading is rounded to (m/s, >= 0; 0 means no rounding)
 */
public record WheelSpeedSettings(double rateHz, double scaleError, double noiseMps, double quantumMps) {

    public WheelSpeedSettings {
        Route.ticksPerSample("wheelSpeed.rateHz", rateHz);
        if (!(scaleError > -0.5 && scaleError < 0.5)) {
            throw new IllegalArgumentException("wheelSpeed.scaleError: must lie in (-0.5, 0.5) (unitless), was "
                    + scaleError);
        }
        Check.nonNegative("wheelSpeed.noiseMps", noiseMps, "m/s");
        Check.nonNegative("wheelSpeed.quantumMps", quantumMps, "m/s");
    }

    /**
     * 50 Hz, +1% scale (a tyre a little smaller than nominal: wear alone is about 2% over a tyre's
     * life, common practice), 0.05 m/s noise, 0.01 m/s resolution.
     */
    public static WheelSpeedSettings defaults() {
        return new WheelSpeedSettings(50.0, 0.01, 0.05, 0.01);
    }

    /** The same rate with no scale error, noise or rounding: the reading is the true speed. */
    public WheelSpeedSettings perfect() {
        return new WheelSpeedSettings(rateHz, 0.0, 0.0, 0.0);
    }

    public WheelSpeedSettings withScaleError(double value) {
        return new WheelSpeedSettings(rateHz, value, noiseMps, quantumMps);
    }

    public WheelSpeedSettings withNoiseMps(double value) {
        return new WheelSpeedSettings(rateHz, scaleError, value, quantumMps);
    }

    public WheelSpeedSettings withQuantumMps(double value) {
        return new WheelSpeedSettings(rateHz, scaleError, noiseMps, value);
    }
}
