package org.wayhold.simulate;

import org.wayhold.settings.Check;

/**
 * Error model of the simulated wheel-speed sensor. The wheel rolls on the road, so it senses the speed
 * along the slope, not the horizontal speed. Its circumferential speed is the true speed times
 * {@code (1 + scaleError)}, divided by {@code 1 + growth(v)} when {@code tyreGrowth} is on and by
 * {@code 1 - slip} when {@code slip} is on. The classic reading is that plus white noise, rounded to
 * the quantum, and exactly zero while the car stands still (no wheel pulses). With {@code teeth} on, the
 * reading comes from counted teeth instead (no white noise, no rounding: see {@link ToothCounting}).
 *
 * @param rateHz     sample rate (Hz, must divide 100 Hz)
 * @param scaleError scale-factor error (unitless fraction: 0.01 means the sensor reads 1% high), in (-0.5, 0.5)
 * @param noiseMps   1-sigma white noise of one reading (m/s, >= 0)
 * @param quantumMps resolution the reading is rounded to (m/s, >= 0; 0 means no rounding)
 * @param teeth      readings from counted teeth (off by default)
 * @param slip       tyre slip under traction and braking (off by default)
 * @param tyreGrowth rolling radius growing with speed (off by default)
 */
public record WheelSpeedSettings(double rateHz, double scaleError, double noiseMps, double quantumMps,
                                 ToothCounting teeth, WheelSlip slip, TyreGrowth tyreGrowth) {

    public WheelSpeedSettings {
        Route.ticksPerSample("wheelSpeed.rateHz", rateHz);
        if (!(scaleError > -0.5 && scaleError < 0.5)) {
            throw new IllegalArgumentException("wheelSpeed.scaleError: must lie in (-0.5, 0.5) (unitless), was "
                    + scaleError);
        }
        Check.nonNegative("wheelSpeed.noiseMps", noiseMps, "m/s");
        Check.nonNegative("wheelSpeed.quantumMps", quantumMps, "m/s");
        if (teeth == null || slip == null || tyreGrowth == null) {
            throw new IllegalArgumentException("wheelSpeed.teeth, wheelSpeed.slip, wheelSpeed.tyreGrowth: must be "
                    + "given (use ToothCounting.off(), WheelSlip.off(), TyreGrowth.off())");
        }
    }

    /** The classic model: no tooth counting, slip or tyre growth. */
    public WheelSpeedSettings(double rateHz, double scaleError, double noiseMps, double quantumMps) {
        this(rateHz, scaleError, noiseMps, quantumMps, ToothCounting.off(), WheelSlip.off(), TyreGrowth.off());
    }

    /**
     * 50 Hz, +1% scale (a tyre a little smaller than nominal: wear alone is about 2% over a tyre's
     * life, common practice), 0.05 m/s noise, 0.01 m/s resolution.
     */
    public static WheelSpeedSettings defaults() {
        return new WheelSpeedSettings(50.0, 0.01, 0.05, 0.01);
    }

    /**
     * The same rate with no scale error, noise, rounding, tooth counting, slip or tyre growth: the
     * reading is the true speed along the road.
     */
    public WheelSpeedSettings perfect() {
        return new WheelSpeedSettings(rateHz, 0.0, 0.0, 0.0);
    }

    public WheelSpeedSettings withScaleError(double value) {
        return new WheelSpeedSettings(rateHz, value, noiseMps, quantumMps, teeth, slip, tyreGrowth);
    }

    public WheelSpeedSettings withNoiseMps(double value) {
        return new WheelSpeedSettings(rateHz, scaleError, value, quantumMps, teeth, slip, tyreGrowth);
    }

    public WheelSpeedSettings withQuantumMps(double value) {
        return new WheelSpeedSettings(rateHz, scaleError, noiseMps, value, teeth, slip, tyreGrowth);
    }

    public WheelSpeedSettings withRateHz(double value) {
        return new WheelSpeedSettings(value, scaleError, noiseMps, quantumMps, teeth, slip, tyreGrowth);
    }

    public WheelSpeedSettings withTeeth(ToothCounting value) {
        return new WheelSpeedSettings(rateHz, scaleError, noiseMps, quantumMps, value, slip, tyreGrowth);
    }

    public WheelSpeedSettings withSlip(WheelSlip value) {
        return new WheelSpeedSettings(rateHz, scaleError, noiseMps, quantumMps, teeth, value, tyreGrowth);
    }

    public WheelSpeedSettings withTyreGrowth(TyreGrowth value) {
        return new WheelSpeedSettings(rateHz, scaleError, noiseMps, quantumMps, teeth, slip, value);
    }
}
