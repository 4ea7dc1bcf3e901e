package org.wayhold.report;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.function.Function;
import java.util.stream.Collectors;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.wayhold.sample.Sample;
import org.wayhold.sample.SampleType;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.scoring.OdometryGap;
import org.wayhold.scoring.OutageWindow;
import org.wayhold.scoring.ScoringRun;
import org.wayhold.scoring.UnscoredWindow;
import org.wayhold.scoring.WindowPlan;
import org.wayhold.scoring.WindowScore;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;
import org.wayhold.simulate.TimeWindow;

/**
 * A stretch where the wheel-speed readings stop is an odometry gap: a simulated outage over it would
 * measure the missing readings, so the plan leaves such windows out with their own reason and the
 * report says so; a real gap in the fixes with the odometry silent inside is scored and says for how
 * long. The logs are seeded simulated drives with readings cut out by hand; what must be refused
 * follows from the schedule's arithmetic, and what must stay is the same log without the cut.
 */
class OdometryGapReportTest {

    private static final ObjectMapper JSON = new ObjectMapper();
    private static final List<ScoringRun.NamedSettings> DEFAULTS =
            List.of(new ScoringRun.NamedSettings("default", "built-in defaults", Settings.defaults()));

    /** The samples without the wheel-speed readings from {@code fromRelS} to {@code toRelS} after the start. */
    private static List<Sample> withoutWheelSpeed(List<Sample> samples, double fromRelS, double toRelS) {
        double t0 = samples.get(0).t();
        List<Sample> out = new ArrayList<>();
        for (Sample s : samples) {
            double rel = s.t() - t0;
            if (!(s instanceof WheelSpeed && rel >= fromRelS && rel < toRelS)) {
                out.add(s);
            }
        }
        return out;
    }

    private static ScoringRun.LogSource source(String name, List<Sample> samples) {
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

    private static JsonNode logNode(JsonNode json, String name) {
        for (JsonNode l : json.get("logs")) {
            if (l.get("log").asText().equals(name)) {
                return l;
            }
        }
        throw new AssertionError("no log " + name);
    }

    /**
     * An 8-minute drive (120 s warm-up, no tunnel, seed 3) whose wheel speed is silent for 3 s from 300.31 s
     * after its start. Windows of 10 and 30 s every 20 s: those over [300.30, 303.32] s are the 30 s
     * window from 280 s and both windows from 300 s; every other window is scored as on the same drive
     * without the silence, and those that end before it with the same figures.
     */
    @Test
    void aWindowOverAThreeSecondWheelSpeedSilenceIsNotScoredWithItsReasonAndTheOthersAre(@TempDir Path dir)
            throws Exception {
        SimulatedDrive drive = DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(8).withWarmUpS(120),
                3L);
        List<Sample> plain = drive.samples();
        // Cut between readings (50 Hz from the start), not on one, so that rounding of times cannot move it.
        List<Sample> silenced = withoutWheelSpeed(plain, 300.31, 303.31);
        double t0 = plain.get(0).t();
        ScoringRun.Options o = new ScoringRun.Options(new WindowPlan.Schedule(new double[] {10, 30}, 0, 20, 0, 0),
                30, 0.1, "default", false, 2);
        List<ScoringRun.LogScores> logs = ScoringRun.run(List.of(source("plain", plain), source("silenced", silenced)),
                DEFAULTS, o, ScoringRun.Listener.NONE);
        ScoringRun.LogScores before = logs.get(0);
        ScoringRun.LogScores after = logs.get(1);

        assertThat(before.odometryGaps()).isEmpty();
        assertThat(after.odometryGaps()).singleElement().satisfies(g -> {
            assertThat(g.stream()).isEqualTo(SampleType.WHEEL_SPEED);
            // 50 Hz readings: the last before the cut at 300.30 s, the first after it at 303.32 s.
            assertThat(g.startT() - t0).isCloseTo(300.30, within(1e-6));
            assertThat(g.endT() - t0).isCloseTo(303.32, within(1e-6));
        });
        OdometryGap gap = after.odometryGaps().get(0);

        List<OutageWindow> scoredBefore = before.configs().get(0).windows().stream().map(WindowScore::window).toList();
        List<OutageWindow> over = scoredBefore.stream().filter(w -> gap.overlaps(w.startT(), w.endT())).toList();
        assertThat(over).containsExactlyInAnyOrder(new OutageWindow(t0 + 280, 30), new OutageWindow(t0 + 300, 10),
                new OutageWindow(t0 + 300, 30));
        List<OutageWindow> refused = after.unscored().stream()
                .filter(u -> u.reason() == UnscoredWindow.Reason.OVERLAPS_ODOMETRY_GAP)
                .map(u -> new OutageWindow(u.startT(), u.lengthS())).toList();
        assertThat(refused).containsExactlyInAnyOrderElementsOf(over);
        List<OutageWindow> scoredAfter = after.configs().get(0).windows().stream().map(WindowScore::window).toList();
        List<OutageWindow> expected = new ArrayList<>(scoredBefore);
        expected.removeAll(over);
        assertThat(scoredAfter).isEqualTo(expected);
        // Every other reason is as it was.
        assertThat(after.unscored().stream().filter(u -> u.reason() != UnscoredWindow.Reason.OVERLAPS_ODOMETRY_GAP))
                .containsExactlyElementsOf(before.unscored());
        // Windows that end before the silence see the same samples from the same start: the same figures.
        Map<OutageWindow, WindowScore> beforeByWindow = before.configs().get(0).windows().stream()
                .collect(Collectors.toMap(WindowScore::window, Function.identity()));
        List<WindowScore> earlier = after.configs().get(0).windows().stream()
                .filter(w -> w.window().endT() + o.smoothTailS() < gap.startT()).toList();
        assertThat(earlier).hasSizeGreaterThan(10)
                .allSatisfy(w -> assertThat(w).isEqualTo(beforeByWindow.get(w.window())));

        ReportModel model = ReportModel.of(logs, DEFAULTS, o, ReportTest.RUN);
        ReportFiles.write(model, dir);
        JsonNode json = JSON.readTree(dir.resolve(ReportFiles.JSON).toFile());
        List<JsonNode> listed = new ArrayList<>();
        json.get("unscored_windows").forEach(u -> {
            if (u.get("reason").asText().equals("overlaps_odometry_gap")) {
                listed.add(u);
            }
        });
        assertThat(listed).hasSize(3).allSatisfy(u -> {
            assertThat(u.get("log").asText()).isEqualTo("silenced");
            assertThat(u.get("reason_text").asText()).isEqualTo(UnscoredWindow.Reason.OVERLAPS_ODOMETRY_GAP.words());
        });
        JsonNode silencedLog = logNode(json, "silenced");
        assertThat(silencedLog.get("odometry_gaps")).singleElement().satisfies(g -> {
            assertThat(g.get("stream").asText()).isEqualTo("wheel_speed");
            assertThat(g.get("length_s").asDouble()).isCloseTo(gap.lengthS(), within(0.005));
        });
        assertThat(silencedLog.get("notes").toString()).contains("1 odometry gap").contains("overlaps_odometry_gap");
        assertThat(logNode(json, "plain").get("odometry_gaps")).isEmpty();
        assertThat(logNode(json, "plain").get("notes")).isEmpty();
        json.get("outages").forEach(r -> assertThat(r.get("odometry_gap_s").asDouble()).isZero());
        String html = Files.readString(dir.resolve(ReportFiles.HTML), StandardCharsets.UTF_8);
        String unscored = html.substring(html.indexOf("<section id=\"unscored\">"));
        assertThat(unscored).contains(HtmlReport.esc(UnscoredWindow.Reason.OVERLAPS_ODOMETRY_GAP.words()))
                .contains("<h3 id=\"odometry-gaps\">Odometry gaps</h3>").contains("wheel_speed");
        assertThat(Files.readAllLines(dir.resolve(ReportFiles.CSV)).get(0)).endsWith(",odometry_gap_s");
    }

    /**
     * A real gap in the fixes (a 40 s tunnel, seed 5) with the wheel speed silent for 3 s inside is still
     * scored, as the vehicle went through it, and its row gives the silent seconds: the odometry gap's
     * whole length, which lies inside the real gap.
     */
    @Test
    void aRealGapWithTheOdometrySilentInsideIsScoredAndSaysForHowLong(@TempDir Path dir) throws Exception {
        SimulatedDrive drive = DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(6).withWarmUpS(120)
                .withTunnelsS(40), 5L);
        double t0 = drive.samples().get(0).t();
        TimeWindow tunnel = drive.tunnels().get(0);
        double cutRel = tunnel.startT() - t0 + 15.01;
        List<Sample> samples = withoutWheelSpeed(drive.samples(), cutRel, cutRel + 3.0);
        ScoringRun.Options o = new ScoringRun.Options(new WindowPlan.Schedule(new double[] {10, 30}, 0, 30, 0, 0),
                30, 0.1, "default", false, 2);
        List<ScoringRun.LogScores> logs = ScoringRun.run(List.of(source("tunnel", samples)), DEFAULTS, o,
                ScoringRun.Listener.NONE);
        ScoringRun.LogScores log = logs.get(0);
        OdometryGap gap = log.odometryGaps().get(0);
        assertThat(log.odometryGaps()).hasSize(1);
        assertThat(log.gaps()).singleElement().satisfies(g -> assertThat(g.startT() < gap.startT()
                && gap.endT() < g.endT()).as("odometry gap %s inside real gap %s", gap, g).isTrue());
        List<WindowScore> real = log.configs().get(0).realGaps();
        assertThat(real).hasSize(1);
        assertThat(log.odometryGapS(real.get(0).window())).isCloseTo(gap.lengthS(), within(1e-9));
        assertThat(gap.lengthS()).isCloseTo(3.02, within(1e-6));

        ReportModel model = ReportModel.of(logs, DEFAULTS, o, ReportTest.RUN);
        ReportFiles.write(model, dir);
        JsonNode json = JSON.readTree(dir.resolve(ReportFiles.JSON).toFile());
        int realRows = 0;
        for (JsonNode r : json.get("outages")) {
            if (r.get("kind").asText().equals("real_gap")) {
                realRows++;
                assertThat(r.get("odometry_gap_s").asDouble()).isCloseTo(gap.lengthS(), within(0.005));
                assertThat(r.get("final_error_m").isNumber()).isTrue();
            } else {
                assertThat(r.get("odometry_gap_s").asDouble()).isZero();
            }
        }
        assertThat(realRows).isEqualTo(1);
        List<String> csv = Files.readAllLines(dir.resolve(ReportFiles.CSV));
        String realRow = csv.stream().filter(l -> l.contains(",real_gap,")).findFirst().orElseThrow();
        assertThat(Double.parseDouble(realRow.substring(realRow.lastIndexOf(',') + 1)))
                .isCloseTo(gap.lengthS(), within(0.005));
    }
}
