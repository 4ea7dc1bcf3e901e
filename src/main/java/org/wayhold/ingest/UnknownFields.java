package org.wayhold.ingest;

import java.util.List;

/**
 * Field names of no sample type that an input carried. Such fields are skipped (a newer sender may add
 * fields), but a reader reports them so that a misspelt field ({@code sigma_hz} for {@code sigma_h})
 * does not pass unnoticed.
 *
 * @param lines      lines (or JSON array elements) that carried at least one unknown field (count)
 * @param firstNames the first distinct unknown names, in order of appearance, at most {@value #NAMES_KEPT}
 */
public record UnknownFields(long lines, List<String> firstNames) {

    /** Distinct names kept for the report; the count covers every line. */
    public static final int NAMES_KEPT = 5;

    public static final UnknownFields NONE = new UnknownFields(0, List.of());

    public UnknownFields {
        if (lines < 0) {
            throw new IllegalArgumentException("lines: must be a count >= 0, was " + lines);
        }
        firstNames = List.copyOf(firstNames);
    }

    /** True when no line carried an unknown field. */
    public boolean none() {
        return lines == 0;
    }

    /** {@code 12 lines carry fields that no sample type has, ignored: sigma_hz, speeed}. */
    public String describe() {
        return lines + (lines == 1 ? " line carries" : " lines carry") + " fields that no sample type has, ignored: "
                + String.join(", ", firstNames) + (firstNames.size() == NAMES_KEPT ? ", ..." : "");
    }
}
