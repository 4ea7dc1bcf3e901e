package org.wayhold.nmea;

/**
 * A sentence that was skipped because it could not be used.
 *
 * @param line   1-based line number in the input
 * @param reason why, starting with what was wrong
 */
public record BadSentence(long line, String reason) {

    public BadSentence {
        if (line < 1) {
            throw new IllegalArgumentException("line: must be a 1-based line number, was " + line);
        }
        if (reason == null || reason.isBlank()) {
            throw new IllegalArgumentException("reason: must say why the sentence was skipped");
        }
    }
}
