package org.wayhold.scratch;

import java.util.*;
import org.wayhold.filter.*;
import org.wayhold.pipeline.*;
import org.wayhold.sample.*;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.*;

public class SimFinal {
    public static void main(String[] a) throws Exception {
        Settings settings = Settings.defaults();
        SimulationSettings ss = SimulationSettings.defaults().withMinutes(15).withWarmUpS(120);
        if (!a[0].equals("none")) ss = Scenario.byLabel(a[0]).applyTo(ss);
        SimulatedDrive d = DriveSimulator.simulate(ss, Long.parseLong(a[1]));
        OrderedLog o = OrderedLog.order(d.samples(), settings.ordering());
        NavigationFilter f = new NavigationFilter(settings.filter(), settings.gating(), settings.outage(), settings.profileFor("x"));
        double epoch = Math.floor(o.samples().get(0).t());
        double every = a.length > 2 ? Double.parseDouble(a[2]) : 20;
        double next = d.startT();
        for (Sample s : o.samples()) {
            f.predictTo(s.t() - epoch);
            if (s instanceof WheelSpeed w) f.setWheelSpeed(w.speedMps());
            else if (s instanceof YawRate y) f.setYawRate(y.yawRateRadPerS());
            else if (s instanceof GnssFix g) {
                var e = d.frame().toEnu(g.latDeg(), g.lonDeg(), g.altM());
                f.correct(g, e.eastM(), e.northM(), e.upM());
            }
            if (s.t() >= next) {
                next += every;
                double[] x = f.state(); double[] p = f.covariance(); int N = StateIndex.SIZE;
                Truth tr = d.truthAt(s.t());
                StringBuilder b = new StringBuilder(String.format(Locale.ROOT, "t %.0f err %.2f spd %.1f ", s.t() - d.startT(), Math.hypot(x[0]-tr.eastM(), x[1]-tr.northM()), tr.speedMps()));
                String[] names = {"E","N","yaw","bias","ss","gs","ge","gn","lf","ll","lat"};
                for (int i = 2; i < N; i++) b.append(String.format(Locale.ROOT, "%s=%.3g±%.2g ", names[i], i==2||i==3 ? Math.toDegrees(x[i]) : x[i], i==2||i==3 ? Math.toDegrees(Math.sqrt(p[i*N+i])) : Math.sqrt(p[i*N+i])));
                System.out.println(b);
            }
        }
        System.out.println(f.snapshot().counts());
    }
}
