package org.wayhold.ingest;

import java.util.List;
import org.wayhold.sample.Sample;

/**
 * Everything read from one input, for callers that want it all in memory.
 *
 * @param samples  the valid samples, in input order
 * @param rejected the rejected lines, in input order
 */
public record ReadResult(List<Sample> samples, List<LineError> rejected) {

    public ReadResult {
        samples = List.copyOf(samples);
        rejected = List.copyOf(rejected);
    }
}
