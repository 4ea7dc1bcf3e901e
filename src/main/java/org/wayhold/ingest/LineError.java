package org.wayhold.ingest;

import org.wayhold.sample.RejectionReason;

/**
 * One rejected input line.
 *
 * @param line   1-based line number in an NDJSON body, or 1-based index of the element in a JSON array
 * @param reason the kind of rejection (the metric label and the reply's {@code code})
 * @param detail why it was rejected, in words; starts with the field name when one field is to blame,
 *               for example {@code "lat: must be within [-90, 90] degrees, was 91.0"}
 */
public record LineError(long line, RejectionReason reason, String detail) {

    public LineError {
        if (line < 1) {
            throw new IllegalArgumentException("line: must be a 1-based line number, was " + line);
        }
        if (reason == null) {
            throw new IllegalArgumentException("reason: must say what kind of rejection line " + line + " is");
        }
        if (detail == null || detail.isBlank()) {
            throw new IllegalArgumentException("detail: must say why line " + line + " was rejected");
        }
    }
}
