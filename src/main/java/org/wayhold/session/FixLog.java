package org.wayhold.session;

import org.wayhold.pipeline.FixRecord;
import java.io.DataInput;
import java.io.DataOutput;
import java.io.IOException;
import java.util.ArrayList;
import java.util.List;
import org.wayhold.columns.ColumnRing;
import org.wayhold.filter.GnssOutcome;

/**
 * The most recent fixes of a vehicle with their decisions, oldest dropped first, in time order. Not
 * thread-safe.
 *
 * <p>Held as columns of primitives in a {@link ColumnRing} (7 doubles and a byte per fix, about 57
 * bytes, against about 76 for a {@link FixRecord} and its reference in a deque); reads build the
 * records from the same bits.
 */
final class FixLog {

    /** Doubles stored per fix: t, lat, lon, east, north, sigma, nis. */
    private static final int STRIDE = 7;
    private static final int INITIAL_SLOTS = 32;
    private static final GnssOutcome.Kind[] KINDS = GnssOutcome.Kind.values();

    private final ColumnRing<Void> ring;

    FixLog(int capacity) {
        this.ring = new ColumnRing<>(STRIDE, capacity, INITIAL_SLOTS, false);
    }

    void add(FixRecord f) {
        int slot = ring.add();
        double[] v = ring.doubles();
        int o = slot * STRIDE;
        v[o] = f.t();
        v[o + 1] = f.latDeg();
        v[o + 2] = f.lonDeg();
        v[o + 3] = f.eastM();
        v[o + 4] = f.northM();
        v[o + 5] = f.sigmaHM();
        v[o + 6] = f.nis();
        ring.bytes()[slot] = (byte) f.outcome().ordinal();
    }

    private FixRecord get(int i) {
        int slot = ring.slot(i);
        int o = slot * STRIDE;
        double[] v = ring.doubles();
        return new FixRecord(v[o], v[o + 1], v[o + 2], v[o + 3], v[o + 4], v[o + 5], KINDS[ring.bytes()[slot]],
                v[o + 6]);
    }

    /** Fixes with fromS <= t <= toS, oldest first. */
    List<FixRecord> between(double fromS, double toS) {
        List<FixRecord> out = new ArrayList<>();
        for (int i = ring.upperBound(Math.nextDown(fromS)); i < ring.size() && ring.key(i) <= toS; i++) {
            out.add(get(i));
        }
        return out;
    }

    /** Whether a fix of this time and position (the same bits) is held. */
    boolean contains(double tS, double latDeg, double lonDeg) {
        double[] v = ring.doubles();
        for (int i = ring.upperBound(Math.nextDown(tS)); i < ring.size() && ring.key(i) == tS; i++) {
            int o = ring.slot(i) * STRIDE;
            if (Double.compare(v[o + 1], latDeg) == 0 && Double.compare(v[o + 2], lonDeg) == 0) {
                return true;
            }
        }
        return false;
    }

    /** Drops fixes with t > tS, which re-filtering will record again. */
    void truncateAfter(double tS) {
        ring.truncate(ring.upperBound(tS));
    }

    void writeTo(DataOutput out) throws IOException {
        out.writeInt(ring.size());
        for (int i = 0; i < ring.size(); i++) {
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
        ring.clear(n);
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
