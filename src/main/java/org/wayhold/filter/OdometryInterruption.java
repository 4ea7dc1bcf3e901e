package org.wayhold.filter;

import org.wayhold.settings.FilterSettings;

/**
 * When a wheel-speed or yaw-rate stream counts as interrupted: the rule behind the pose's
 * {@code odometry_interrupted} ({@link Reason#ODOMETRY_INTERRUPTED}), kept here once for the filter
 * ({@link InputHold}, {@link ProcessNoise}) and for offline scoring, which must recognise in a log the
 * same stretches the filter would flag.
 *
 * <p>A stream's usual interval is the spacing of its last two readings; before there are two (or when
 * they share a time) it is the interval of the configured rate ({@code filter.wheel_speed_rate_hz},
 * {@code filter.gyro_rate_hz}). The stream is interrupted while its newest reading is older than
 * {@link #GAP_FACTOR} usual intervals and older than {@link #GAP_MIN_S}. Example: wheel speed at 50 Hz
 * (0.02 s) is interrupted once silent for more than 0.3 s (3 x 0.02 s = 0.06 s is below the floor);
 * a 10 Hz stream after 0.3 s as well; a 2 Hz stream after 1.5 s.
 *
 * <p>Times are seconds on one clock (the vehicle's, or the filter's relative clock); only differences
 * enter.
 */
public final class OdometryInterruption {

    /** A stream is interrupted when its newest reading is older than this many usual intervals. */
    public static final double GAP_FACTOR = 3.0;
    /** ... and older than this (s): jitter of a few tens of milliseconds is no gap. */
    public static final double GAP_MIN_S = 0.3;

    private OdometryInterruption() {
    }

    /**
     * The usual interval of a stream (s).
     *
     * @param newestT   time of its newest reading (s)
     * @param previousT time of the reading before it (s); equal to {@code newestT} when there is only one
     * @param nominalS  the interval of the configured rate (s), used while the two give none
     */
    public static double usualIntervalS(double newestT, double previousT, double nominalS) {
        double dt = newestT - previousT;
        return dt > 0.0 ? dt : nominalS;
    }

    /** Silence longer than this is an interruption (s), for a stream of the given usual interval (s). */
    public static double thresholdS(double usualIntervalS) {
        return Math.max(GAP_FACTOR * usualIntervalS, GAP_MIN_S);
    }

    /**
     * True when a stream whose newest reading is {@code ageS} old is interrupted.
     *
     * @param ageS           time since the stream's newest reading (s)
     * @param usualIntervalS its usual interval (s), from {@link #usualIntervalS}
     */
    public static boolean interrupted(double ageS, double usualIntervalS) {
        return ageS > thresholdS(usualIntervalS);
    }

    /** The interval of the configured wheel-speed rate (s): the usual interval before two readings. */
    public static double wheelSpeedNominalIntervalS(FilterSettings settings) {
        return 1.0 / settings.wheelSpeedRateHz();
    }

    /** The interval of the configured yaw-rate rate (s): the usual interval before two readings. */
    public static double yawRateNominalIntervalS(FilterSettings settings) {
        return 1.0 / settings.gyroRateHz();
    }
}
