package org.wayhold.scoring;

/** Hears how far a long replay has come, for progress displays. Called from the replaying thread. */
@FunctionalInterface
public interface ProgressListener {

    /** Does nothing. */
    ProgressListener NONE = samples -> { };

    /** How often a replay reports (samples). */
    int REPORT_EVERY = 20_000;

    /** {@code samples} more samples of a log have been replayed since the last call (count). */
    void samplesDone(int samples);
}
