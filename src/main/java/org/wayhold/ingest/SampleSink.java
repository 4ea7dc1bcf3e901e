package org.wayhold.ingest;

import org.wayhold.sample.Sample;

/** Receives the outcome of every non-blank input line, in input order. */
public interface SampleSink {

    /**
     * A line that parsed into a valid sample.
     *
     * @param line 1-based line number in an NDJSON input (blank lines count), or 1-based index of the
     *             element in a JSON array
     */
    void accept(long line, Sample s);

    /** A line that was rejected; reading goes on with the next line. */
    void reject(LineError e);

    /**
     * Once, after the last line, when some lines carried fields that no sample type has (skipped, and
     * otherwise silent). Sinks that have nowhere to report them may leave this out.
     */
    default void unknownFields(UnknownFields u) {
    }
}
