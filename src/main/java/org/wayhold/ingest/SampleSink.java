package org.wayhold.ingest;

import org.wayhold.sample.Sample;

/** Receives the outcome of every non-blank input line, in input order. */
public interface SampleSink {

    /** A line that parsed into a valid sample. */
    void accept(Sample s);

    /** A line that was rejected; reading goes on with the next line. */
    void reject(LineError e);

    /**
     * Once, after the last line, when some lines carried fields that no sample type has (skipped, and
     * otherwise silent). Sinks that have nowhere to report them may leave this out.
     */
    default void unknownFields(UnknownFields u) {
    }
}
