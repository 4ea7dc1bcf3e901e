package org.wayhold.accuracy;

import java.util.Locale;
import org.wayhold.filter.FilterSnapshot;
import org.wayhold.filter.GnssOutcome;
import org.wayhold.filter.NavigationFilter;
import org.wayhold.filter.SampleFeeder;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;
import org.wayhold.simulate.Truth;

/** Finds drives where the filter loses track, for debugging by hand. */
public final class DivergenceProbe {
    private DivergenceProbe() {
    }

    public static void main(String[] args) {
        long from = Long.parseLong(args[0]);
        long to = Long.parseLong(args[1]);
        double minutes = args.length > 2 ? Double.parseDouble(args[2]) : 20;
        boolean verbose = args.length > 3;
        Settings settings = Settings.defaults();
        for (long seed = from; seed < to; seed++) {
            SimulatedDrive drive = DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(minutes), seed);
            NavigationFilter f = new NavigationFilter(settings.filter(), settings.gating(), settings.outage(),
                    settings.profileFor("default"));
            double epoch = Math.floor(drive.samples().get(0).t());
            double maxErr = 0;
            double maxErrT = 0;
            for (Sample s : drive.samples()) {
                GnssOutcome o = SampleFeeder.feed(f, s, epoch, drive.frame());
                if (s instanceof GnssFix && f.initialized()) {
                    Truth tr = drive.truthAt(s.t());
                    FilterSnapshot sn = f.snapshot();
                    double err = Math.hypot(sn.eastM() - tr.eastM(), sn.northM() - tr.northM());
                    if (verbose && (err > 3 || o.kind() != GnssOutcome.Kind.ACCEPTED)) {
                        System.out.printf(Locale.ROOT, "t=%.1f err=%.2f %s nis=%.1f v=%.2f truthV=%.2f yaw=%.3f truthYaw=%.3f bias=%.4f still=%b%n",
                                s.t() - drive.startT(), err, o.kind(), o.nis(), sn.speedMps(), tr.speedMps(), sn.yawRad(),
                                tr.yawRad(), sn.gyroBiasRadPerS(), sn.standstill());
                    }
                    if (err > maxErr) {
                        maxErr = err;
                        maxErrT = s.t() - drive.startT();
                    }
                }
            }
            System.out.printf(Locale.ROOT, "seed %d max error %.2f m at %.1f s; counts %s%n", seed, maxErr, maxErrT,
                    f.snapshot().counts());
        }
    }
}
