package org.wayhold.accuracy;

import java.util.ArrayList;
import java.util.List;
import org.wayhold.scoring.ScoringRun;
import org.wayhold.scoring.WindowPlan;
import org.wayhold.scoring.WindowScore;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.Scenario;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;
import org.wayhold.simulate.TimeWindow;

/**
 * Honesty of the filter on simulated drives with one realistic effect each (the simulator's
 * {@link Scenario} presets), whose error models are not the filter's: per preset and seed the
 * whole-drive figures of {@link DriveHonesty} and outage windows of 10, 30 and 60 s every 60 s after
 * 30 s aided, pooled over seeds.
 */
public final class EffectStudy {

    /** Outage lengths scored (s). */
    static final double[] LENGTHS_S = {10, 30, 60};

    /**
     * Figures of one preset over its seeds.
     *
     * @param label            the preset, or {@code none}
     * @param drives           drives simulated
     * @param falseConfidenceS seconds above the alert limit while claiming to be within it, summed
     * @param aidedInside95    share of aided time inside the 95% ellipse, pooled
     * @param canyonAidedFar   share of canyon time spent aided and more than the alert limit off
     * @param windowInside95   inside95 of the windows, pooled over all lengths
     * @param windows          windows scored
     * @param warnedLate       windows whose error passed the alert limit before the state turned unreliable
     * @param median60M        median final error of the 60 s windows (m)
     * @param fusedRmsM        open-sky RMS of the fused position at used fixes (m)
     * @param rawRmsM          the raw fixes' RMS at the same times (m)
     */
    public record Row(String label, int drives, double falseConfidenceS, double aidedInside95,
                      double canyonAidedFar, double windowInside95, int windows, int warnedLate, double median60M,
                      double fusedRmsM, double rawRmsM) {
    }

    private EffectStudy() {
    }

    /** The simulation settings of a preset (null for none) on a drive of {@code minutes}. */
    static SimulationSettings settingsFor(Scenario sc, double minutes) {
        SimulationSettings base = SimulationSettings.defaults().withMinutes(minutes).withWarmUpS(120);
        return sc == null ? base : sc.applyTo(base);
    }

    /** Runs a preset (null: no effect) over seeds. */
    public static Row run(Scenario sc, Settings settings, long firstSeed, int seeds, double minutes) {
        double falseConf = 0;
        double aided = 0;
        double aidedIn = 0;
        double canyon = 0;
        double canyonFar = 0;
        double sqF = 0;
        double sqR = 0;
        List<WindowScore> windows = new ArrayList<>();
        List<ScoringRun.LogSource> sources = new ArrayList<>();
        for (int i = 0; i < seeds; i++) {
            SimulatedDrive d = DriveSimulator.simulate(settingsFor(sc, Math.max(minutes,
                    sc == null ? 0 : sc.minMinutes() + 3)), firstSeed + i);
            List<double[]> zones = new ArrayList<>();
            for (TimeWindow w : d.canyons()) {
                zones.add(new double[] {w.startT(), w.endT()});
            }
            DriveHonesty.Figures f = DriveHonesty.evaluate(d.samples(), settings, "default", zones);
            falseConf += f.falseConfidenceS();
            aided += f.aidedS();
            aidedIn += f.aidedS() * f.aidedInside95();
            canyon += f.zoneS();
            canyonFar += f.zoneAidedFarS();
            sqF += f.fusedRmsM() * f.fusedRmsM();
            sqR += f.rawRmsM() * f.rawRmsM();
            sources.add(HonestyStudyMain.source("seed" + (firstSeed + i), d.samples()));
        }
        List<ScoringRun.LogScores> logs = ScoringRun.run(sources,
                List.of(new ScoringRun.NamedSettings("default", "study", settings)),
                new ScoringRun.Options(new WindowPlan.Schedule(LENGTHS_S, 0, 60, 0, 0), 30, 0.1, "default", false, 2),
                ScoringRun.Listener.NONE);
        for (ScoringRun.LogScores l : logs) {
            windows.addAll(l.configs().get(0).windows());
        }
        double inside = windows.stream().mapToDouble(w -> w.inside95() * w.samples()).sum()
                / windows.stream().mapToDouble(WindowScore::samples).sum();
        int late = (int) windows.stream().filter(WindowScore::warnedLate).count();
        double[] finals60 = windows.stream().filter(w -> w.window().lengthS() == 60)
                .mapToDouble(WindowScore::finalErrorM).toArray();
        return new Row(sc == null ? "none" : sc.label(), seeds, falseConf, aidedIn / aided,
                canyon == 0 ? Double.NaN : canyonFar / canyon, inside, windows.size(), late,
                org.wayhold.scoring.Quantiles.of(finals60, 0.5), Math.sqrt(sqF / seeds), Math.sqrt(sqR / seeds));
    }

}
