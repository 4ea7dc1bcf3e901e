package org.wayhold.session;

import java.io.DataInput;
import java.io.DataOutput;
import java.io.IOException;
import java.util.ArrayDeque;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.List;
import org.wayhold.filter.GnssOutcome;

/** The most recent fixes of a vehicle with their decisions, oldest dropped first. Not thread-safe. */
final class FixLog {

    private final int capacity;
    private final ArrayDeque<FixRecord> fixes = new ArrayDeque<>();

    FixLog(int capacity) {
        this.capacity = capacity;
    }

    void add(FixRecord f) {
        if (fixes.size() == capacity) {
            fixes.removeFirst();
        }
        fixes.addLast(f);
    }

    /** Fixes with fromS <= t <= toS, oldest first. */
    List<FixRecord> between(double fromS, double toS) {
        List<FixRecord> out = new ArrayList<>();
        for (FixRecord f : fixes) {
            if (f.t() >= fromS && f.t() <= toS) {
                out.add(f);
            }
        }
        return out;
    }

    /** Drops fixes with t > tS, which re-filtering will record again. */
    void truncateAfter(double tS) {
        Iterator<FixRecord> it = fixes.descendingIterator();
        while (it.hasNext() && it.next().t() > tS) {
            it.remove();
        }
    }

    void writeTo(DataOutput out) throws IOException {
        out.writeInt(fixes.size());
        for (FixRecord f : fixes) {
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
        fixes.clear();
        int n = in.readInt();
        if (n < 0) {
            throw new IOException("fix log: negative count " + n);
        }
        for (int i = 0; i < n; i++) {
            double t = in.readDouble();
            double lat = in.readDouble();
            double lon = in.readDouble();
            double east = in.readDouble();
            double north = in.readDouble();
            double sigma = in.readDouble();
            int kind = in.readByte();
            if (kind < 0 || kind >= GnssOutcome.Kind.values().length) {
                throw new IOException("fix log: unknown outcome code " + kind);
            }
            add(new FixRecord(t, lat, lon, east, north, sigma, GnssOutcome.Kind.values()[kind], in.readDouble()));
        }
    }
}
