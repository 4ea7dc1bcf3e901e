package org.wayhold.ordering;

import org.wayhold.sample.Sample;

/**
 * Something that consumes samples in order and can return to an earlier state.
 *
 * @param <C> an immutable checkpoint of the consumer's whole state
 */
public interface Replayable<C> {

    /** Applies one sample; samples come in {@link SampleOrder} order. */
    void apply(Sample sample);

    /** Captures the current state. */
    C checkpoint();

    /** Returns to a captured state. */
    void restore(C checkpoint);

    /**
     * Whether an exact copy of this sample was applied before, as far as the consumer's own records
     * tell (for samples older than the reorder window, which keeps no samples of its own). False when
     * it cannot tell.
     */
    default boolean alreadyApplied(Sample sample) {
        return false;
    }
}
