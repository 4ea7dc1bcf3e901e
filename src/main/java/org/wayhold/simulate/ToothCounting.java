package org.wayhold.simulate;

import org.wayhold.settings.Check;

/**
 * Wheel speed from counted teeth: a toothed ring on the wheel passes a sensor, and each reading is the
 * number of teeth counted in the last sample interval times the nominal arc per tooth times the sample
 * rate. Readings are therefore whole multiples of the step {@code circumferenceM / teeth * rateHz}
 * (2.0833 m/s for 48 teeth, 2 m and 50 Hz), and the fraction of a tooth not yet counted carries over to
 * the next interval, so the counted distance never drifts from the true one by more than a tooth.
 *
 * <p>A passive (variable-reluctance) sensor's signal grows with the tooth frequency, so below
 * {@code minSpeedMps} no edge is detected: the teeth that pass are lost and the reading is exactly 0,
 * although the car moves. This replaces the white noise and resolution of {@link WheelSpeedSettings}.
 *
 * @param enabled        whether readings come from counted teeth
 * @param teeth          teeth on the ring (>= 1)
 * @param circumferenceM nominal rolling circumference the count is converted with (m, > 0)
 * @param minSpeedMps    below this true speed no tooth is detected (m/s, >= 0)
 */
public record ToothCounting(boolean enabled, int teeth, double circumferenceM, double minSpeedMps) {

    /** 48 teeth: a common count for ABS tone rings, which range from about 40 to 100 (common practice). */
    public static final int DEFAULT_TEETH = 48;
    /**
     * 2.0 m: a 205/55 R16 tyre is 406.4 + 2 * 0.55 * 205 = 631.9 mm across, 1.985 m round (hand
     * computation from the ISO tyre size designation).
     */
    public static final double DEFAULT_CIRCUMFERENCE_M = 2.0;
    /** 0.3 m/s (about 1 km/h): the lowest speed a passive wheel sensor detects (from memory). */
    public static final double DEFAULT_MIN_SPEED_MPS = 0.3;

    public ToothCounting {
        Check.atLeast("wheelSpeed.teeth.teeth", teeth, 1);
        Check.positive("wheelSpeed.teeth.circumferenceM", circumferenceM, "m");
        Check.nonNegative("wheelSpeed.teeth.minSpeedMps", minSpeedMps, "m/s");
    }

    /** Off, with the default magnitudes ready for {@link #on()}. */
    public static ToothCounting off() {
        return new ToothCounting(false, DEFAULT_TEETH, DEFAULT_CIRCUMFERENCE_M, DEFAULT_MIN_SPEED_MPS);
    }

    /** The same magnitudes, switched on. */
    public ToothCounting on() {
        return new ToothCounting(true, teeth, circumferenceM, minSpeedMps);
    }

    /** The same magnitudes, switched on or off. */
    public ToothCounting withEnabled(boolean value) {
        return new ToothCounting(value, teeth, circumferenceM, minSpeedMps);
    }

    /** This many teeth, switched on. */
    public ToothCounting withTeeth(int value) {
        return new ToothCounting(true, value, circumferenceM, minSpeedMps);
    }

    /** This circumference (m), switched on. */
    public ToothCounting withCircumferenceM(double value) {
        return new ToothCounting(true, teeth, value, minSpeedMps);
    }

    /** This detection threshold (m/s), switched on. */
    public ToothCounting withMinSpeedMps(double value) {
        return new ToothCounting(true, teeth, circumferenceM, value);
    }

    /** Nominal distance per tooth (m). */
    public double toothArcM() {
        return circumferenceM / teeth;
    }

    /** The speed one counted tooth per sample interval stands for (m/s): arc per tooth times the rate. */
    public double stepMps(double rateHz) {
        return circumferenceM / teeth * rateHz;
    }
}
