package org.wayhold.ordering;

/**
 * What became of one submitted sample.
 *
 * @param kind   the decision
 * @param reason why it was not applied, null when it was
 */
public record Admission(Kind kind, String reason) {

    public static final Admission APPLIED = new Admission(Kind.APPLIED, null);
    public static final Admission DUPLICATE = new Admission(Kind.DUPLICATE, null);

    /** The decision on a sample. */
    public enum Kind {
        /** Applied in time order (possibly after re-filtering). */
        APPLIED,
        /** An exact copy of a sample already applied; ignored and counted. */
        DUPLICATE,
        /** Rejected: too late, or too far ahead on the session's timeline. */
        REJECTED
    }

    public static Admission rejected(String reason) {
        return new Admission(Kind.REJECTED, reason);
    }
}
