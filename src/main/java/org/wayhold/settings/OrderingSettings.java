package org.wayhold.settings;

/**
 * Per-vehicle time ordering. YAML section {@code ordering}.
 *
 * @param maxLagS            samples up to this much older than the newest are re-filtered in order (s)
 * @param maxForwardJumpS    a sample this far ahead of the session's newest sample is rejected (s)
 */
public record OrderingSettings(double maxLagS, double maxForwardJumpS) {

    public OrderingSettings {
        Check.nonNegative("ordering.max_lag_s", maxLagS);
        Check.positive("ordering.max_forward_jump_s", maxForwardJumpS);
    }

    public static OrderingSettings defaults() {
        return new OrderingSettings(2.0, 3600.0);
    }
}
