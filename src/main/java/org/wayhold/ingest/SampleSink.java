package org.wayhold.ingest;

import org.wayhold.sample.Sample;

/** Receives the outcome of every non-blank input line, in input order. */
public interface SampleSink {

    /** A line that parsed into a valid sample. */
    void accept(Sample s);

    /** A line that was rejected; reading goes on with the next line. */
    void reject(LineError e);
}
