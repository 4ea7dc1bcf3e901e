package org.wayhold.scoring;

import org.wayhold.sample.SampleType;

/**
 * A stretch of a log in which one odometry stream (wheel speed or yaw rate) was silent long enough for
 * the filter to call it interrupted ({@link org.wayhold.filter.OdometryInterruption}), or had not begun
 * or had already ended. Dead reckoning across it measures the missing readings, not the odometry.
 *
 * @param stream {@link SampleType#WHEEL_SPEED} or {@link SampleType#YAW_RATE}
 * @param startT the stream's last reading before the silence, or the log's first sample when the stream
 *               had not begun (s, vehicle clock)
 * @param endT   its first reading after the silence, or the log's last sample when none came
 *               (s, vehicle clock, after the start)
 */
public record OdometryGap(SampleType stream, double startT, double endT) {

    public OdometryGap {
        if (stream != SampleType.WHEEL_SPEED && stream != SampleType.YAW_RATE) {
            throw new IllegalArgumentException("stream: must be wheel_speed or yaw_rate, was " + stream);
        }
        if (!Double.isFinite(startT) || !Double.isFinite(endT) || !(endT > startT)) {
            throw new IllegalArgumentException("odometry gap: start and end must be finite times in s with end > start,"
                    + " were " + startT + " and " + endT);
        }
    }

    /** Length (s). */
    public double lengthS() {
        return endT - startT;
    }

    /** True when this gap and {@code [fromT, toT]} share more than an end point. */
    public boolean overlaps(double fromT, double toT) {
        return fromT < endT && startT < toT;
    }
}
