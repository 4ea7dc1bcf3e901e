package org.wayhold.filter;

/**
 * What the filter did with one GNSS fix. Never null: a fix that was not used says why.
 *
 * @param kind      the decision
 * @param nis       normalised innovation squared of the position (unitless), NaN when not computed
 * @param threshold chi-square gate it was compared with (unitless), NaN when not gated
 */
public record GnssOutcome(Kind kind, double nis, double threshold) {

    /** The decision on a fix. */
    public enum Kind {
        /** Used to initialise the position or the yaw. */
        INITIALIZING,
        /** Passed the gate and corrected the state. */
        ACCEPTED,
        /** Corrected the state after several consecutive fixes agreed with each other. */
        REACQUIRED,
        /** Held back after a gap until enough consecutive fixes agree with each other. */
        PENDING,
        /** Failed the chi-square gate; the state was not corrected. */
        GATED,
        /** Of no use: no solution ({@code fix = none}). */
        UNUSABLE
    }

    public GnssOutcome {
        java.util.Objects.requireNonNull(kind, "kind");
    }

    /** True when the fix corrected the state or started it. */
    public boolean used() {
        return kind == Kind.ACCEPTED || kind == Kind.REACQUIRED || kind == Kind.INITIALIZING;
    }
}
