package org.wayhold.columns;

import java.util.Arrays;

/**
 * A bounded ring of records kept as columns: {@code stride} doubles, one byte and, when asked for, one
 * object reference per record. When full, adding drops the oldest record. The columns grow with the
 * content up to the capacity (doubling), so a new owner does not pay for a full ring. Not thread-safe.
 *
 * <p>Records are addressed by index, 0 the oldest, {@code size() - 1} the newest; an index becomes a
 * slot in the columns by {@link #slot}. The owner writes and reads the columns at {@code slot * stride}
 * itself: after an {@link #add} the arrays may have been replaced, so fetch them again.
 *
 * <p>Column 0 of each record is its key, for example a time: owners that add records in key order can
 * search them with {@link #upperBound}.
 */
public final class ColumnRing<T> {

    private final int stride;
    private final int capacity;
    private final int initialSlots;
    private final boolean withRefs;
    private double[] doubles;
    private byte[] bytes;
    private Object[] refs;
    /** Invariant: while the columns hold fewer slots than the capacity, start is 0 (the ring never wrapped). */
    private int start;
    private int size;

    /**
     * @param stride       doubles per record (>= 1)
     * @param capacity     most records kept (count, >= 1)
     * @param initialSlots records the columns hold before the first growth (count, >= 1)
     * @param withRefs     whether records carry an object reference
     */
    public ColumnRing(int stride, int capacity, int initialSlots, boolean withRefs) {
        if (stride < 1) {
            throw new IllegalArgumentException("stride: must be at least 1, was " + stride);
        }
        if (capacity < 1) {
            throw new IllegalArgumentException("capacity: must be at least 1, was " + capacity);
        }
        if (initialSlots < 1) {
            throw new IllegalArgumentException("initialSlots: must be at least 1, was " + initialSlots);
        }
        this.stride = stride;
        this.capacity = capacity;
        this.initialSlots = initialSlots;
        this.withRefs = withRefs;
        clear(0);
    }

    /** Empties the ring, with columns sized for about {@code expected} records (within the capacity). */
    public void clear(int expected) {
        int slots = Math.min(capacity, Math.max(initialSlots, expected));
        doubles = new double[slots * stride];
        bytes = new byte[slots];
        refs = withRefs ? new Object[slots] : null;
        start = 0;
        size = 0;
    }

    /**
     * Makes room for a new newest record and returns its slot; drops the oldest record when the ring is
     * full. The new slot's columns hold stale values: the caller writes all of them.
     */
    public int add() {
        if (size == capacity) {
            int slot = start;
            start = start + 1 == slots() ? 0 : start + 1;
            return slot;
        }
        if (size == slots()) {
            int grown = (int) Math.min(capacity, 2L * slots());
            doubles = Arrays.copyOf(doubles, grown * stride);
            bytes = Arrays.copyOf(bytes, grown);
            if (withRefs) {
                refs = Arrays.copyOf(refs, grown);
            }
        }
        size++;
        return slot(size - 1);
    }

    /** The slot of record {@code i} (0 the oldest). */
    public int slot(int i) {
        int slot = start + i;
        return slot >= slots() ? slot - slots() : slot;
    }

    /** Keeps the oldest {@code keep} records and drops the rest (their references are cleared). */
    public void truncate(int keep) {
        if (keep < 0 || keep > size) {
            throw new IllegalArgumentException("keep: must be within [0, " + size + "], was " + keep);
        }
        if (withRefs) {
            for (int i = keep; i < size; i++) {
                refs[slot(i)] = null;
            }
        }
        size = keep;
    }

    /** Column 0 (the key) of record {@code i}. */
    public double key(int i) {
        return doubles[slot(i) * stride];
    }

    /**
     * Index of the first record whose key is greater than {@code key} ({@link #size()} when none), by
     * binary search: the keys must not decrease from the oldest record to the newest.
     */
    public int upperBound(double key) {
        int lo = 0;
        int hi = size;
        while (lo < hi) {
            int mid = (lo + hi) >>> 1;
            if (key(mid) <= key) {
                lo = mid + 1;
            } else {
                hi = mid;
            }
        }
        return lo;
    }

    /** The double columns, {@code stride} per slot; replaced when the ring grows. */
    public double[] doubles() {
        return doubles;
    }

    /** The byte column, one per slot; replaced when the ring grows. */
    public byte[] bytes() {
        return bytes;
    }

    /** The reference of a slot. */
    @SuppressWarnings("unchecked")
    public T ref(int slot) {
        return (T) refs[slot];
    }

    /** Sets the reference of a slot. */
    public void setRef(int slot, T ref) {
        refs[slot] = ref;
    }

    public int stride() {
        return stride;
    }

    public int size() {
        return size;
    }

    public boolean isEmpty() {
        return size == 0;
    }

    public int capacity() {
        return capacity;
    }

    private int slots() {
        return bytes.length;
    }
}
