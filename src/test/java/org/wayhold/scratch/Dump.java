package org.wayhold.scratch;

import java.io.PrintWriter;
import java.util.*;
import org.wayhold.accuracy.RealDrives;
import org.wayhold.geo.*;
import org.wayhold.pipeline.*;
import org.wayhold.pose.*;
import org.wayhold.sample.*;
import org.wayhold.scoring.InterpolatedTrack;
import org.wayhold.settings.Settings;

public class Dump {
    public static void main(String[] a) throws Exception {
        Settings settings = a.length > 1 ? org.wayhold.config.ConfigLoader.load(java.nio.file.Path.of(a[1])) : Settings.defaults();
        List<Sample> samples = RealDrives.read(a[0]);
        OrderedLog o = OrderedLog.order(samples, settings.ordering());
        List<ReferencePoint> refs = new ArrayList<>(); GnssFix first = null;
        for (Sample s : o.samples()) { if (s instanceof ReferencePoint r) refs.add(r); else if (first == null && s instanceof GnssFix g) first = g; }
        LocalFrame frame = VehicleTrack.frameFor(first, null);
        InterpolatedTrack ref = InterpolatedTrack.ofReference(refs, frame, 1.0);
        List<Pose> poses = new ArrayList<>();
        VehicleTrack t = new VehicleTrack(settings, settings.profileFor("x"), null, new TrackOutput() {
            public void pose(Pose p) { poses.add(p); }
            public void fix(FixRecord r) {}
            public void rewoundTo(double t) {}
        });
        o.samples().forEach(t::apply);
        try (PrintWriter w = new PrintWriter(a.length > 2 ? a[2] : "/tmp/dump.csv")) {
            w.println("t,speed,rate,hdgErrDeg,hdgSigDeg,posErr,r95,state,ee,nn,bias,scale");
            for (Pose p : poses) {
                if (!ref.covers(p.t()) || p.state() == NavState.INITIALIZING) continue;
                double ry = ref.yawAt(p.t());
                double dy = Math.toDegrees(Angles.wrapPi(Angles.headingDegToYawRad(p.headingDeg()) - ry));
                double err = Math.hypot(p.eastM() - ref.eastAt(p.t()), p.northM() - ref.northAt(p.t()));
                w.printf(Locale.ROOT, "%.2f,%.3f,%.4f,%.3f,%.3f,%.3f,%.3f,%s,%.4f,%.4f,%.6f,%.5f%n", p.t() - 1.8e9, p.speedMps(), p.yawRateRadPerS(), dy, p.headingSigmaDeg(), err, p.radius95M(), p.state(), p.covEastEastM2(), p.covNorthNorthM2(), Math.toDegrees(p.gyroBiasRadPerS()), p.speedScale());
            }
        }
    }
}
