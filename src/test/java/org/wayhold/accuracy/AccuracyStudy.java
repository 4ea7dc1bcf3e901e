package org.wayhold.accuracy;

import java.util.ArrayList;
import java.util.List;
import org.wayhold.filter.FilterSnapshot;
import org.wayhold.pipeline.TrackOutput;
import org.wayhold.pipeline.VehicleTrack;
import org.wayhold.geo.Enu;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.scoring.OutageReplay;
import org.wayhold.scoring.OutageWindow;
import org.wayhold.scoring.Quantiles;
import org.wayhold.scoring.WindowScore;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;
import org.wayhold.simulate.Truth;

/**
 * Runs the filter over seeded simulated drives with outage windows and gathers the figures the fusion
 * core's accuracy targets speak of. Shared by the acceptance test and the tuning tool.
 */
final class AccuracyStudy {

    static final double[] LENGTHS_S = {10, 30, 60, 120};
    /** Aided driving before the first window (s): the targets ask for at least 2 minutes. */
    static final double FIRST_START_S = 150;
    /** Spacing of window starts (s): longer than the longest window, so each starts after 30 s aided. */
    static final double SPACING_S = 150;

    record LengthFigures(double lengthS, int count, double medianFinalM, double p95FinalM, double medianPct,
                         double inside95, double meanNees, int warnedLate, int pastLimit) {
    }

    record Figures(List<LengthFigures> lengths, double openSkyRmsM, double rawFixRmsM, double maxBiasErrDegPerS,
                   double maxScaleErr, double openSkyNees, double[] openSkyNeesPerDrive,
                   List<WindowScore> firstWindows, List<WindowScore> all) {
    }

    private AccuracyStudy() {
    }

    static Figures run(Settings settings, int drives, double minutes, long seed0) {
        List<WindowScore> all = new ArrayList<>();
        double sqFused = 0;
        double sqRaw = 0;
        long nFused = 0;
        long nRaw = 0;
        double maxBiasErr = 0;
        double maxScaleErr = 0;
        double neesSum = 0;
        double[] neesPerDrive = new double[drives];
        List<WindowScore> firstWindows = new ArrayList<>();
        for (int d = 0; d < drives; d++) {
            SimulationSettings sim = SimulationSettings.defaults().withMinutes(minutes);
            SimulatedDrive drive = DriveSimulator.simulate(sim, seed0 + d);
            List<OutageWindow> windows = new ArrayList<>();
            for (double start = drive.startT() + FIRST_START_S; start + 120 <= drive.endT() - 1;
                 start += SPACING_S) {
                for (double len : LENGTHS_S) {
                    windows.add(new OutageWindow(start, len));
                }
            }
            OutageReplay replay = new OutageReplay(settings, settings.profileFor("default"), drive.frame().origin(), 0.1);
            List<WindowScore> scores = replay.run(drive.samples(), windows, new SimulatedReference(drive), false)
                    .scores();
            all.addAll(scores);
            // One window per length and drive is independent of the other drives: the runs for NEES.
            double firstStart = scores.get(0).window().startT();
            scores.stream().filter(w -> w.window().startT() == firstStart).forEach(firstWindows::add);

            // Open sky: the main filter against truth and the raw fixes against truth, after 60 s.
            VehicleTrack f = new VehicleTrack(settings, settings.profileFor("default"), drive.frame().origin(),
                    TrackOutput.NONE);
            boolean calibrationChecked = false;
            for (Sample s : drive.samples()) {
                f.apply(s);
                if (s instanceof GnssFix g && s.t() - drive.startT() > 60) {
                    Truth truth = drive.truthAt(s.t());
                    FilterSnapshot snap = f.snapshot();
                    double de = snap.eastM() - truth.eastM();
                    double dn = snap.northM() - truth.northM();
                    sqFused += de * de + dn * dn;
                    double det = snap.covEastEastM2() * snap.covNorthNorthM2() - sq(snap.covEastNorthM2());
                    neesSum += (snap.covNorthNorthM2() * de * de - 2 * snap.covEastNorthM2() * de * dn
                            + snap.covEastEastM2() * dn * dn) / det;
                    nFused++;
                    Enu raw = drive.frame().toEnu(g.latDeg(), g.lonDeg(), g.hasAlt() ? g.altM() : 0);
                    sqRaw += sq(raw.eastM() - truth.eastM()) + sq(raw.northM() - truth.northM());
                    nRaw++;
                    if (!calibrationChecked && s.t() >= drive.startT() + FIRST_START_S) {
                        neesPerDrive[d] = (snap.covNorthNorthM2() * de * de - 2 * snap.covEastNorthM2() * de * dn
                                + snap.covEastEastM2() * dn * dn) / det;
                        calibrationChecked = true;
                        double biasErr = Math.abs(snap.gyroBiasRadPerS() - drive.gyroBiasRadPerSAt(s.t()));
                        maxBiasErr = Math.max(maxBiasErr, Math.toDegrees(biasErr));
                        // Wheel speed = (1 + e) v, so the true scale is 1 / (1 + e).
                        double trueScale = 1.0 / (1.0 + drive.speedScaleError());
                        maxScaleErr = Math.max(maxScaleErr, Math.abs(snap.speedScale() - trueScale));
                    }
                }
            }
        }
        List<LengthFigures> lengths = new ArrayList<>();
        for (double len : LENGTHS_S) {
            List<WindowScore> w = all.stream().filter(s -> s.window().lengthS() == len).toList();
            double[] fin = w.stream().mapToDouble(WindowScore::finalErrorM).toArray();
            double[] pct = w.stream().mapToDouble(WindowScore::errorPct).toArray();
            double inside = w.stream().mapToDouble(s -> s.inside95() * s.samples()).sum()
                    / w.stream().mapToDouble(WindowScore::samples).sum();
            double nees = w.stream().mapToDouble(s -> s.meanNees() * s.samples()).sum()
                    / w.stream().mapToDouble(WindowScore::samples).sum();
            int late = (int) w.stream().filter(WindowScore::warnedLate).count();
            int pastLimit = (int) w.stream().filter(s -> !Double.isNaN(s.timeToLimitS())).count();
            lengths.add(new LengthFigures(len, w.size(), Quantiles.of(fin, 0.5), Quantiles.of(fin, 0.95),
                    Quantiles.of(pct, 0.5), inside, nees, late, pastLimit));
        }
        return new Figures(lengths, Math.sqrt(sqFused / nFused), Math.sqrt(sqRaw / nRaw), maxBiasErr, maxScaleErr,
                neesSum / nFused, neesPerDrive, firstWindows, all);
    }

    private static double sq(double v) {
        return v * v;
    }
}
