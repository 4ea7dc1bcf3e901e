package org.wayhold.accuracy;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import org.wayhold.fusion.DriveFusion;
import org.wayhold.fusion.FusedDrive;
import org.wayhold.sample.Sample;
import org.wayhold.scoring.LengthSummary;
import org.wayhold.scoring.ReferenceTrack;
import org.wayhold.scoring.ScoringRun;
import org.wayhold.scoring.WindowPlan;
import org.wayhold.scoring.WindowScore;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.Scenario;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;

/**
 * Prints how honest the forward and the smoothed tracks of {@code fuse --smooth} are: inside95 of all
 * points and of the points in GNSS gaps, RMS and largest error, on the real drives (when present) and
 * on seeded simulated drives with tunnels, and on the simulator's what-if presets.
 *
 * <p>Arguments: simulated drives per kind (default 10), minutes per drive (default 12), first seed
 * (default 7000).
 */
public final class SmoothingStudyMain {

    private SmoothingStudyMain() {
    }

    public static void main(String[] args) {
        int drives = args.length > 0 ? Integer.parseInt(args[0]) : 10;
        double minutes = args.length > 1 ? Double.parseDouble(args[1]) : 12;
        long seed0 = args.length > 2 ? Long.parseLong(args[2]) : 7000;
        Settings settings = Settings.defaults();
        System.out.printf(Locale.ROOT, "%-22s %6s %7s %7s %6s %6s | %7s %7s %6s %6s | %6s %5s %4s%n", "drive", "pts",
                "fwd95", "fwdGap", "fRms", "fMax", "sm95", "smGap", "sRms", "sMax", "gapPts", "segs", "cuts");
        if (RealDrives.present()) {
            Map<String, List<Sample>> real = new LinkedHashMap<>();
            for (String d : new String[] {"0027", "0034"}) {
                real.put(d + "_real", RealDrives.read("kitti_10_03_drive_" + d + "_real"));
                real.put(d + "_degraded", RealDrives.read("kitti_10_03_drive_" + d + "_degraded"));
                real.put(d + "_gyro2pct", RealDrives.withGyroScaleError(
                        RealDrives.read("kitti_10_03_drive_" + d + "_degraded"), 0.02));
            }
            real.put("0027_asis", RealDrives.read("kitti_10_03_drive_0027_asis"));
            real.put("0027_dropped", RealDrives.read("kitti_10_03_drive_0027_dropped"));
            for (Map.Entry<String, List<Sample>> e : real.entrySet()) {
                FusedDrive f = DriveFusion.fuse(e.getKey(), e.getValue(), settings, settings.profileFor("default"), true);
                print(e.getKey(), f, SmoothingHonesty.reference(f, e.getValue()));
            }
        } else {
            System.out.println(RealDrives.absentMessage());
        }
        gapFill(seed0, drives);
        Pool tunnels = new Pool();
        for (int i = 0; i < drives; i++) {
            SimulatedDrive d = DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(minutes)
                    .withWarmUpS(120).withTunnelsS(60, 90, 120), seed0 + i);
            FusedDrive f = DriveFusion.fuse("sim", d.samples(), settings, settings.profileFor("default"), true);
            tunnels.add(print("sim-tunnels-" + (seed0 + i), f, SmoothingHonesty.truth(f, d)), f);
        }
        tunnels.print("sim tunnels pooled");
        for (Scenario sc : Scenario.values()) {
            Pool pool = new Pool();
            for (int i = 0; i < Math.max(2, drives / 3); i++) {
                SimulatedDrive d = DriveSimulator.simulate(sc.applyTo(SimulationSettings.defaults()
                        .withMinutes(Math.max(minutes, sc.minMinutes() + 2)).withWarmUpS(120).withTunnelsS(60)), seed0 + i);
                FusedDrive f = DriveFusion.fuse("sim", d.samples(), settings, settings.profileFor("default"), true);
                pool.add(print("sim-" + sc.label() + "-" + (seed0 + i), f, SmoothingHonesty.truth(f, d)), f);
            }
            pool.print("sim " + sc.label() + " pooled");
        }
    }

    /** Gap fill: score windows of 60, 90 and 120 s, forward and smoothed, on the real and simulated drives. */
    private static void gapFill(long seed0, int drives) {
        List<ScoringRun.LogSource> real = new ArrayList<>();
        if (RealDrives.present()) {
            for (String d : new String[] {"0027_real", "0034_real"}) {
                real.add(HonestyStudyMain.source(d, RealDrives.read("kitti_10_03_drive_" + d)));
            }
            printGapFill("real drives (every 30 s)", ScoringRun.run(real, DEFAULTS,
                    new ScoringRun.Options(new WindowPlan.Schedule(LENGTHS, 0, 30, 0, 0), 30, 0.1, "default", false, 2),
                    ScoringRun.Listener.NONE));
        }
        List<ScoringRun.LogSource> sims = new ArrayList<>();
        for (int i = 0; i < drives; i++) {
            sims.add(HonestyStudyMain.source("sim-" + (seed0 + i), DriveSimulator.simulate(SimulationSettings.defaults()
                    .withMinutes(20), seed0 + i).samples()));
        }
        printGapFill("simulated drives (every 120 s)", ScoringRun.run(sims, DEFAULTS,
                new ScoringRun.Options(new WindowPlan.Schedule(LENGTHS, 0, 120, 0, 0), 60, 0.1, "default", false, 2),
                ScoringRun.Listener.NONE));
    }

    private static final double[] LENGTHS = {60, 90, 120};
    private static final List<ScoringRun.NamedSettings> DEFAULTS = List.of(
            new ScoringRun.NamedSettings("default", "built-in defaults", Settings.defaults()));

    private static void printGapFill(String what, List<ScoringRun.LogScores> logs) {
        List<WindowScore> all = new ArrayList<>();
        for (ScoringRun.LogScores l : logs) {
            all.addAll(l.configs().get(0).windows());
        }
        for (double len : LENGTHS) {
            LengthSummary s = LengthSummary.of(len, all.stream().filter(w -> w.window().lengthS() == len).toList());
            System.out.printf(Locale.ROOT, "%s %3.0f s: n=%d forward final median %.2f m; smoothed max median %.2f m, "
                            + "inside95 %.3f (forward %.3f); gap-fill ratio median %.3f%n", what, len, s.count(),
                    s.medianFinalErrorM(), s.medianSmoothedMaxErrorM(), s.smoothedInside95(), s.inside95(),
                    s.medianGapFillRatio());
        }
        LengthSummary pooled = LengthSummary.of(0, all);
        System.out.printf(Locale.ROOT, "%s 60-120 s pooled: n=%d gap-fill ratio median %.3f, smoothed inside95 %.3f%n",
                what, pooled.count(), pooled.medianGapFillRatio(), pooled.smoothedInside95());
    }

    private static SmoothingHonesty.Figures[] print(String name, FusedDrive f, ReferenceTrack ref) {
        SmoothingHonesty.Figures fw = SmoothingHonesty.of(f.forward(), ref);
        SmoothingHonesty.Figures sm = SmoothingHonesty.of(f.smoothed(), ref);
        System.out.printf(Locale.ROOT, "%-22s %6d %7.3f %7.3f %6.2f %6.1f | %7.3f %7.3f %6.2f %6.1f | %6d %5d %4d%n",
                name, fw.points(), fw.inside95(), fw.gapInside95(), fw.rmsM(), fw.maxM(), sm.inside95(),
                sm.gapInside95(), sm.rmsM(), sm.maxM(), sm.gapPoints(), f.smoothing().segments(), f.smoothing().cuts());
        return new SmoothingHonesty.Figures[] {fw, sm};
    }

    private static final class Pool {
        int n;
        int fIn;
        int sIn;
        int g;
        int fgIn;
        int sgIn;

        void add(SmoothingHonesty.Figures[] fs, FusedDrive f) {
            n += fs[0].points();
            fIn += fs[0].insideCount();
            sIn += fs[1].insideCount();
            g += fs[0].gapPoints();
            fgIn += fs[0].gapInsideCount();
            sgIn += fs[1].gapInsideCount();
        }

        void print(String what) {
            System.out.printf(Locale.ROOT, "%-30s forward %.3f (gaps %.3f)  smoothed %.3f (gaps %.3f)  points %d gap %d%n",
                    what, (double) fIn / n, (double) fgIn / g, (double) sIn / n, (double) sgIn / g, n, g);
        }
    }
}
