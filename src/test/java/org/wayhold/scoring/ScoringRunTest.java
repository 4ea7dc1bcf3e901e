package org.wayhold.scoring;

import static org.assertj.core.api.Assertions.assertThat;

import java.util.ArrayList;
import java.util.List;
import org.wayhold.pipeline.TrackOutput;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.ReferencePoint;
import org.wayhold.sample.Sample;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.Route;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;
import org.wayhold.simulate.TimeWindow;

class ScoringRunTest {

    private static final double[] LENGTHS = {10, 30};

    @Test
    void scoringFromSurveyedStatesGivesExactlyTheScoresOfAFullReplay() {
        SimulatedDrive drive = SimulatedLogs.drive(8, 3L, 30);
        List<Sample> samples = drive.samples();
        Settings s = Settings.defaults();
        double startT = samples.get(0).t();
        DriveSurvey survey = DriveSurvey.run(samples, s, s.profileFor("default"), drive.frame().origin(),
                startT, 1.0, 30, new double[0], TrackOutput.NONE, ProgressListener.NONE);
        WindowPlan plan = WindowPlan.choose(new WindowPlan.Schedule(LENGTHS, 0, 20, 0, 0),
                new WindowPlan.Log(startT, 1.0, survey.gridCount(), GnssGaps.firstFixT(samples),
                        GnssGaps.lastFixT(samples), GnssGaps.find(samples, 1.5), survey.odometryGaps(),
                        survey::startAllowed), 0);
        assertThat(plan.windows()).hasSizeGreaterThan(10);
        List<OutageReplay.Start> starts = new ArrayList<>();
        for (OutageWindow w : plan.windows()) {
            starts.add(new OutageReplay.Start(w, survey.gridState((int) Math.round(w.startT() - startT))));
        }
        InterpolatedTrack track = InterpolatedTrack.ofReference(drive.samplesOf(ReferencePoint.class), drive.frame(),
                1.0);
        OutageReplay replay = new OutageReplay(s, s.profileFor("default"), drive.frame().origin(), 0.1);
        OutageReplay.Result full = replay.run(samples, plan.windows(), track, true);
        OutageReplay.Result fromStates = replay.runFrom(samples, starts, track, true, ProgressListener.NONE);
        // Record equality compares every double bit for bit (Double.compare), NaN included.
        assertThat(fromStates.scores()).hasSize(plan.windows().size()).isEqualTo(full.scores());
        assertThat(fromStates.traces()).isEqualTo(full.traces());
    }

    @Test
    void windowsNeverOverlapRealGapsAndStartOnlyAfterTheMinimumAidedTime() {
        SimulatedDrive drive = SimulatedLogs.drive(8, 5L, 40, 25);
        double minAided = 45;
        List<ScoringRun.LogScores> r = ScoringRun.run(List.of(SimulatedLogs.source("tunnels", drive.samples())),
                SimulatedLogs.defaults(),
                SimulatedLogs.options(new WindowPlan.Schedule(new double[] {10, 30, 60}, 0, 20, 0, 0), minAided,
                        false), ScoringRun.Listener.NONE);
        ScoringRun.LogScores log = r.get(0);
        // The simulator's tunnels are the real gaps (each a little longer: the last fix before and the
        // first after lie outside the tunnel).
        assertThat(log.gaps()).hasSize(2);
        for (int i = 0; i < 2; i++) {
            TimeWindow tunnel = drive.tunnels().get(i);
            assertThat(log.gaps().get(i).startT()).isLessThanOrEqualTo(tunnel.startT());
            assertThat(log.gaps().get(i).endT()).isGreaterThanOrEqualTo(tunnel.endT());
        }
        List<TimeSpan> aided = log.configs().get(0).aidedSpans();
        assertThat(log.plan().windows()).isNotEmpty();
        assertThat(log.plan().skipped()).isPositive();
        for (OutageWindow w : log.plan().windows()) {
            for (TimeSpan g : log.gaps()) {
                assertThat(g.overlaps(w.startT(), w.endT())).as("window %s overlaps gap %s", w, g).isFalse();
            }
            assertThat(aided).as("aided %s s before %s", minAided, w)
                    .anyMatch(a -> a.startT() + minAided <= w.startT() && a.endT() >= w.startT() - 1.0);
        }
        // The real gaps are scored from just after their last fix to their first fix after.
        List<WindowScore> gaps = log.configs().get(0).realGaps();
        assertThat(gaps).hasSize(2);
        assertThat(gaps.get(0).window().startT()).isEqualTo(Math.nextUp(log.gaps().get(0).startT()));
        assertThat(gaps.get(0).window().endT()).isCloseTo(log.gaps().get(0).endT(), org.assertj.core.data.Offset.offset(1e-6));
        assertThat(log.reference()).isEqualTo(ScoringRun.ReferenceKind.REFERENCE);
    }

    @Test
    void randomWindowsAreReproducibleBySeedAndDifferBetweenSeeds() {
        SimulatedDrive drive = SimulatedLogs.drive(6, 7L, 30);
        List<OutageWindow> a = plan(drive, 42L);
        List<OutageWindow> b = plan(drive, 42L);
        List<OutageWindow> c = plan(drive, 43L);
        assertThat(a).hasSize(3 * 5).isEqualTo(b).isNotEqualTo(c);
        // Distinct starts within a length: drawn without replacement.
        for (double len : new double[] {10, 30, 60}) {
            assertThat(a.stream().filter(w -> w.lengthS() == len).map(OutageWindow::startT).distinct().count())
                    .isEqualTo(5);
        }
    }

    private static List<OutageWindow> plan(SimulatedDrive drive, long seed) {
        return ScoringRun.run(List.of(SimulatedLogs.source("d", drive.samples())), SimulatedLogs.defaults(),
                SimulatedLogs.options(new WindowPlan.Schedule(new double[] {10, 30, 60}, 0, 120, 5, seed), 60,
                        false), ScoringRun.Listener.NONE).get(0).plan().windows();
    }

    @Test
    void withoutReferenceLinesTheWithheldFixesAreTheReferenceAndOnlyTheirTimesAreEvaluated() {
        SimulatedDrive drive = SimulatedLogs.drive(5, 9L);
        List<Sample> samples = SimulatedLogs.withoutReference(drive.samples());
        ScoringRun.LogScores log = ScoringRun.run(List.of(SimulatedLogs.source("fixes", samples)),
                SimulatedLogs.defaults(), SimulatedLogs.options(new WindowPlan.Schedule(LENGTHS, 0, 30, 0, 0), 60,
                        true), ScoringRun.Listener.NONE).get(0);
        assertThat(log.reference()).isEqualTo(ScoringRun.ReferenceKind.WITHHELD_FIXES);
        List<Double> fixTimes = samples.stream().filter(GnssFix.class::isInstance).map(Sample::t).toList();
        ScoringRun.ConfigScores cs = log.configs().get(0);
        assertThat(cs.windows()).isNotEmpty();
        assertThat(cs.realGaps()).isEmpty();
        for (OutageReplay.WindowTrace t : cs.traces()) {
            assertThat(t.points()).allSatisfy(p -> assertThat(fixTimes).contains(p.t()));
            // 5 Hz fixes: a 10 s window holds 50 or 51 of them.
            assertThat(t.points().size()).isBetween((int) (5 * t.window().lengthS()), (int) (5 * t.window().lengthS()) + 1);
        }
        for (WindowScore w : cs.windows()) {
            assertThat(w.finalT()).isLessThanOrEqualTo(w.window().endT()).isGreaterThan(w.window().endT() - 0.2 - 1e-6);
        }
    }

    /**
     * Perfect sensors with inputs that stay constant (a straight road at 15 m/s, then a steady circle at
     * 12 m/s and 0.05 rad/s): the filter's held inputs are then exact, so what is left is the scoring's
     * own error, which must be below 1 cm. On the default route, whose speed and yaw rate change between
     * samples, the drift is decimetres: see {@link #perfectSensorsOnTheDefaultRouteDriftByHeldInputsAndCalibration}.
     */
    @Test
    void perfectSensorsWithConstantInputsDriftLessThanOneCentimetre() {
        for (Route route : List.of(Route.start(0.3, 15, 0).hold(360).build(),
                Route.start(-1.0, 12, 0.05).hold(360).build())) {
            SimulatedDrive drive = DriveSimulator.simulate(SimulationSettings.defaults().withDurationS(360)
                    .perfectSensors(), route, 21L);
            ScoringRun.LogScores log = ScoringRun.run(List.of(SimulatedLogs.source("perfect", drive.samples())),
                    SimulatedLogs.defaults(), SimulatedLogs.options(new WindowPlan.Schedule(new double[] {10, 30, 60},
                            0, 30, 0, 0), 60, false), ScoringRun.Listener.NONE).get(0);
            List<WindowScore> w = log.configs().get(0).windows();
            assertThat(w).hasSizeGreaterThan(20);
            assertThat(w).allSatisfy(s -> assertThat(s.maxErrorM()).as("window %s", s.window()).isLessThan(0.01));
        }
    }

    /**
     * The default route with perfect sensors (accelerations, turns, a standstill and a reversing move)
     * drifts by less than 1 cm in every window (DEVELOPERS.md, "Targets the tests hold"). It did not while the
     * filter held each reading until the next: a held input lags a changing one by half a reading
     * interval, which gave up to 1.07 m after 60 s on this drive (seed 21).
     */
    @Test
    void perfectSensorsOnTheDefaultRouteDriftLessThanOneCentimetre() {
        SimulatedDrive drive = DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(6).withWarmUpS(120)
                .perfectSensors(), 21L);
        ScoringRun.LogScores log = ScoringRun.run(List.of(SimulatedLogs.source("perfect", drive.samples())),
                SimulatedLogs.defaults(), SimulatedLogs.options(new WindowPlan.Schedule(new double[] {10, 30, 60}, 0,
                        30, 0, 0), 60, false), ScoringRun.Listener.NONE).get(0);
        List<WindowScore> w = log.configs().get(0).windows();
        assertThat(w).hasSizeGreaterThan(10);
        assertThat(w).allSatisfy(s -> assertThat(s.maxErrorM()).as("window %s", s.window()).isLessThan(0.01));
    }
}
