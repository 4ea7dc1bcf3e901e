package org.wayhold.pose;

import java.io.DataInput;
import java.io.DataOutput;
import java.io.IOException;
import org.wayhold.geo.Geodetic;

/** Binary form of a pose for snapshots: every field as written, so it reads back bit-identical. */
final class PoseCodec {

    private PoseCodec() {
    }

    static void write(DataOutput out, Pose p) throws IOException {
        double[] v = {p.t(), p.latDeg(), p.lonDeg(), p.altM(), p.eastM(), p.northM(), p.upM(), p.headingDeg(),
            p.speedMps(), p.yawRateRadPerS(), p.covEastEastM2(), p.covEastNorthM2(), p.covNorthNorthM2(),
            p.headingSigmaDeg(), p.ellipse95().semiMajorM(), p.ellipse95().semiMinorM(),
            p.ellipse95().orientationDeg(), p.outage().sinceT(), p.outage().seconds(), p.outage().meters(),
            p.gyroBiasRadPerS(), p.speedScale(), p.lastFixT(), p.alertLimitM(), p.radius95M(), p.reasons()};
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
        double[] v = new double[26];
        for (int i = 0; i < v.length; i++) {
            v[i] = in.readDouble();
        }
        int state = in.readByte();
        if (state < 0 || state >= NavState.values().length) {
            throw new IOException("pose: unknown state code " + state);
        }
        boolean active = in.readBoolean();
        Geodetic origin = null;
        try {
            if (in.readBoolean()) {
                origin = new Geodetic(in.readDouble(), in.readDouble(), in.readDouble());
            }
            return new Pose(v[0], v[1], v[2], v[3], v[4], v[5], v[6], v[7], v[8], v[9], v[10], v[11], v[12], v[13],
                    new Ellipse95(v[14], v[15], v[16]), NavState.values()[state],
                    new Outage(active, v[17], v[18], v[19]), v[20], v[21], origin, v[22], v[23], v[24], (int) v[25]);
        } catch (IllegalArgumentException e) {
            throw new IOException("pose: " + e.getMessage(), e);
        }
    }
}
