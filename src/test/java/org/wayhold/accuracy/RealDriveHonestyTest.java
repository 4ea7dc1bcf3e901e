package org.wayhold.accuracy;

import static org.assertj.core.api.Assertions.assertThat;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.Sample;
import org.wayhold.scoring.Quantiles;
import org.wayhold.scoring.ScoringRun;
import org.wayhold.scoring.WindowPlan;
import org.wayhold.scoring.WindowScore;
import org.wayhold.settings.Settings;

/**
 * Honesty on real drives, whose errors are nobody's model: two KITTI drives (Geiger et al., "Vision
 * meets Robotics: The KITTI Dataset", IJRR 2013) as converted in {@code ../shared/real-drives}, with
 * their {@code _degraded} variant, a 2 % gyro scale error made from it, and the drive with a heading
 * glitch ({@code _asis}) and with dropped fixes. Skipped, with the reason, when the drives are absent.
 *
 * <p>Targets (DEVELOPERS.md, "Targets the tests hold"): never above the alert limit while claiming to
 * be within it; inside95 of the 10, 30 and 60 s windows (every 60 s, 30 s aided) at least 0.90; no
 * window warned late; 60 s median final error at most 4 m (5 m with the gyro scale error); the fused
 * open-sky RMS below the raw fixes'; after the glitch, no stretch over 10 s with the error above 5 m and
 * outside the 95 % ellipse. With about ten windows per length a binomial 95 % band for a consistent
 * filter reaches down to 0.80 (Commons Math 3.6.1 BinomialDistribution(10, 0.95)), so the 0.90 floor is
 * already strict and no upper bound is asserted.
 */
class RealDriveHonestyTest {

    private static final Settings SETTINGS = Settings.defaults();
    private static final Map<String, List<Sample>> DRIVES = new LinkedHashMap<>();
    private static final Map<String, DriveHonesty.Figures> FIGURES = new LinkedHashMap<>();
    private static final Map<String, List<WindowScore>> WINDOWS = new LinkedHashMap<>();

    @BeforeAll
    static void replay() {
        if (!RealDrives.present()) {
            return;
        }
        for (String d : new String[] {"0027", "0034"}) {
            DRIVES.put(d + "_real", RealDrives.read("kitti_10_03_drive_" + d + "_real"));
            List<Sample> degraded = RealDrives.read("kitti_10_03_drive_" + d + "_degraded");
            DRIVES.put(d + "_degraded", degraded);
            DRIVES.put(d + "_gyro2pct", RealDrives.withGyroScaleError(degraded, 0.02));
        }
        DRIVES.put("0027_asis", RealDrives.read("kitti_10_03_drive_0027_asis"));
        DRIVES.put("0027_dropped", RealDrives.read("kitti_10_03_drive_0027_dropped"));
        for (Map.Entry<String, List<Sample>> e : DRIVES.entrySet()) {
            FIGURES.put(e.getKey(), DriveHonesty.evaluate(e.getValue(), SETTINGS, "default"));
        }
        for (String group : List.of("real", "degraded", "gyro2pct")) {
            List<ScoringRun.LogSource> sources = new ArrayList<>();
            DRIVES.forEach((name, samples) -> {
                if (name.endsWith("_" + group)) {
                    sources.add(HonestyStudyMain.source(name, samples));
                }
            });
            List<WindowScore> w = new ArrayList<>();
            for (ScoringRun.LogScores l : ScoringRun.run(sources,
                    List.of(new ScoringRun.NamedSettings("default", "built-in defaults", SETTINGS)),
                    new ScoringRun.Options(new WindowPlan.Schedule(new double[] {10, 30, 60}, 0, 60, 0, 0), 30, 0.1,
                            "default", false, 2), ScoringRun.Listener.NONE)) {
                w.addAll(l.configs().get(0).windows());
            }
            WINDOWS.put(group, w);
        }
    }

    private static void requireDrives() {
        assumeTrue(RealDrives.present(), RealDrives.absentMessage());
    }

    @Test
    void neverAboveTheAlertLimitWhileClaimingToBeWithinIt() {
        requireDrives();
        FIGURES.forEach((name, f) -> assertThat(f.falseConfidenceS()).as(name).isZero());
    }

    @Test
    void windowsHoldTheTruthInsideTheirEllipseAndTurnUnreliableInTime() {
        requireDrives();
        WINDOWS.forEach((group, w) -> {
            for (double len : new double[] {10, 30, 60}) {
                List<WindowScore> l = w.stream().filter(x -> x.window().lengthS() == len).toList();
                assertThat(l).as("%s %s s", group, len).hasSizeGreaterThanOrEqualTo(8);
                double inside = l.stream().mapToDouble(WindowScore::inside95).average().orElseThrow();
                assertThat(inside).as("inside95 of %s %s s windows", group, len).isGreaterThanOrEqualTo(0.90);
                assertThat(l.stream().filter(WindowScore::warnedLate).count()).as("%s %s s warned late", group, len)
                        .isZero();
            }
        });
    }

    @Test
    void sixtySecondDriftStaysWithinTheTargets() {
        requireDrives();
        WINDOWS.forEach((group, w) -> {
            double[] finals = w.stream().filter(x -> x.window().lengthS() == 60).mapToDouble(WindowScore::finalErrorM)
                    .toArray();
            assertThat(Quantiles.of(finals, 0.5)).as("60 s median final error of %s (m)", group)
                    .isLessThanOrEqualTo(group.equals("gyro2pct") ? 5.0 : 4.0);
        });
    }

    @Test
    void fusionBeatsTheRawFixesUnderOpenSky() {
        requireDrives();
        FIGURES.forEach((name, f) -> assertThat(f.fusedRmsM()).as(name).isLessThan(f.rawRmsM()));
    }

    @Test
    void aHeadingGlitchOrDroppedFixesLeaveNoLongStretchOfFalseConfidence() {
        requireDrives();
        for (String name : List.of("0027_asis", "0027_dropped")) {
            assertThat(FIGURES.get(name).longestOverS()).as(name).isLessThanOrEqualTo(10.0);
        }
    }
}
