package org.wayhold.report;

import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.math.BigDecimal;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.List;
import java.util.Locale;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.ReferencePoint;
import org.wayhold.sample.Sample;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;
import org.wayhold.scoring.ScoringRun;
import org.wayhold.scoring.WindowPlan;
import org.wayhold.settings.GatingSettings;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;

/**
 * A report must explain itself: keys with their units, the contract's v2 names (no terms that mean
 * something else in integrity monitoring), every planned window accounted for, times at the log's own
 * precision, one number per table cell, drift per log as well as pooled. The rules are the project's
 * own (the v2 interface contract); each test states the one it holds, and expected values come from the
 * schedule's arithmetic or from the log itself.
 */
class ReportExplainsItselfTest {

    private static final ObjectMapper JSON = new ObjectMapper();
    /** A time shift that gives every sample time six decimals (s). */
    private static final double SHIFT_S = 0.000351;

    private static Path dir;
    private static ReportModel model;
    private static JsonNode json;
    private static String html;
    private static List<String> csv;
    private static List<Sample> shifted;

    @BeforeAll
    static void score(@TempDir Path tmp) throws Exception {
        dir = tmp;
        SimulatedDrive a = DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(6).withWarmUpS(100)
                .withTunnelsS(40), 91L);
        SimulatedDrive b = DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(5).withWarmUpS(100), 92L);
        shifted = new ArrayList<>();
        for (Sample s : a.samples()) {
            shifted.add(shift(s, SHIFT_S));
        }
        List<ScoringRun.NamedSettings> configs = List.of(
                new ScoringRun.NamedSettings("default", "built-in defaults", Settings.defaults()),
                new ScoringRun.NamedSettings("strict", "strict.yaml", new Settings(Settings.defaults().server(),
                        Settings.defaults().filter(), new GatingSettings(0.99, 4), Settings.defaults().outage(),
                        Settings.defaults().ordering(), Settings.defaults().history(), java.util.Map.of())));
        ScoringRun.Options o = new ScoringRun.Options(new WindowPlan.Schedule(new double[] {10, 30, 60}, 0, 30, 0, 0),
                45, 0.1, "default", true, 2);
        List<ScoringRun.LogSource> sources = List.of(source("shifted", shifted), source("plain", b.samples()));
        model = ReportModel.of(ScoringRun.run(sources, configs, o, ScoringRun.Listener.NONE), configs, o, ReportTest.RUN);
        ReportFiles.write(model, dir);
        json = JSON.readTree(dir.resolve(ReportFiles.JSON).toFile());
        html = Files.readString(dir.resolve(ReportFiles.HTML));
        csv = Files.readAllLines(dir.resolve(ReportFiles.CSV), StandardCharsets.UTF_8);
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

    private static Sample shift(Sample s, double dt) {
        if (s instanceof GnssFix f) {
            return new GnssFix(f.t() + dt, f.latDeg(), f.lonDeg(), f.altM(), f.sigmaHM(), f.sigmaVM(), f.fix(),
                    f.sats(), f.hdop(), f.speedMps(), f.courseDeg());
        } else if (s instanceof WheelSpeed w) {
            return new WheelSpeed(w.t() + dt, w.speedMps());
        } else if (s instanceof YawRate y) {
            return new YawRate(y.t() + dt, y.yawRateRadPerS());
        } else if (s instanceof ReferencePoint r) {
            return new ReferencePoint(r.t() + dt, r.latDeg(), r.lonDeg(), r.altM(), r.headingDeg());
        }
        throw new AssertionError("unexpected sample " + s);
    }

    /** Rule: each key of an outage entry names its unit, or is a count, a fraction, a name or a flag. */
    @Test
    void everyKeyOfAWindowCarriesItsUnitAndTheCsvUsesTheSameKeys() {
        Pattern withUnit = Pattern.compile(".*_(t|s|m|pct|lat|lon)$");
        List<String> unitless = List.of("log", "config", "kind", "reference", "inside95", "mean_nees", "final_nees",
                "evaluations", "warned_late", "smoothed_inside95", "smoothed_mean_nees", "smoothed_fixes_after",
                "gap_fill_ratio");
        List<String> keys = new ArrayList<>();
        json.get("outages").get(0).fieldNames().forEachRemaining(keys::add);
        for (String k : keys) {
            assertThat(withUnit.matcher(k).matches() || unitless.contains(k)).as("key %s", k).isTrue();
        }
        assertThat(keys).contains("start_t", "length_s", "distance_m", "final_error_m", "max_error_m", "error_pct",
                "inside95", "mean_nees", "end_lat", "end_lon", "time_to_limit_s", "time_to_unreliable_s",
                "warned_late", "smoothed_final_error_m", "smoothed_max_error_m", "smoothed_inside95", "gap_fill_ratio");
        assertThat(List.of(csv.get(0).split(","))).containsExactlyInAnyOrderElementsOf(keys);
        for (Iterator<String> it = json.get("summary").get(0).fieldNames(); it.hasNext(); ) {
            String k = it.next();
            assertThat(withUnit.matcher(k).matches() || k.endsWith("_count") || List.of("config", "count",
                    "inside95", "mean_nees", "smoothed_inside95", "median_gap_fill_ratio").contains(k))
                    .as("summary key %s", k).isTrue();
        }
    }

    /**
     * Rule: "time to alert", "missed alert", "protection level" and "integrity" mean other things in
     * integrity monitoring (the time to alarm a user of a loss of integrity, a missed detection of a
     * hazard), so none of the report's files uses them for these figures.
     */
    @Test
    void theIntegrityMonitoringTermsAreNotUsedForTheseFigures() throws Exception {
        for (String file : List.of(ReportFiles.JSON, ReportFiles.CSV, ReportFiles.HTML)) {
            String text = Files.readString(dir.resolve(file)).toLowerCase(Locale.ROOT);
            for (String term : List.of("time to alert", "time_to_alert", "missed alert", "missed_alert",
                    "protection level", "integrity")) {
                assertThat(text).as("%s uses '%s'", file, term).doesNotContain(term);
            }
        }
    }

    /**
     * Rule: every window the fixed schedule plans is either scored or listed with its reason. Planned:
     * one window of each length at every 30 s grid time from the log's first sample (the schedule's
     * arithmetic); scored and listed together must be exactly that, and the tunnel and the end of the
     * log must show as reasons.
     */
    @Test
    void everyPlannedWindowIsScoredOrListedWithItsReason() {
        for (ScoringRun.LogScores log : model.logs()) {
            int gridTimes = (int) Math.floor((log.endT() - log.startT()) / 1.0) + 1;
            int starts = (gridTimes + 29) / 30;
            long scored = log.configs().get(0).windows().size();
            int listed = log.unscored().stream().mapToInt(u -> u.count()).sum();
            assertThat(scored + listed).as("log %s", log.name()).isEqualTo(3L * starts);
        }
        List<String> reasons = new ArrayList<>();
        json.get("unscored_windows").forEach(u -> reasons.add(u.get("reason").asText()));
        assertThat(reasons).contains("overlaps_real_gap", "beyond_log_end");
        assertThat(json.get("unscored_windows").get(0).get("reason_text").asText()).isNotBlank();
        Matcher section = Pattern.compile("(?s)<section id=\"unscored\">(.*?)</section>").matcher(html);
        assertThat(section.find()).isTrue();
        assertThat(section.group(1)).contains(HtmlReport.esc("it overlaps a real gap in the log's fixes"))
                .contains(HtmlReport.esc("it would end after the log's last GNSS fix"));
        assertThat(section.group(1)).contains(model.unscoredCount() + " planned windows were not scored");
    }

    /**
     * Rule: times are given at the log's own precision. The shifted log's times have six decimals; a real
     * gap starts at the last fix before it, and the report must give that time exactly as the log has it
     * (it reads back as the same double), not rounded to a tenth or a thousandth of a second.
     */
    @Test
    void timesAreGivenAtTheLogsOwnPrecision() {
        JsonNode log = json.get("logs").get(0);
        assertThat(log.get("time_decimals").asInt()).isGreaterThanOrEqualTo(6);
        double gapStart = log.get("real_gaps").get(0).get("start_t").asDouble();
        double lastFixBefore = shifted.stream().filter(s -> s instanceof GnssFix && s.t() <= gapStart + 1e-3)
                .mapToDouble(Sample::t).max().orElseThrow();
        assertThat(gapStart).isEqualTo(lastFixBefore);
        for (JsonNode o : json.get("outages")) {
            if (o.get("kind").asText().equals("real_gap") && o.get("log").asText().equals("shifted")) {
                BigDecimal start = o.get("start_t").decimalValue();
                assertThat(start.doubleValue()).isEqualTo(lastFixBefore);
                assertThat(start.scale()).isGreaterThanOrEqualTo(6);
            }
        }
        ScoringRun.LogScores l = model.logs().get(0);
        String offset = String.format(Locale.ROOT, "%." + l.timeDecimals() + "f", lastFixBefore - l.startT());
        assertThat(html).contains("<td>" + offset + "</td>");
    }

    /** Rule: a comparison or summary cell holds one number, never "a / b / c". */
    @Test
    void tablesHoldOneNumberPerCell() {
        Matcher cell = Pattern.compile("<td[^>]*>([^<]*)</td>").matcher(html);
        int cells = 0;
        while (cell.find()) {
            cells++;
            assertThat(cell.group(1)).doesNotContain(" / ");
        }
        assertThat(cells).isGreaterThan(100);
        Matcher cmp = Pattern.compile("(?s)<section id=\"comparison\">(.*?)</section>").matcher(html);
        assertThat(cmp.find()).isTrue();
        assertThat(cmp.group(1)).contains("<th>first</th><th>this</th><th>difference</th>");
        JsonNode c = json.get("comparison").get(0).get("median_final_error_m");
        assertThat(c.get("difference").asDouble()).isCloseTo(c.get("config").asDouble() - c.get("baseline").asDouble(),
                org.assertj.core.data.Offset.offset(2e-4));
    }

    /** Rule: drift is summed up per log as well as over all logs, and the drift plot shows both. */
    @Test
    void driftIsGivenPerLogAsWellAsPooled() {
        List<String> logs = new ArrayList<>();
        json.get("summary_by_log").forEach(s -> logs.add(s.get("log").asText()));
        assertThat(logs).contains("shifted", "plain");
        assertThat(json.get("summary_by_log").size()).isEqualTo(2 * 2 * 3);
        Matcher drift = Pattern.compile("(?s)<section id=\"drift\">(.*?)</section>").matcher(html);
        assertThat(drift.find()).isTrue();
        assertThat(drift.group(1)).contains("shifted default median").contains("plain strict median")
                .contains("default median, all logs");
        // Per log and length, the pooled figure lies between the logs' (a median of the union does).
        assertThat(html).contains("<h3>Per log</h3>");
    }

    /** The inputs and the run are recorded in the JSON and the HTML. */
    @Test
    void theRunAndTheConfigurationsAreRecorded() {
        assertThat(json.get("report").get("version").asText()).isEqualTo(ReportTest.RUN.version());
        assertThat(json.get("report").get("command_line").asText()).isEqualTo(ReportTest.RUN.commandLine());
        assertThat(json.get("report").get("date").asText()).isEqualTo(ReportTest.RUN.date());
        assertThat(html).contains(HtmlReport.esc(ReportTest.RUN.commandLine())).contains(ReportTest.RUN.date());
        List<String> kinds = new ArrayList<>();
        json.get("inputs").forEach(i -> kinds.add(i.get("kind").asText() + ":" + i.get("rejected_lines").asInt()));
        assertThat(kinds).containsExactly("config:0", "config:0");
    }
}
