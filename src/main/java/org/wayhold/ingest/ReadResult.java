package org.wayhold.ingest;

import java.util.List;
import org.wayhold.sample.Sample;

/**
 * Everything read from one input, for callers that want it all in memory.
 *
 * @param samples  the valid samples, in input order
 * @param rejected the rejected lines, in input order
 * @param unknown  the fields of no sample type that lines carried (skipped)
 */
public record ReadResult(List<Sample> samples, List<LineError> rejected, UnknownFields unknown) {

    public ReadResult {
        samples = List.copyOf(samples);
        rejected = List.copyOf(rejected);
        java.util.Objects.requireNonNull(unknown, "unknown");
    }

    /** A result whose lines carried no unknown field. */
    public ReadResult(List<Sample> samples, List<LineError> rejected) {
        this(samples, rejected, UnknownFields.NONE);
    }
}
