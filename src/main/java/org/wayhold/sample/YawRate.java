package org.wayhold.sample;

/**
 * A yaw-rate (gyro) reading.
 *
 * @param t              sample time (seconds on the vehicle's clock)
 * @param yawRateRadPerS rate of turn (rad/s, positive counter-clockwise seen from above, z up)
 */
public record YawRate(double t, double yawRateRadPerS) implements Sample {

    public YawRate {
        Sample.requireFiniteTime(t);
        if (!Double.isFinite(yawRateRadPerS)) {
            throw new IllegalArgumentException("rate: must be a finite number of rad/s, was " + yawRateRadPerS);
        }
    }

    @Override
    public SampleType type() {
        return SampleType.YAW_RATE;
    }
}
