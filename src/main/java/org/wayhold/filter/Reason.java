package org.wayhold.filter;

/**
 * Why a pose is not plainly {@code aided}, or why it deserves caution: the fixed vocabulary of the
 * pose's {@code reasons}. The wire name is the code clients see; this enum is the one place it is kept.
 */
public enum Reason {
    /** No position and heading yet: the pose follows the fixes, with their accuracy. */
    HEADING_UNKNOWN("heading_unknown"),
    /** No usable fix for longer than {@code outage.gap_s}: dead reckoning. */
    NO_FIX("no_fix"),
    /** Fixes arrive but the newest was gated or held back. */
    FIXES_REJECTED("fixes_rejected"),
    /** Fixes disagree with the distance and turns the odometry measured (multipath, urban canyon). */
    FIXES_INCONSISTENT("fixes_inconsistent"),
    /** The newest fix's reported accuracy was not believed: poor geometry, few satellites. */
    FIX_QUALITY_POOR("fix_quality_poor"),
    /** The covariance was widened because fixes kept disagreeing with it, or after a jump. */
    COVARIANCE_WIDENED("covariance_widened"),
    /** No wheel speed or no yaw rate has arrived: the pose can only follow the fixes. */
    ODOMETRY_MISSING("odometry_missing"),
    /** A wheel-speed or yaw-rate stream stopped for longer than its usual interval. */
    ODOMETRY_INTERRUPTED("odometry_interrupted"),
    /** The wheels read zero while the gyro says the vehicle turns: it creeps below the sensor's threshold. */
    CREEPING("creeping"),
    /** Gyro bias or scale, or wheel-speed scale, are not yet known well enough for long dead reckoning. */
    CALIBRATING("calibrating"),
    /** The antenna seems to sit elsewhere than the configured lever arm says. */
    ANTENNA_OFFSET_SUSPECTED("antenna_offset_suspected"),
    /** The fixes seem stamped later or earlier than their time of validity by more than configured. */
    LATENCY_SUSPECTED("latency_suspected");

    private final String wireName;

    Reason(String wireName) {
        this.wireName = wireName;
    }

    /** The code in JSON and metrics (snake case). */
    public String wireName() {
        return wireName;
    }

    /** This reason's bit in a set of reasons held as an int. */
    public int bit() {
        return 1 << ordinal();
    }

    /** True when a set of reasons held as an int contains this one. */
    public boolean in(int reasons) {
        return (reasons & bit()) != 0;
    }
}
