package org.wayhold.filter;

import java.util.Arrays;

/**
 * Running counts of what the filter decided, for metrics and reports: an immutable copy of the
 * filter's counters, one per {@link FilterCounter}.
 */
public final class FilterCounts {

    private final long[] counts;

    FilterCounts(long[] counts) {
        if (counts.length != FilterCounter.values().length) {
            throw new IllegalArgumentException("counts: " + counts.length + " values for "
                    + FilterCounter.values().length + " counters");
        }
        this.counts = counts.clone();
    }

    /** The count of one kind (count, >= 0). */
    public long get(FilterCounter counter) {
        return counts[counter.ordinal()];
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof FilterCounts other && Arrays.equals(counts, other.counts);
    }

    @Override
    public int hashCode() {
        return Arrays.hashCode(counts);
    }

    @Override
    public String toString() {
        StringBuilder b = new StringBuilder("FilterCounts[");
        for (FilterCounter c : FilterCounter.values()) {
            b.append(c.ordinal() == 0 ? "" : ", ").append(c.wireName()).append('=').append(get(c));
        }
        return b.append(']').toString();
    }
}
