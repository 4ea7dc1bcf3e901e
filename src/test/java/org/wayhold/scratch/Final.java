package org.wayhold.scratch;

import java.util.*;
import org.wayhold.accuracy.RealDrives;
import org.wayhold.filter.*;
import org.wayhold.pipeline.*;
import org.wayhold.sample.*;
import org.wayhold.settings.Settings;

public class Final {
    public static void main(String[] a) throws Exception {
        Settings settings = a.length > 1 ? org.wayhold.config.ConfigLoader.load(java.nio.file.Path.of(a[1])) : Settings.defaults();
        List<Sample> samples = a[0].startsWith("/") ? RealDrives.readPath(java.nio.file.Path.of(a[0])) : RealDrives.read(a[0]);
        OrderedLog o = OrderedLog.order(samples, settings.ordering());
        NavigationFilter f = new NavigationFilter(settings.filter(), settings.gating(), settings.outage(), settings.profileFor("x"));
        double epoch = Math.floor(o.samples().get(0).t());
        org.wayhold.geo.LocalFrame frame = null;
        int n = 0;
        for (Sample s : o.samples()) {
            f.predictTo(s.t() - epoch);
            if (s instanceof WheelSpeed w) f.setWheelSpeed(w.speedMps());
            else if (s instanceof YawRate y) f.setYawRate(y.yawRateRadPerS());
            else if (s instanceof GnssFix g) {
                if (frame == null) frame = VehicleTrack.frameFor(g, null);
                var e = frame.toEnu(g.latDeg(), g.lonDeg(), g.altM());
                f.correct(g, e.eastM(), e.northM(), e.upM());
            }
            if (++n % 3000 == 0 || n == o.samples().size()) {
                double[] x = f.state(); double[] p = f.covariance(); int N = StateIndex.SIZE;
                StringBuilder b = new StringBuilder(String.format("t %.0f ", s.t() - epoch));
                String[] names = {"E","N","yaw","bias","sscale","gscale","ge","gn","lf","ll","lat"};
                for (int i = 0; i < N; i++) b.append(String.format(Locale.ROOT, "%s=%.4g±%.2g ", names[i], i==2||i==3 ? Math.toDegrees(x[i]) : x[i], i==2||i==3 ? Math.toDegrees(Math.sqrt(p[i*N+i])) : Math.sqrt(p[i*N+i])));
                System.out.println(b);
            }
        }
        System.out.println(f.snapshot().counts());
    }
}
