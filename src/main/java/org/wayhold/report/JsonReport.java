package org.wayhold.report;

import com.fasterxml.jackson.core.JsonGenerator;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.PropertyNamingStrategies;
import com.fasterxml.jackson.databind.SerializationFeature;
import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import java.io.IOException;
import java.io.OutputStream;
import java.nio.file.Files;
import java.nio.file.Path;
import org.wayhold.config.ConfigLoader;
import org.wayhold.scoring.InputFile;
import org.wayhold.scoring.LengthSummary;
import org.wayhold.scoring.OdometryGap;
import org.wayhold.scoring.ScoringRun;
import org.wayhold.scoring.TimeSpan;
import org.wayhold.scoring.UnscoredWindow;
import org.wayhold.scoring.WindowScore;

/**
 * Writes {@code report.json}. Every key carries its unit ({@code start_t}, {@code length_s},
 * {@code distance_m}, {@code final_error_m}, ...; {@code _pct} percent, {@code _lat}/{@code _lon}
 * WGS-84 degrees, counts and fractions without a suffix).
 *
 * <p>Top level: {@code report} (the tool's version and commit, the command line, the date),
 * {@code reference}, {@code inputs} (every file read, with its rejected-line count), {@code outages}
 * (one entry per scored window), {@code summary} (per outage length, all logs pooled),
 * {@code summary_by_log}, {@code comparison} (with several configurations), {@code unscored_windows}
 * (every planned window that was not scored, with the reason), {@code config} and {@code configs} (the
 * settings used, loadable with {@code --config}), {@code options} and {@code logs} (each with its real
 * gaps in the fixes, its odometry gaps and its notes). An outage entry's {@code odometry_gap_s} is the
 * seconds of it in which a wheel-speed or yaw-rate stream was silent: 0 for simulated windows, which
 * are never placed over an odometry gap; above 0 a real gap's error owes to the missing readings too.
 *
 * <p>Apart from {@code report.date} the output depends only on the inputs and options: fields in a
 * fixed order and numbers rounded to fixed decimals (metres to 0.1 mm, degrees to 1e-9, about 0.1 mm),
 * so the same seed gives the same file. Times are given at the log's own precision (the decimals of its
 * sample times), never rounded coarser. A quantity that does not exist (a limit that was never passed)
 * is null.
 */
public final class JsonReport {

    private static final ObjectMapper MAPPER = new ObjectMapper()
            .setPropertyNamingStrategy(PropertyNamingStrategies.SNAKE_CASE)
            .enable(SerializationFeature.INDENT_OUTPUT)
            .enable(JsonGenerator.Feature.WRITE_BIGDECIMAL_AS_PLAIN);

    private JsonReport() {
    }

    /** Writes the report to {@code file}. */
    public static void write(ReportModel m, Path file) throws IOException {
        try (OutputStream out = Files.newOutputStream(file)) {
            MAPPER.writeValue(out, tree(m));
        }
    }

    /** Decimals of a duration inside a window: the log's times' or the evaluation step's, the finer. */
    static int durationDecimals(int timeDecimals, double evalStepS) {
        return Math.max(timeDecimals, Math.max(0, new java.math.BigDecimal(Double.toString(evalStepS))
                .stripTrailingZeros().scale()));
    }

    /** The report as a JSON tree. */
    public static ObjectNode tree(ReportModel m) {
        ObjectNode root = MAPPER.createObjectNode();
        ObjectNode about = root.putObject("report");
        about.put("tool", "wayhold");
        about.put("version", m.run().version());
        about.put("commit", m.run().commit());
        about.put("command_line", m.run().commandLine());
        about.put("date", m.run().date());
        root.put("reference", m.referenceKind());
        ArrayNode inputs = root.putArray("inputs");
        for (ScoringRun.LogScores l : m.logs()) {
            for (InputFile f : l.inputs()) {
                ObjectNode o = inputs.addObject();
                o.put("file", f.path());
                o.put("kind", f.kind());
                o.put("log", l.name());
                o.put("accepted", f.accepted());
                o.put("rejected_lines", f.rejectedLines());
            }
        }
        for (ScoringRun.NamedSettings c : m.configs()) {
            ObjectNode o = inputs.addObject();
            o.put("file", c.source());
            o.put("kind", "config");
            o.put("config", c.name());
            // A configuration is read whole or refused whole: a bad key stops the run before scoring.
            o.put("rejected_lines", 0);
        }
        ArrayNode outages = root.putArray("outages");
        for (OutageRow r : m.rows()) {
            int td = r.timeDecimals();
            int dd = durationDecimals(td, m.options().evalStepS());
            ObjectNode o = outages.addObject();
            o.put("log", r.log());
            if (m.comparing()) {
                o.put("config", r.config());
            }
            o.put("kind", r.kind());
            num(o, "start_t", r.startT(), td);
            num(o, "start_offset_s", r.startOffsetS(), td);
            num(o, "length_s", r.lengthS(), td);
            num(o, "distance_m", r.distanceM(), 4);
            num(o, "final_error_m", r.finalErrorM(), 4);
            num(o, "max_error_m", r.maxErrorM(), 4);
            num(o, "error_pct", r.errorPct(), 4);
            num(o, "inside95", r.inside95(), 4);
            num(o, "end_lat", r.endLat(), 9);
            num(o, "end_lon", r.endLon(), 9);
            num(o, "time_to_limit_s", r.timeToLimitS(), dd);
            num(o, "time_to_unreliable_s", r.timeToUnreliableS(), dd);
            o.put("warned_late", r.warnedLate());
            num(o, "ref_lat", r.refLat(), 9);
            num(o, "ref_lon", r.refLon(), 9);
            num(o, "mean_nees", r.meanNees(), 4);
            num(o, "final_nees", r.finalNees(), 4);
            num(o, "along_track_error_m", r.alongTrackErrorM(), 4);
            num(o, "cross_track_error_m", r.crossTrackErrorM(), 4);
            o.put("evaluations", r.evaluations());
            o.put("reference", r.reference());
            num(o, "smoothed_final_error_m", r.smoothedFinalErrorM(), 4);
            num(o, "smoothed_max_error_m", r.smoothedMaxErrorM(), 4);
            num(o, "smoothed_inside95", r.smoothedInside95(), 4);
            num(o, "smoothed_mean_nees", r.smoothedMeanNees(), 4);
            o.put("smoothed_fixes_after", r.smoothedFixesAfter());
            num(o, "gap_fill_ratio", r.gapFillRatio(), 4);
            num(o, "odometry_gap_s", r.odometryGapS(), td);
        }
        ArrayNode summary = root.putArray("summary");
        m.summaries().forEach((config, list) -> {
            for (LengthSummary s : list) {
                ObjectNode o = summary.addObject();
                if (m.comparing()) {
                    o.put("config", config);
                }
                summaryFields(o, s);
            }
        });
        ArrayNode byLog = root.putArray("summary_by_log");
        m.byLog().forEach((log, perConfig) -> perConfig.forEach((config, list) -> {
            for (LengthSummary s : list) {
                ObjectNode o = byLog.addObject();
                o.put("log", log);
                if (m.comparing()) {
                    o.put("config", config);
                }
                summaryFields(o, s);
            }
        }));
        if (m.comparing()) {
            ArrayNode cmp = root.putArray("comparison");
            m.comparisons().forEach((config, list) -> {
                for (ReportModel.Comparison c : list) {
                    ObjectNode o = cmp.addObject();
                    o.put("length_s", c.seconds());
                    o.put("baseline", c.baseline());
                    o.put("config", c.config());
                    o.put("pairs", c.pairs());
                    diff(o, "median_final_error_m", c.a().medianFinalErrorM(), c.b().medianFinalErrorM());
                    diff(o, "p95_final_error_m", c.a().p95FinalErrorM(), c.b().p95FinalErrorM());
                    diff(o, "median_error_pct", c.a().medianErrorPct(), c.b().medianErrorPct());
                    diff(o, "inside95", c.a().inside95(), c.b().inside95());
                    diff(o, "warned_late_count", c.a().warnedLate(), c.b().warnedLate());
                    num(o, "median_paired_final_error_difference_m", c.medianPairedDifference(), 4);
                }
            });
        }
        ArrayNode unscored = root.putArray("unscored_windows");
        for (ScoringRun.LogScores l : m.logs()) {
            for (UnscoredWindow u : l.unscored()) {
                ObjectNode o = unscored.addObject();
                o.put("log", l.name());
                num(o, "start_t", u.startT(), l.timeDecimals());
                num(o, "start_offset_s", u.startT() - l.startT(), l.timeDecimals());
                num(o, "length_s", u.lengthS(), l.timeDecimals());
                o.put("count", u.count());
                o.put("reason", u.reason().code());
                o.put("reason_text", u.reason().words());
            }
        }
        root.set("config", configNode(m.configs().get(0)));
        ArrayNode configs = root.putArray("configs");
        m.configs().forEach(c -> configs.add(configNode(c)));
        root.set("options", options(m.options()));
        ArrayNode logs = root.putArray("logs");
        for (ScoringRun.LogScores l : m.logs()) {
            int td = l.timeDecimals();
            ObjectNode o = logs.addObject();
            o.put("log", l.name());
            o.put("reference", l.reference().wireName());
            o.put("estimate_point", l.reference().estimatePoint());
            o.put("samples", l.samples());
            num(o, "start_t", l.startT(), td);
            num(o, "duration_s", l.endT() - l.startT(), td);
            o.put("time_decimals", td);
            ObjectNode origin = o.putObject("origin");
            num(origin, "lat", l.frame().origin().latDeg(), 9);
            num(origin, "lon", l.frame().origin().lonDeg(), 9);
            num(origin, "alt_m", l.frame().origin().altM(), 4);
            ArrayNode gaps = o.putArray("real_gaps");
            for (TimeSpan g : l.gaps()) {
                ObjectNode go = gaps.addObject();
                num(go, "start_t", g.startT(), td);
                num(go, "length_s", g.lengthS(), td);
            }
            ArrayNode odometryGaps = o.putArray("odometry_gaps");
            for (OdometryGap g : l.odometryGaps()) {
                ObjectNode go = odometryGaps.addObject();
                go.put("stream", g.stream().wireName());
                num(go, "start_t", g.startT(), td);
                num(go, "start_offset_s", g.startT() - l.startT(), td);
                num(go, "length_s", g.lengthS(), td);
            }
            o.put("windows_planned", l.plan().windows().size() + l.plan().skipped());
            o.put("windows_scored", l.configs().isEmpty() ? 0 : l.configs().get(0).windows().size());
            o.put("windows_unscored", l.unscored().stream().mapToInt(UnscoredWindow::count).sum());
            ArrayNode notes = o.putArray("notes");
            l.notes().forEach(notes::add);
        }
        return root;
    }

    private static void summaryFields(ObjectNode o, LengthSummary s) {
        o.put("length_s", s.lengthS());
        o.put("count", s.count());
        num(o, "median_final_error_m", s.medianFinalErrorM(), 4);
        num(o, "p95_final_error_m", s.p95FinalErrorM(), 4);
        num(o, "median_error_pct", s.medianErrorPct(), 4);
        num(o, "inside95", s.inside95(), 4);
        o.put("warned_late_count", s.warnedLate());
        o.put("past_limit_count", s.pastLimit());
        num(o, "max_final_error_m", s.maxFinalErrorM(), 4);
        num(o, "p95_error_pct", s.p95ErrorPct(), 4);
        o.put("pct_count", s.pctCount());
        num(o, "mean_nees", s.meanNees(), 4);
        num(o, "median_smoothed_max_error_m", s.medianSmoothedMaxErrorM(), 4);
        num(o, "p95_smoothed_max_error_m", s.p95SmoothedMaxErrorM(), 4);
        num(o, "smoothed_inside95", s.smoothedInside95(), 4);
        num(o, "median_gap_fill_ratio", s.medianGapFillRatio(), 4);
    }

    /** The baseline's value, this configuration's, and this minus the baseline. */
    private static void diff(ObjectNode o, String name, double a, double b) {
        ObjectNode d = o.putObject(name);
        num(d, "baseline", a, 4);
        num(d, "config", b, 4);
        num(d, "difference", b - a, 4);
    }

    /**
     * A configuration by name and source, and its {@code settings}: a complete configuration file (JSON is
     * YAML) written through the loader's key table, so that saving it as {@code wayhold.yaml} and passing
     * it to {@code --config} scores with exactly these settings. Bearer tokens are never written.
     */
    private static ObjectNode configNode(ScoringRun.NamedSettings c) {
        ObjectNode o = MAPPER.createObjectNode();
        o.put("name", c.name());
        o.put("source", c.source());
        o.set("settings", ConfigLoader.toTree(c.settings()));
        return o;
    }

    private static ObjectNode options(ScoringRun.Options o) {
        ObjectNode n = MAPPER.createObjectNode();
        ArrayNode lengths = n.putArray("outage_s");
        for (double l : o.schedule().lengthsS()) {
            lengths.add(l);
        }
        n.put("schedule", o.schedule().perLength() == 0 ? "fixed" : "random");
        n.put("every_s", o.schedule().everyS());
        n.put("skip_s", o.schedule().skipS());
        n.put("random", o.schedule().perLength());
        n.put("seed", o.schedule().seed());
        n.put("min_aided_s", o.minAidedS());
        n.put("eval_step_s", o.evalStepS());
        n.put("vehicle", o.vehicle());
        n.put("smooth_tail_s", o.smoothTailS());
        n.put("min_distance_for_pct_m", WindowScore.MIN_DISTANCE_FOR_PCT_M);
        return n;
    }

    /**
     * A number rounded half-up to {@code decimals}, or null when it does not exist. Rounding starts from
     * the number's shortest decimal form ({@link Double#toString}), so a time with no more decimals than
     * asked for is written exactly as the log had it and reads back as the same double.
     */
    static void num(ObjectNode o, String name, double v, int decimals) {
        if (!Double.isFinite(v)) {
            o.putNull(name);
        } else {
            o.put(name, rounded(v, decimals).stripTrailingZeros());
        }
    }

    /** {@code v} rounded half-up to {@code decimals} from its shortest decimal form. */
    static java.math.BigDecimal rounded(double v, int decimals) {
        return java.math.BigDecimal.valueOf(v).setScale(decimals, java.math.RoundingMode.HALF_UP);
    }
}
