package org.wayhold.session;

import org.wayhold.pipeline.FixRecord;
import java.io.DataInput;
import java.io.DataOutput;
import java.io.IOException;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import org.wayhold.filter.GnssOutcome;

/**
 * The most recent fixes of a vehicle with their decisions, oldest dropped first. Not thread-safe.
 *
 * <p>Held as columns of primitives (7 doubles and a byte per fix, about 57 bytes, against about 76
 * for a {@link FixRecord} and its reference in a deque); reads build the records from the same bits.
 * The columns grow with the content up to the capacity.
 */
final class FixLog {

    /** Doubles stored per fix: t, lat, lon, east, north, sigma, nis. */
    private static final int STRIDE = 7;
    private static final int INITIAL_SLOTS = 32;
    private static final GnssOutcome.Kind[] KINDS = GnssOutcome.Kind.values();

    private final int capacity;
    private double[] values;
    private byte[] kinds;
    /** Invariant: while the columns hold fewer slots than the capacity, start is 0 (never wrapped). */
    private int start;
    private int size;

    FixLog(int capacity) {
        if (capacity < 1) {
            throw new IllegalArgumentException("capacity: must be at least 1, was " + capacity);
        }
        this.capacity = capacity;
        allocate(Math.min(capacity, INITIAL_SLOTS));
    }

    private void allocate(int slots) {
        values = new double[slots * STRIDE];
        kinds = new byte[slots];
        start = 0;
        size = 0;
    }

    private int slots() {
        return kinds.length;
    }

    private int slotOf(int i) {
        int slot = start + i;
        return slot >= slots() ? slot - slots() : slot;
    }

    void add(FixRecord f) {
        int slot;
        if (size == capacity) {
            slot = start;
            start = start + 1 == slots() ? 0 : start + 1;
        } else {
            if (size == slots()) {
                int grown = (int) Math.min(capacity, 2L * slots());
                values = Arrays.copyOf(values, grown * STRIDE);
                kinds = Arrays.copyOf(kinds, grown);
            }
            slot = slotOf(size);
            size++;
        }
        int o = slot * STRIDE;
        values[o] = f.t();
        values[o + 1] = f.latDeg();
        values[o + 2] = f.lonDeg();
        values[o + 3] = f.eastM();
        values[o + 4] = f.northM();
        values[o + 5] = f.sigmaHM();
        values[o + 6] = f.nis();
        kinds[slot] = (byte) f.outcome().ordinal();
    }

    private double tAt(int i) {
        return values[slotOf(i) * STRIDE];
    }

    private FixRecord get(int i) {
        int slot = slotOf(i);
        int o = slot * STRIDE;
        return new FixRecord(values[o], values[o + 1], values[o + 2], values[o + 3], values[o + 4], values[o + 5],
                KINDS[kinds[slot]], values[o + 6]);
    }

    /** Fixes with fromS <= t <= toS, oldest first. */
    List<FixRecord> between(double fromS, double toS) {
        List<FixRecord> out = new ArrayList<>();
        for (int i = 0; i < size; i++) {
            double t = tAt(i);
            if (t >= fromS && t <= toS) {
                out.add(get(i));
            }
        }
        return out;
    }

    /** Drops fixes with t > tS, which re-filtering will record again. */
    void truncateAfter(double tS) {
        while (size > 0 && tAt(size - 1) > tS) {
            size--;
        }
    }

    void writeTo(DataOutput out) throws IOException {
        out.writeInt(size);
        for (int i = 0; i < size; i++) {
            FixRecord f = get(i);
            out.writeDouble(f.t());
            out.writeDouble(f.latDeg());
            out.writeDouble(f.lonDeg());
            out.writeDouble(f.eastM());
            out.writeDouble(f.northM());
            out.writeDouble(f.sigmaHM());
            out.writeByte(f.outcome().ordinal());
            out.writeDouble(f.nis());
        }
    }

    void readFrom(DataInput in) throws IOException {
        int n = in.readInt();
        if (n < 0) {
            throw new IOException("fix log: negative count " + n);
        }
        allocate(Math.min(capacity, Math.max(INITIAL_SLOTS, n)));
        for (int i = 0; i < n; i++) {
            double t = in.readDouble();
            double lat = in.readDouble();
            double lon = in.readDouble();
            double east = in.readDouble();
            double north = in.readDouble();
            double sigma = in.readDouble();
            int kind = in.readByte();
            if (kind < 0 || kind >= KINDS.length) {
                throw new IOException("fix log: unknown outcome code " + kind);
            }
            add(new FixRecord(t, lat, lon, east, north, sigma, KINDS[kind], in.readDouble()));
        }
    }
}
