package org.wayhold.pose;

import java.io.DataInput;
import java.io.DataOutput;
import java.io.IOException;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Optional;
import org.wayhold.geo.Geodetic;

/**
 * A bounded, time-ordered ring of poses; the oldest are dropped first. Not thread-safe: the session
 * that owns it serialises access.
 *
 * <p>Poses are held as columns of primitives, not as objects: a {@link Pose} with its ellipse and
 * outage records takes about 220 bytes of heap on a 64-bit JVM with compressed references, its 26
 * doubles, flags and origin reference here about 197, and the session's poses dominate its memory.
 * Reads build the records again from the same bits, so a pose reads back equal to the one added (NaN
 * payloads included). The columns grow with the content up to the capacity, so a new session does
 * not pay for a full history.
 */
public final class PoseHistory {

    /** Doubles stored per pose, in the order of {@link #put} and {@link #get}. */
    private static final int STRIDE = 26;
    /** Poses the columns hold before the first growth. */
    private static final int INITIAL_SLOTS = 64;
    private static final int ACTIVE_BIT = 0x80;
    private static final NavState[] STATES = NavState.values();

    private final int capacity;
    /** STRIDE doubles per slot. */
    private double[] values;
    /** Navigation state ordinal, with {@link #ACTIVE_BIT} when the outage is active. */
    private byte[] flags;
    /** Origin of the session's frame per slot (shared objects, null before the first fix). */
    private Geodetic[] origins;
    /** Invariant: while the columns hold fewer slots than the capacity, start is 0 (the ring never wrapped). */
    private int start;
    private int size;

    /** @param capacity most poses kept (count, >= 1) */
    public PoseHistory(int capacity) {
        if (capacity < 1) {
            throw new IllegalArgumentException("capacity: must be at least 1, was " + capacity);
        }
        this.capacity = capacity;
        allocate(Math.min(capacity, INITIAL_SLOTS));
    }

    private void allocate(int slots) {
        values = new double[slots * STRIDE];
        flags = new byte[slots];
        origins = new Geodetic[slots];
    }

    private int slots() {
        return flags.length;
    }

    /** Makes room for one more pose at the end while the ring has not yet wrapped. */
    private void grow() {
        int slots = (int) Math.min(capacity, 2L * slots());
        values = Arrays.copyOf(values, slots * STRIDE);
        flags = Arrays.copyOf(flags, slots);
        origins = Arrays.copyOf(origins, slots);
    }

    private void put(int slot, Pose p) {
        int o = slot * STRIDE;
        double[] v = values;
        v[o] = p.t();
        v[o + 1] = p.latDeg();
        v[o + 2] = p.lonDeg();
        v[o + 3] = p.altM();
        v[o + 4] = p.eastM();
        v[o + 5] = p.northM();
        v[o + 6] = p.upM();
        v[o + 7] = p.headingDeg();
        v[o + 8] = p.speedMps();
        v[o + 9] = p.yawRateRadPerS();
        v[o + 10] = p.covEastEastM2();
        v[o + 11] = p.covEastNorthM2();
        v[o + 12] = p.covNorthNorthM2();
        v[o + 13] = p.headingSigmaDeg();
        v[o + 14] = p.ellipse95().semiMajorM();
        v[o + 15] = p.ellipse95().semiMinorM();
        v[o + 16] = p.ellipse95().orientationDeg();
        v[o + 17] = p.outage().sinceT();
        v[o + 18] = p.outage().seconds();
        v[o + 19] = p.outage().meters();
        v[o + 20] = p.gyroBiasRadPerS();
        v[o + 21] = p.speedScale();
        v[o + 22] = p.lastFixT();
        v[o + 23] = p.alertLimitM();
        v[o + 24] = p.radius95M();
        v[o + 25] = p.reasons();
        flags[slot] = (byte) (p.state().ordinal() | (p.outage().active() ? ACTIVE_BIT : 0));
        origins[slot] = p.origin();
    }

    /** The pose at ring index i (0 = oldest), built from the columns. */
    private Pose get(int i) {
        int slot = slotOf(i);
        int o = slot * STRIDE;
        double[] v = values;
        int f = flags[slot] & 0xFF;
        Outage outage = new Outage((f & ACTIVE_BIT) != 0, v[o + 17], v[o + 18], v[o + 19]);
        return new Pose(v[o], v[o + 1], v[o + 2], v[o + 3], v[o + 4], v[o + 5], v[o + 6], v[o + 7], v[o + 8],
                v[o + 9], v[o + 10], v[o + 11], v[o + 12], v[o + 13], new Ellipse95(v[o + 14], v[o + 15], v[o + 16]),
                STATES[f & ~ACTIVE_BIT], outage, v[o + 20], v[o + 21], origins[slot], v[o + 22], v[o + 23], v[o + 24],
                (int) v[o + 25]);
    }

    private int slotOf(int i) {
        int slot = start + i;
        return slot >= slots() ? slot - slots() : slot;
    }

    /** Time of the pose at ring index i (s), without building it. */
    private double tAt(int i) {
        return values[slotOf(i) * STRIDE];
    }

    /**
     * Appends a pose, which must not be older than the newest one held; a pose of the same time as the
     * newest replaces it (one pose per instant).
     */
    public void add(Pose pose) {
        if (size > 0 && pose.t() < tAt(size - 1)) {
            throw new IllegalArgumentException("t: pose at " + pose.t() + " s is older than the newest held, "
                    + tAt(size - 1) + " s");
        }
        if (size > 0 && pose.t() == tAt(size - 1)) {
            put(slotOf(size - 1), pose);
            return;
        }
        if (size == capacity) {
            put(start, pose);
            start = start + 1 == slots() ? 0 : start + 1;
        } else {
            if (size == slots()) {
                grow();
            }
            put(slotOf(size), pose);
            size++;
        }
    }

    public int size() {
        return size;
    }

    public boolean isEmpty() {
        return size == 0;
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
            if (tAt(mid) <= tS) {
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
        for (; i < size && tAt(i) <= toS; i++) {
            out.add(get(i));
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
        allocate(Math.min(capacity, Math.max(INITIAL_SLOTS, n)));
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
            origins[slotOf(i)] = null;
        }
        size = keep;
    }
}
