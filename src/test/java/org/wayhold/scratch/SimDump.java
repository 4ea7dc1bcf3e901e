package org.wayhold.scratch;

import java.io.PrintWriter;
import java.util.*;
import org.wayhold.filter.GnssOutcome;
import org.wayhold.geo.*;
import org.wayhold.pipeline.*;
import org.wayhold.pose.*;
import org.wayhold.sample.*;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.*;

public class SimDump {
    public static void main(String[] a) throws Exception {
        Settings settings = Settings.defaults();
        SimulationSettings ss = SimulationSettings.defaults().withMinutes(15).withWarmUpS(120);
        if (a.length > 0 && !a[0].equals("none")) ss = Scenario.byLabel(a[0]).applyTo(ss);
        SimulatedDrive d = DriveSimulator.simulate(ss, a.length > 1 ? Long.parseLong(a[1]) : 1L);
        List<Pose> poses = new ArrayList<>();
        List<FixRecord> fixes = new ArrayList<>();
        VehicleTrack t = new VehicleTrack(settings, settings.profileFor("x"), d.frame().origin(), new TrackOutput() {
            public void pose(Pose p) { if (!poses.isEmpty() && poses.get(poses.size()-1).t() == p.t()) poses.set(poses.size()-1, p); else poses.add(p); }
            public void fix(FixRecord r) { fixes.add(r); }
            public void rewoundTo(double t) {}
        });
        OrderedLog o = OrderedLog.order(d.samples(), settings.ordering());
        o.samples().forEach(t::apply);
        try (PrintWriter w = new PrintWriter("/tmp/simdump.csv")) {
            w.println("t,posErr,r95,state,reasons,fixErr,outcome,nis,hdgErr,hdgSig,speed");
            Map<Double, FixRecord> byT = new HashMap<>();
            for (FixRecord f : fixes) byT.put(f.t(), f);
            for (Pose p : poses) {
                Truth tr = d.truthAt(p.t());
                double err = Math.hypot(p.eastM() - tr.eastM(), p.northM() - tr.northM());
                FixRecord f = byT.get(p.t());
                double fe = f == null ? Double.NaN : Math.hypot(f.eastM() - tr.eastM(), f.northM() - tr.northM());
                double dy = Double.isNaN(p.headingDeg()) ? Double.NaN : Math.toDegrees(Angles.wrapPi(Angles.headingDegToYawRad(p.headingDeg()) - tr.yawRad()));
                w.printf(Locale.ROOT, "%.2f,%.3f,%.3f,%s,%s,%.3f,%s,%.2f,%.3f,%.3f,%.2f%n", p.t() - d.startT(), err, p.radius95M(), p.state(), p.reasonList().toString().replace(",", " "), fe, f == null ? "" : f.outcome(), f == null ? Double.NaN : f.nis(), dy, p.headingSigmaDeg(), p.speedMps());
            }
        }
    }
}
