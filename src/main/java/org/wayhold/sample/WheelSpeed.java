package org.wayhold.sample;

/**
 * A wheel-speed (odometry) reading.
 *
 * @param t        sample time (seconds on the vehicle's clock)
 * @param speedMps vehicle speed from the wheels (m/s, signed: negative while reversing)
 */
public record WheelSpeed(double t, double speedMps) implements Sample {

    public WheelSpeed {
        Sample.requireFiniteTime(t);
        if (!Double.isFinite(speedMps)) {
            throw new IllegalArgumentException("speed: must be a finite number of m/s, was " + speedMps);
        }
    }

    @Override
    public SampleType type() {
        return SampleType.WHEEL_SPEED;
    }
}
