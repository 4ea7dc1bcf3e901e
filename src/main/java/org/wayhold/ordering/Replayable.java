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
}
