package org.wayhold.pose;

import java.io.DataInput;
import java.io.DataOutput;
import java.io.IOException;
import java.util.ArrayList;
import java.util.List;
import java.util.Optional;

/**
 * A bounded, time-ordered ring of poses; the oldest are dropped first. Not thread-safe: the session
 * that owns it serialises access.
 */
public final class PoseHistory {

    private final Pose[] ring;
    private int start;
    private int size;

    /** @param capacity most poses kept (count, >= 1) */
    public PoseHistory(int capacity) {
        if (capacity < 1) {
            throw new IllegalArgumentException("capacity: must be at least 1, was " + capacity);
        }
        ring = new Pose[capacity];
    }

    /**
     * Appends a pose, which must not be older than the newest one held; a pose of the same time as the
     * newest replaces it (one pose per instant).
     */
    public void add(Pose pose) {
        if (size > 0 && pose.t() < newest().t()) {
            throw new IllegalArgumentException("t: pose at " + pose.t() + " s is older than the newest held, "
                    + newest().t() + " s");
        }
        if (size > 0 && pose.t() == newest().t()) {
            ring[(start + size - 1) % ring.length] = pose;
            return;
        }
        if (size == ring.length) {
            ring[start] = pose;
            start = (start + 1) % ring.length;
        } else {
            ring[(start + size) % ring.length] = pose;
            size++;
        }
    }

    public int size() {
        return size;
    }

    public boolean isEmpty() {
        return size == 0;
    }

    private Pose get(int i) {
        return ring[(start + i) % ring.length];
    }

    /** The newest pose. */
    public Pose newest() {
        if (size == 0) {
            throw new IllegalStateException("history is empty");
        }
        return get(size - 1);
    }

    /** Index of the first pose with t > tS (size when none). */
    private int upperBound(double tS) {
        int lo = 0;
        int hi = size;
        while (lo < hi) {
            int mid = (lo + hi) >>> 1;
            if (get(mid).t() <= tS) {
                lo = mid + 1;
            } else {
                hi = mid;
            }
        }
        return lo;
    }

    /**
     * The newest pose at or before {@code tS}; empty when {@code tS} is before the oldest pose held.
     *
     * @param tS time (s, vehicle clock)
     */
    public Optional<Pose> at(double tS) {
        int i = upperBound(tS);
        return i == 0 ? Optional.empty() : Optional.of(get(i - 1));
    }

    /** Poses with fromS <= t <= toS, oldest first. */
    public List<Pose> between(double fromS, double toS) {
        List<Pose> out = new ArrayList<>();
        int i = upperBound(Math.nextDown(fromS));
        for (; i < size; i++) {
            Pose p = get(i);
            if (p.t() > toS) {
                break;
            }
            out.add(p);
        }
        return out;
    }

    /** Writes the poses, oldest first, bit for bit. */
    public void writeTo(DataOutput out) throws IOException {
        out.writeInt(size);
        for (int i = 0; i < size; i++) {
            PoseCodec.write(out, get(i));
        }
    }

    /** Replaces the content with poses written by {@link #writeTo}; the capacity keeps the newest. */
    public void readFrom(DataInput in) throws IOException {
        int n = in.readInt();
        if (n < 0) {
            throw new IOException("history: negative pose count " + n);
        }
        java.util.Arrays.fill(ring, null);
        start = 0;
        size = 0;
        for (int i = 0; i < n; i++) {
            add(PoseCodec.read(in));
        }
    }

    /** Drops every pose with t > tS (used when late samples re-filter the recent past). */
    public void truncateAfter(double tS) {
        int keep = upperBound(tS);
        for (int i = keep; i < size; i++) {
            ring[(start + i) % ring.length] = null;
        }
        size = keep;
    }
}
