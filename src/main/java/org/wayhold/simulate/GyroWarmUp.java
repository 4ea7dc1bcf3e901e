package org.wayhold.simulate;

import org.wayhold.settings.Check;

/**
 * A gyro bias that settles after power-on: on top of the bias of {@link YawRateSettings} the reading
 * carries {@code offsetDegPerS * exp(-t / timeConstantS)}, t seconds since the start of the drive. The
 * sensor's temperature approaches the cabin's along a first-order (Newtonian) cooling curve, and a
 * MEMS bias that depends on temperature follows it, so the offset decays exponentially.
 *
 * @param enabled       whether the warm-up offset is applied
 * @param offsetDegPerS extra bias at power-on (deg/s, signed)
 * @param timeConstantS time for the offset to fall to 1/e of its start (s, > 0)
 */
public record GyroWarmUp(boolean enabled, double offsetDegPerS, double timeConstantS) {

    /**
     * 0.3 deg/s at power-on: of the order of the turn-on bias and temperature drift of automotive MEMS
     * yaw-rate sensors (from memory).
     */
    public static final double DEFAULT_OFFSET_DEG_PER_S = 0.3;
    /** 300 s: the thermal time constant of a sensor module warming up in a car (from memory). */
    public static final double DEFAULT_TIME_CONSTANT_S = 300.0;

    public GyroWarmUp {
        Check.finite("yawRate.warmUp.offsetDegPerS", offsetDegPerS, "deg/s");
        Check.positive("yawRate.warmUp.timeConstantS", timeConstantS, "s");
    }

    /** Off, with the default magnitudes ready for {@link #on()}. */
    public static GyroWarmUp off() {
        return new GyroWarmUp(false, DEFAULT_OFFSET_DEG_PER_S, DEFAULT_TIME_CONSTANT_S);
    }

    /** The same magnitudes, switched on. */
    public GyroWarmUp on() {
        return new GyroWarmUp(true, offsetDegPerS, timeConstantS);
    }

    /** The same magnitudes, switched on or off. */
    public GyroWarmUp withEnabled(boolean value) {
        return new GyroWarmUp(value, offsetDegPerS, timeConstantS);
    }

    /** This power-on offset (deg/s), switched on. */
    public GyroWarmUp withOffsetDegPerS(double value) {
        return new GyroWarmUp(true, value, timeConstantS);
    }

    /** This settling time constant (s), switched on. */
    public GyroWarmUp withTimeConstantS(double value) {
        return new GyroWarmUp(true, offsetDegPerS, value);
    }

    /** The extra bias at {@code sinceStartS} seconds after power-on (rad/s; 0 when off). */
    double offsetRadPerS(double sinceStartS) {
        return enabled ? Math.toRadians(offsetDegPerS) * StrictMath.exp(-sinceStartS / timeConstantS) : 0.0;
    }
}
