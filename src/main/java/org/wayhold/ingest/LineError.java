package org.wayhold.ingest;

/**
 * One rejected input line.
 *
 * @param line   1-based line number in an NDJSON body, or 1-based index of the element in a JSON array
 * @param reason why it was rejected; starts with the field name when one field is to blame, for
 *               example {@code "lat: must be within [-90, 90] degrees, was 91.0"}
 */
public record LineError(long line, String reason) {

    public LineError {
        if (line < 1) {
            throw new IllegalArgumentException("line: must be a 1-based line number, was " + line);
        }
        if (reason == null || reason.isBlank()) {
            throw new IllegalArgumentException("reason: must say why line " + line + " was rejected");
        }
    }
}
