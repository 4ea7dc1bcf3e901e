package org.wayhold.filter;

/**
 * What a filter counts as it runs: its decisions on fixes and its numerical repairs. The metric name
 * is the wire name of each counter, so the list here is the one place a counter is named.
 */
public enum FilterCounter {
    /** Fixes that initialised or corrected the state. */
    FIXES_USED("fixes_used"),
    /**
     * Fixes rejected: outside the chi-square gate, in doubt against the odometry ({@link FixConsistency}),
     * or whose update was refused. Fixes merely held for agreement are {@link #FIXES_PENDING}.
     */
    FIXES_GATED("fixes_gated"),
    /** Fixes held back while waiting for agreement after a gap or a gated fix. */
    FIXES_PENDING("fixes_pending"),
    /** Held-back fixes dropped because the fixes after them disagreed. */
    FIXES_DROPPED("fixes_dropped"),
    /** Fixes without a solution. */
    FIXES_UNUSABLE("fixes_unusable"),
    /** GNSS speed and course pairs that failed their gate. */
    VELOCITY_GATED("velocity_gated"),
    /** Times a variance had to be made positive again after rounding. */
    COVARIANCE_REPAIRS("covariance_repairs"),
    /** Updates refused because they would have left a value that is not finite. */
    UPDATES_REFUSED("updates_refused"),
    /** Wheel-speed or yaw-rate readings refused as not finite or beyond any vehicle. */
    INPUTS_REFUSED("inputs_refused"),
    /** Times the covariance was widened because fixes disagreed with it for longer than chance allows. */
    COVARIANCE_WIDENINGS("covariance_widenings"),
    /**
     * Times position and yaw were started afresh because fixes that agreed with each other lay far
     * outside the covariance.
     */
    RESETS("resets");

    private final String wireName;

    FilterCounter(String wireName) {
        this.wireName = wireName;
    }

    /** The name in metrics and JSON (snake case). */
    public String wireName() {
        return wireName;
    }
}
