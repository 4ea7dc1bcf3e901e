package org.wayhold.pose;

import java.io.DataInput;
import java.io.DataOutput;
import java.io.IOException;
import java.util.ArrayList;
import java.util.List;
import java.util.Optional;
import org.wayhold.columns.ColumnRing;
import org.wayhold.geo.Geodetic;

/**
 * A bounded, time-ordered ring of poses; the oldest are dropped first. Not thread-safe: the session
 * that owns it serialises access.
 *
 * <p>Poses are held as columns of primitives in a {@link ColumnRing}, not as objects: a {@link Pose}
 * with its ellipse and outage records takes about 220 bytes of heap on a 64-bit JVM with compressed
 * references, its 24 doubles ({@link PoseColumns}), flags and origin reference here about 197, and the
 * session's poses dominate its memory. Reads build the records again from the same bits, so a pose
 * reads back equal to the one added (NaN payloads included). The columns grow with the content up to
 * the capacity, so a new session does not pay for a full history.
 */
public final class PoseHistory {

    /** Poses the columns hold before the first growth. */
    private static final int INITIAL_SLOTS = 64;
    /** Set in a pose's byte beside its navigation state code when its outage is active. */
    private static final int ACTIVE_BIT = 0x80;

    /** Per pose: the doubles, the state code with {@link #ACTIVE_BIT}, and the frame origin (shared objects). */
    private final ColumnRing<Geodetic> ring;

    /** @param capacity most poses kept (count, >= 1) */
    public PoseHistory(int capacity) {
        this.ring = new ColumnRing<>(PoseColumns.COUNT, capacity, INITIAL_SLOTS, true);
    }

    private void put(int slot, Pose p) {
        PoseColumns.write(p, ring.doubles(), slot * PoseColumns.COUNT);
        ring.bytes()[slot] = (byte) (p.state().ordinal() | (p.outage().active() ? ACTIVE_BIT : 0));
        ring.setRef(slot, p.origin());
    }

    /** The pose at ring index i (0 = oldest), built from the columns. */
    private Pose get(int i) {
        int slot = ring.slot(i);
        int f = ring.bytes()[slot] & 0xFF;
        return PoseColumns.read(ring.doubles(), slot * PoseColumns.COUNT, f & ~ACTIVE_BIT, (f & ACTIVE_BIT) != 0,
                ring.ref(slot));
    }

    /**
     * Appends a pose, which must not be older than the newest one held; a pose of the same time as the
     * newest replaces it (one pose per instant).
     */
    public void add(Pose pose) {
        int n = ring.size();
        if (n > 0 && pose.t() < ring.key(n - 1)) {
            throw new IllegalArgumentException("t: pose at " + pose.t() + " s is older than the newest held, "
                    + ring.key(n - 1) + " s");
        }
        if (n > 0 && pose.t() == ring.key(n - 1)) {
            put(ring.slot(n - 1), pose);
            return;
        }
        put(ring.add(), pose);
    }

    public int size() {
        return ring.size();
    }

    public boolean isEmpty() {
        return ring.isEmpty();
    }

    /** Time of the oldest pose held (s, vehicle clock); the history must not be empty. */
    public double oldestT() {
        if (ring.isEmpty()) {
            throw new IllegalStateException("history is empty");
        }
        return ring.key(0);
    }

    /** Time of the newest pose held (s, vehicle clock); the history must not be empty. */
    public double newestT() {
        if (ring.isEmpty()) {
            throw new IllegalStateException("history is empty");
        }
        return ring.key(ring.size() - 1);
    }

    /** True when the history is at its capacity: each new pose lets the oldest go. */
    public boolean full() {
        return ring.size() >= ring.capacity();
    }

    /** The newest pose. */
    public Pose newest() {
        if (ring.isEmpty()) {
            throw new IllegalStateException("history is empty");
        }
        return get(ring.size() - 1);
    }

    /**
     * The newest pose at or before {@code tS}; empty when {@code tS} is before the oldest pose held.
     *
     * @param tS time (s, vehicle clock)
     */
    public Optional<Pose> at(double tS) {
        int i = ring.upperBound(tS);
        return i == 0 ? Optional.empty() : Optional.of(get(i - 1));
    }

    /** Poses with fromS <= t <= toS, oldest first. */
    public List<Pose> between(double fromS, double toS) {
        List<Pose> out = new ArrayList<>();
        for (int i = ring.upperBound(Math.nextDown(fromS)); i < ring.size() && ring.key(i) <= toS; i++) {
            out.add(get(i));
        }
        return out;
    }

    /** Writes the poses, oldest first, bit for bit. */
    public void writeTo(DataOutput out) throws IOException {
        out.writeInt(ring.size());
        for (int i = 0; i < ring.size(); i++) {
            PoseCodec.write(out, get(i));
        }
    }

    /** Replaces the content with poses written by {@link #writeTo}; the capacity keeps the newest. */
    public void readFrom(DataInput in) throws IOException {
        int n = in.readInt();
        if (n < 0) {
            throw new IOException("history: negative pose count " + n);
        }
        ring.clear(n);
        for (int i = 0; i < n; i++) {
            add(PoseCodec.read(in));
        }
    }

    /** Drops every pose with t > tS (used when late samples re-filter the recent past). */
    public void truncateAfter(double tS) {
        ring.truncate(ring.upperBound(tS));
    }
}
