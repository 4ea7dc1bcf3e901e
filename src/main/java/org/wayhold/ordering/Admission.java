package org.wayhold.ordering;

import org.wayhold.sample.RejectionReason;

/**
 * What became of one submitted sample.
 *
 * @param kind   the decision
 * @param reason why it was not applied, null when it was
 * @param detail the reason in words, with the numbers (for example {@code "t: late by 3.000 s, ..."}),
 *               null when it was applied
 */
public record Admission(Kind kind, RejectionReason reason, String detail) {

    public static final Admission APPLIED = new Admission(Kind.APPLIED, null, null);
    public static final Admission DUPLICATE = new Admission(Kind.DUPLICATE, null, null);

    public Admission {
        if ((kind == Kind.REJECTED) != (reason != null && detail != null)) {
            throw new IllegalArgumentException("reason: a rejection, and only a rejection, carries a reason and a"
                    + " detail; was " + kind + " with " + reason + " and " + detail);
        }
    }

    /** The decision on a sample. */
    public enum Kind {
        /** Applied in time order (possibly after re-filtering). */
        APPLIED,
        /** An exact copy of a sample already applied; ignored and counted. */
        DUPLICATE,
        /** Rejected: too late, or too far ahead on the session's timeline. */
        REJECTED
    }

    public static Admission rejected(RejectionReason reason, String detail) {
        return new Admission(Kind.REJECTED, reason, detail);
    }
}
