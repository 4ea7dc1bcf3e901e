package org.wayhold.simulate;

import org.wayhold.settings.Check;

/**
 * Hard launches: every start from rest on the route (the first start, after the standstill, after
 * queues and long stops) begins with {@code durationS} at {@code accelMps2} before easing to the
 * ordinary 2 m/s^2. Paired with {@link WheelSlip}, the driven wheels over-read during that second.
 *
 * @param enabled   whether starts are hard
 * @param accelMps2 acceleration of the launch (m/s^2, in (0, 10])
 * @param durationS length of the launch (s, > 0; shortened when the target speed comes sooner)
 */
public record HardLaunches(boolean enabled, double accelMps2, double durationS) {

    /**
     * 4.5 m/s^2 for 1 s: a brisk start; 0-100 km/h in 6 s averages 27.8 / 6 = 4.6 m/s^2 (hand
     * computation), and the wheel slip of a launch lasts about a second (common practice).
     */
    public static HardLaunches off() {
        return new HardLaunches(false, 4.5, 1.0);
    }

    public HardLaunches {
        if (!(accelMps2 > 0.0 && accelMps2 <= 10.0)) {
            throw new IllegalArgumentException("route.launches.accelMps2: must lie in (0, 10] m/s^2, was " + accelMps2);
        }
        Check.positive("route.launches.durationS", durationS, "s");
    }

    /** The same magnitudes, switched on. */
    public HardLaunches on() {
        return new HardLaunches(true, accelMps2, durationS);
    }

    /** The same magnitudes, switched on or off. */
    public HardLaunches withEnabled(boolean value) {
        return new HardLaunches(value, accelMps2, durationS);
    }

    /** This launch acceleration (m/s^2), switched on. */
    public HardLaunches withAccelMps2(double value) {
        return new HardLaunches(true, value, durationS);
    }

    /** This launch length (s), switched on. */
    public HardLaunches withDurationS(double value) {
        return new HardLaunches(true, accelMps2, value);
    }
}
