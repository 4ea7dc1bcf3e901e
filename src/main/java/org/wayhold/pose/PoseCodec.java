package org.wayhold.pose;

import java.io.DataInput;
import java.io.DataOutput;
import java.io.IOException;
import org.wayhold.geo.Geodetic;

/**
 * Binary form of a pose for snapshots: the doubles of {@link PoseColumns} in table order, then the
 * state code, the outage flag and the frame origin, so it reads back bit-identical.
 */
final class PoseCodec {

    private PoseCodec() {
    }

    static void write(DataOutput out, Pose p) throws IOException {
        double[] v = new double[PoseColumns.COUNT];
        PoseColumns.write(p, v, 0);
        for (double d : v) {
            out.writeDouble(d);
        }
        out.writeByte(p.state().ordinal());
        out.writeBoolean(p.outage().active());
        out.writeBoolean(p.origin() != null);
        if (p.origin() != null) {
            out.writeDouble(p.origin().latDeg());
            out.writeDouble(p.origin().lonDeg());
            out.writeDouble(p.origin().altM());
        }
    }

    static Pose read(DataInput in) throws IOException {
        double[] v = new double[PoseColumns.COUNT];
        for (int i = 0; i < v.length; i++) {
            v[i] = in.readDouble();
        }
        int state = in.readByte();
        boolean active = in.readBoolean();
        try {
            Geodetic origin = in.readBoolean() ? new Geodetic(in.readDouble(), in.readDouble(), in.readDouble()) : null;
            return PoseColumns.read(v, 0, state, active, origin);
        } catch (IllegalArgumentException e) {
            throw new IOException("pose: " + e.getMessage(), e);
        }
    }
}
