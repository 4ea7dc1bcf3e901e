package org.wayhold.sample;

/**
 * Why an input line or a sample was not applied, as a small fixed vocabulary. The {@link #code()} is
 * stable: it is the {@code reason} label of the rejection metric and the {@code code} of a rejection in
 * the ingest reply; the detail text that goes with a rejection says more and may change.
 */
public enum RejectionReason {
    /** Not a well-formed line: not JSON, not one JSON object, or longer than the line limit. */
    MALFORMED("malformed", "not a well-formed sample line"),
    /** A JSON object that is not a valid sample: a field missing, of the wrong type, or out of its range. */
    INVALID("invalid", "not a valid sample"),
    /** A valid sample with a value beyond the configured physical bounds ({@code ingest} settings). */
    IMPLAUSIBLE("implausible", "a value beyond physical bounds"),
    /** Older than the session's reorder window ({@code ordering.max_lag_s}). */
    LATE("late", "too late for the reorder window"),
    /** Further ahead of the session's newest sample than {@code ordering.max_forward_jump_s}. */
    AHEAD("ahead", "too far ahead of the session"),
    /** In a vehicle's first batch, too far from the median time of the others. */
    OFF_TIMELINE("off_timeline", "far from the times of the vehicle's first samples");

    private final String code;
    private final String phrase;

    RejectionReason(String code, String phrase) {
        this.code = code;
        this.phrase = phrase;
    }

    /** The stable code, for example {@code "late"}: metric label and reply field. */
    public String code() {
        return code;
    }

    /** A short human phrase for displays, for example {@code "too late for the reorder window"}. */
    public String phrase() {
        return phrase;
    }
}
