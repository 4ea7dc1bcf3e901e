package org.wayhold.ordering;

import java.util.Comparator;
import org.wayhold.sample.Sample;
import org.wayhold.sample.SampleType;

/**
 * The processing order of samples: by time, and at equal times by the rank of their type
 * ({@link SampleType#rank()}: inputs before fixes, so a fix is always applied to a state that has seen
 * the inputs of its own instant).
 */
public final class SampleOrder {

    /** Time, then type rank. Stable sorts keep arrival order among equals. */
    public static final Comparator<Sample> BY_TIME_THEN_TYPE = SampleOrder::compare;

    private SampleOrder() {
    }

    /**
     * Time ({@link Double#compare}), then type rank: the order of {@link #BY_TIME_THEN_TYPE}, written
     * out because it runs for every sample of every batch.
     */
    public static int compare(Sample a, Sample b) {
        int byTime = Double.compare(a.t(), b.t());
        return byTime != 0 ? byTime : Integer.compare(a.type().rank(), b.type().rank());
    }
}
