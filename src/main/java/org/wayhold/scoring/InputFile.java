package org.wayhold.scoring;

/**
 * One file a log was read from, for the report's record of its inputs.
 *
 * @param path          the file as given on the command line
 * @param kind          {@code ndjson} (a sample log) or {@code nmea} (GNSS sentences matched to a log)
 * @param accepted      lines (NDJSON) or fixes (NMEA) read into samples (count)
 * @param rejectedLines lines or sentences refused, each with a reason in the log's notes (count)
 */
public record InputFile(String path, String kind, long accepted, long rejectedLines) {

    public InputFile {
        if (path == null || kind == null) {
            throw new IllegalArgumentException("path and kind: must be given");
        }
        if (accepted < 0 || rejectedLines < 0) {
            throw new IllegalArgumentException("counts: must not be negative, were " + accepted + " and "
                    + rejectedLines);
        }
    }
}
