package org.wayhold.accuracy;

import static org.assertj.core.api.Assertions.assertThat;

import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.wayhold.fusion.DriveFusion;
import org.wayhold.fusion.FusedDrive;
import org.wayhold.scoring.LengthSummary;
import org.wayhold.scoring.ScoringRun;
import org.wayhold.scoring.WindowPlan;
import org.wayhold.scoring.WindowScore;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;

/**
 * The smoother's targets on seeded simulated drives (the simulator's default sensors, tunnels of 60,
 * 90 and 120 s), the project's own requirements:
 * <ul>
 *   <li>the smoothed covariance is honest: the share of points whose true position lies inside the
 *       smoothed 95% ellipse is within [0.90, 0.99], the band a consistent estimate keeps for 100
 *       independent trials at 95% (binomial; Bar-Shalom, Li, Kirubarajan, <i>Estimation with
 *       Applications to Tracking and Navigation</i>, 2001, sec. 5.4), used here as the target for the
 *       pooled points;</li>
 *   <li>gap fill: for outages of 60 to 120 s the smoothed worst in-window error is at most 0.3 times the
 *       forward filter's final error, in median over the windows.</li>
 * </ul>
 * The truth is the simulator's, carried into the session's frame (its origin is the first fix).
 */
class SmoothingHonestyTest {

    private static final Settings SETTINGS = Settings.defaults();

    @Test
    void theSmoothedEllipseHoldsTheTruthAsOftenAsItClaimsOnSimulatedDrives() {
        int points = 0;
        int inside = 0;
        int gapPoints = 0;
        for (long seed = 1; seed <= 6; seed++) {
            SimulatedDrive d = DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(12).withWarmUpS(120)
                    .withTunnelsS(60, 90, 120), seed);
            FusedDrive f = DriveFusion.fuse("sim", d.samples(), SETTINGS, SETTINGS.profileFor("default"), true);
            SmoothingHonesty.Figures sm = SmoothingHonesty.of(f.smoothed(), SmoothingHonesty.truth(f, d));
            points += sm.points();
            inside += sm.insideCount();
            gapPoints += sm.gapPoints();
        }
        assertThat(gapPoints).as("points in tunnels").isGreaterThan(5000);
        assertThat((double) inside / points).as("smoothed inside95 over %d points", points).isBetween(0.90, 0.99);
    }

    @Test
    void theSmoothedGapFillTakesBackMostOfTheDriftOfLongOutages() {
        List<ScoringRun.LogSource> logs = new ArrayList<>();
        for (long seed = 1; seed <= 6; seed++) {
            logs.add(HonestyStudyMain.source("sim-" + seed,
                    DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(20), seed).samples()));
        }
        List<ScoringRun.LogScores> scored = ScoringRun.run(logs,
                List.of(new ScoringRun.NamedSettings("default", "built-in defaults", SETTINGS)),
                new ScoringRun.Options(new WindowPlan.Schedule(new double[] {60, 90, 120}, 0, 120, 0, 0), 60, 0.1,
                        "default", false, 2), ScoringRun.Listener.NONE);
        List<WindowScore> windows = new ArrayList<>();
        scored.forEach(l -> windows.addAll(l.configs().get(0).windows()));
        LengthSummary pooled = LengthSummary.of(0, windows);
        assertThat(pooled.count()).isGreaterThan(80);
        assertThat(windows).allMatch(w -> w.smoothed().fixesAfter() > 100);
        assertThat(pooled.medianGapFillRatio()).as("median gap-fill ratio").isLessThanOrEqualTo(0.3);
        assertThat(pooled.smoothedInside95()).as("smoothed inside95 in the windows").isBetween(0.90, 0.99);
    }
}
