package org.wayhold.simulate;

/**
 * Scale-factor error of the yaw-rate gyro: the reading is {@code (1 + error)} times the angular rate
 * about the sensor's own z axis (before bias and noise). A 1.5% error turns a 90 degree corner into
 * 91.35 degrees of integrated reading; the heading error grows with every turn and never averages out
 * on a drive that turns more one way than the other.
 *
 * @param enabled whether the error is applied
 * @param error   scale-factor error (unitless fraction: 0.015 means the gyro reads 1.5% high), in (-0.5, 0.5)
 */
public record GyroScale(boolean enabled, double error) {

    /**
     * 1.5%: production yaw-rate sensors for stability control are specified to a sensitivity
     * tolerance of a few percent over temperature and life (common practice; the exact datasheet
     * figures are from memory).
     */
    public static final double DEFAULT_ERROR = 0.015;

    public GyroScale {
        if (!(error > -0.5 && error < 0.5)) {
            throw new IllegalArgumentException("yawRate.scale.error: must lie in (-0.5, 0.5) (unitless), was " + error);
        }
    }

    /** Off, with the default magnitude ready for {@link #on()}. */
    public static GyroScale off() {
        return new GyroScale(false, DEFAULT_ERROR);
    }

    /** The same magnitude, switched on. */
    public GyroScale on() {
        return new GyroScale(true, error);
    }

    /** The same magnitudes, switched on or off. */
    public GyroScale withEnabled(boolean value) {
        return new GyroScale(value, error);
    }

    /** This scale-factor error (fraction), switched on. */
    public GyroScale withError(double value) {
        return new GyroScale(true, value);
    }

    /** The factor the true rate is multiplied by (1 when off). */
    double factor() {
        return enabled ? 1.0 + error : 1.0;
    }
}
