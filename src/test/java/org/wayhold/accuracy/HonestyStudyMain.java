package org.wayhold.accuracy;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import org.wayhold.sample.Sample;
import org.wayhold.scoring.Quantiles;
import org.wayhold.scoring.ScoringRun;
import org.wayhold.scoring.WindowPlan;
import org.wayhold.scoring.WindowScore;
import org.wayhold.settings.Settings;

/**
 * Prints the honesty figures of the filter on the real drives: per drive the whole-drive figures of
 * {@link DriveHonesty}, and outage windows of 10, 30 and 60 s every 60 s after 30 s aided (the
 * windows {@code score --outage 10,30,60 --every 60 --min-aided 30} takes) with their inside95,
 * median final error and windows warned late.
 */
public final class HonestyStudyMain {

    private HonestyStudyMain() {
    }

    public static void main(String[] args) {
        if (!RealDrives.present()) {
            System.out.println(RealDrives.absentMessage());
            return;
        }
        Settings settings = args.length > 0 ? org.wayhold.config.ConfigLoader.load(java.nio.file.Path.of(args[0]))
                : Settings.defaults();
        Map<String, List<Sample>> drives = new LinkedHashMap<>();
        for (String d : new String[] {"0027", "0034"}) {
            drives.put(d + "_real", RealDrives.read("kitti_10_03_drive_" + d + "_real"));
            List<Sample> degraded = RealDrives.read("kitti_10_03_drive_" + d + "_degraded");
            drives.put(d + "_degraded", degraded);
            drives.put(d + "_gyro2pct", RealDrives.withGyroScaleError(degraded, 0.02));
        }
        drives.put("0027_asis", RealDrives.read("kitti_10_03_drive_0027_asis"));
        drives.put("0027_dropped", RealDrives.read("kitti_10_03_drive_0027_dropped"));
        System.out.printf(Locale.ROOT, "%-15s %7s %7s %7s %7s %7s %6s %6s %6s %6s%n", "drive", "falseC", "aidFar",
                "longst", "in95", "hdg95", "rmsF", "rmsRaw", "maxE", "");
        for (Map.Entry<String, List<Sample>> e : drives.entrySet()) {
            DriveHonesty.Figures f = DriveHonesty.evaluate(e.getValue(), settings, "default");
            System.out.printf(Locale.ROOT, "%-15s %7.1f %7.1f %7.1f %7.3f %7.3f %6.2f %6.2f %6.1f%n", e.getKey(),
                    f.falseConfidenceS(), f.aidedFarS(), f.longestOverS(), f.inside95(), f.headingInside95(),
                    f.fusedRmsM(), f.rawRmsM(), f.maxErrorM());
        }
        List<String> groups = List.of("real", "degraded", "gyro2pct");
        for (String g : groups) {
            List<ScoringRun.LogSource> sources = new ArrayList<>();
            for (Map.Entry<String, List<Sample>> e : drives.entrySet()) {
                if (e.getKey().endsWith("_" + g)) {
                    sources.add(source(e.getKey(), e.getValue()));
                }
            }
            List<ScoringRun.LogScores> logs = ScoringRun.run(sources,
                    List.of(new ScoringRun.NamedSettings("default", "built-in defaults", settings)),
                    new ScoringRun.Options(new WindowPlan.Schedule(new double[] {10, 30, 60}, 0, 60, 0, 0), 30, 0.1,
                            "default", false, 2), ScoringRun.Listener.NONE);
            for (double len : new double[] {10, 30, 60}) {
                List<WindowScore> w = new ArrayList<>();
                for (ScoringRun.LogScores l : logs) {
                    l.configs().get(0).windows().stream().filter(x -> x.window().lengthS() == len).forEach(w::add);
                }
                double[] finals = w.stream().mapToDouble(WindowScore::finalErrorM).toArray();
                double[] pct = w.stream().mapToDouble(WindowScore::errorPct).filter(Double::isFinite).toArray();
                double inside = w.stream().mapToDouble(WindowScore::inside95).average().orElse(Double.NaN);
                long late = w.stream().filter(WindowScore::warnedLate).count();
                System.out.printf(Locale.ROOT, "%-9s %3.0f s: n=%2d inside95 %.2f median %.2f m p95 %.2f m "
                                + "median %.2f%% warned late %d%n", g, len, w.size(), inside, Quantiles.of(finals, 0.5),
                        Quantiles.of(finals, 0.95), Quantiles.of(pct, 0.5), late);
            }
        }
    }

    static ScoringRun.LogSource source(String name, List<Sample> samples) {
        return new ScoringRun.LogSource() {
            @Override
            public String name() {
                return name;
            }

            @Override
            public ScoringRun.LoadedLog load() {
                return new ScoringRun.LoadedLog(name, samples, List.of());
            }
        };
    }
}
