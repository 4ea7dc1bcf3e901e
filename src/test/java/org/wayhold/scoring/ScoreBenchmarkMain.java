package org.wayhold.scoring;

import java.util.List;
import java.util.Locale;
import org.wayhold.pipeline.TrackOutput;
import org.wayhold.pipeline.VehicleTrack;
import org.wayhold.sample.Sample;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;

/**
 * Benchmark, not a test: scores a one-hour simulated drive (yaw rate 100 Hz, wheel speed 50 Hz, GNSS
 * 5 Hz, reference 10 Hz) with 10, 30 and 60 s windows every 120 s on one thread, and compares the time
 * with one plain replay of the same samples through the filter. Best of five rounds after a warm-up
 * round, wall time and this thread's CPU time (the CPU time is steadier on a shared machine).
 *
 * <p>Run: {@code mvn -B -ntp -o test-compile} then
 * {@code java -cp target/classes:target/test-classes:$(cat cp.txt) org.wayhold.scoring.ScoreBenchmarkMain}
 * with the classpath from {@code mvn dependency:build-classpath -Dmdep.outputFile=cp.txt}. An optional
 * argument sets the aided time before a window (s, default 60; 0 scores every scheduled window).
 */
public final class ScoreBenchmarkMain {

    private ScoreBenchmarkMain() {
    }

    public static void main(String[] args) {
        SimulatedDrive drive = DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(60), 2024L);
        List<Sample> samples = drive.samples();
        Settings s = Settings.defaults();
        List<ScoringRun.NamedSettings> configs = List.of(new ScoringRun.NamedSettings("default", "defaults", s));
        ScoringRun.Options o = new ScoringRun.Options(new WindowPlan.Schedule(new double[] {10, 30, 60}, 0, 120, 0, 0),
                args.length > 0 ? Double.parseDouble(args[0]) : 60, 0.1, "default", false, 1);
        ScoringRun.LogSource src = new ScoringRun.LogSource() {
            @Override
            public String name() {
                return "hour";
            }

            @Override
            public ScoringRun.LoadedLog load() {
                return new ScoringRun.LoadedLog("hour", samples, List.of());
            }
        };
        java.lang.management.ThreadMXBean mx = java.lang.management.ManagementFactory.getThreadMXBean();
        double bestPlainWall = Double.MAX_VALUE;
        double bestPlainCpu = Double.MAX_VALUE;
        double bestScoreWall = Double.MAX_VALUE;
        double bestScoreCpu = Double.MAX_VALUE;
        int windows = 0;
        for (int round = 0; round < 6; round++) {
            long w0 = System.nanoTime();
            long c0 = mx.getCurrentThreadCpuTime();
            VehicleTrack f = new VehicleTrack(s, s.profileFor("default"), drive.frame().origin(), TrackOutput.NONE);
            for (Sample x : samples) {
                f.apply(x);
            }
            double plainWall = (System.nanoTime() - w0) / 1e9;
            double plainCpu = (mx.getCurrentThreadCpuTime() - c0) / 1e9;
            // One thread runs the pool's tasks; the CPU time of this thread is then not the work done,
            // so the scoring's CPU time is read from the pool thread through a listener.
            long[] poolCpu = new long[1];
            long w1 = System.nanoTime();
            List<ScoringRun.LogScores> r = ScoringRun.run(List.of(src), configs, o, new ScoringRun.Listener() {
                @Override
                public void logDone(String log) {
                    poolCpu[0] = mx.getCurrentThreadCpuTime();
                }
            });
            double scoreWall = (System.nanoTime() - w1) / 1e9;
            double scoreCpu = poolCpu[0] / 1e9;
            windows = r.get(0).configs().get(0).windows().size();
            if (round > 0) {
                bestPlainWall = Math.min(bestPlainWall, plainWall);
                bestPlainCpu = Math.min(bestPlainCpu, plainCpu);
                bestScoreWall = Math.min(bestScoreWall, scoreWall);
                bestScoreCpu = Math.min(bestScoreCpu, scoreCpu);
            }
        }
        System.out.printf(Locale.ROOT, "one-hour drive: %d samples, %d windows scored%n", samples.size(), windows);
        System.out.printf(Locale.ROOT, "plain replay: %.3f s wall, %.3f s cpu (%.2f M samples/s)%n", bestPlainWall,
                bestPlainCpu, samples.size() / bestPlainWall / 1e6);
        System.out.printf(Locale.ROOT, "scoring:      %.3f s wall, %.3f s cpu (%.2f M samples/s)%n", bestScoreWall,
                bestScoreCpu, samples.size() / bestScoreWall / 1e6);
        System.out.printf(Locale.ROOT, "ratio scoring / plain: %.2f wall, %.2f cpu%n", bestScoreWall / bestPlainWall,
                bestScoreCpu / bestPlainCpu);
    }
}
