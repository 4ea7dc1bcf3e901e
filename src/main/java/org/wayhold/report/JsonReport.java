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
import org.wayhold.scoring.LengthSummary;
import org.wayhold.scoring.ScoringRun;
import org.wayhold.scoring.TimeSpan;

/**
 * Writes {@code report.json} with the contract's field names, plus more fields beside them.
 *
 * <p>The output depends only on the inputs and options: fields in a fixed order, no clock time, numbers
 * rounded to fixed decimals (metres to 0.1 mm, degrees to 1e-9, about 0.1 mm), so the same seed gives a
 * byte-identical file. A quantity that does not exist (a time to alert that never came) is null.
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

    /** The report as a JSON tree. */
    public static ObjectNode tree(ReportModel m) {
        ObjectNode root = MAPPER.createObjectNode();
        root.put("reference", m.referenceKind());
        ArrayNode outages = root.putArray("outages");
        for (OutageRow r : m.rows()) {
            ObjectNode o = outages.addObject();
            o.put("log", r.log());
            if (m.comparing()) {
                o.put("config", r.config());
            }
            o.put("kind", r.kind());
            num(o, "start", r.startT(), 3);
            num(o, "start_offset", r.offsetS(), 3);
            num(o, "seconds", r.seconds(), 3);
            num(o, "meters", r.meters(), 4);
            num(o, "final_error", r.finalError(), 4);
            num(o, "max_error", r.maxError(), 4);
            num(o, "error_pct", r.errorPct(), 4);
            num(o, "inside95", r.inside95(), 4);
            num(o, "end_lat", r.endLat(), 9);
            num(o, "end_lon", r.endLon(), 9);
            num(o, "time_to_alert", r.timeToAlert(), 3);
            num(o, "time_to_unreliable", r.timeToUnreliable(), 3);
            o.put("missed_alert", r.missedAlert());
            num(o, "ref_lat", r.refLat(), 9);
            num(o, "ref_lon", r.refLon(), 9);
            num(o, "mean_nees", r.meanNees(), 4);
            num(o, "final_nees", r.finalNees(), 4);
            num(o, "along_track_error", r.alongTrackError(), 4);
            num(o, "cross_track_error", r.crossTrackError(), 4);
            o.put("evaluations", r.evaluations());
            o.put("reference", r.reference());
            num(o, "smoothed_final_error_m", r.smoothedFinalError(), 4);
            num(o, "smoothed_max_error_m", r.smoothedMaxError(), 4);
            num(o, "smoothed_inside95", r.smoothedInside95(), 4);
            num(o, "smoothed_mean_nees", r.smoothedMeanNees(), 4);
            o.put("smoothed_fixes_after", r.smoothedFixesAfter());
            num(o, "gap_fill_ratio", r.gapFillRatio(), 4);
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
        if (m.comparing()) {
            ArrayNode cmp = root.putArray("comparison");
            m.comparisons().forEach((config, list) -> {
                for (ReportModel.Comparison c : list) {
                    ObjectNode o = cmp.addObject();
                    o.put("seconds", c.seconds());
                    o.put("baseline", c.baseline());
                    o.put("config", c.config());
                    o.put("pairs", c.pairs());
                    diff(o, "median_final_error", c.a().medianFinalErrorM(), c.b().medianFinalErrorM());
                    diff(o, "p95_final_error", c.a().p95FinalErrorM(), c.b().p95FinalErrorM());
                    diff(o, "median_error_pct", c.a().medianErrorPct(), c.b().medianErrorPct());
                    diff(o, "inside95", c.a().inside95(), c.b().inside95());
                    diff(o, "missed_alerts", c.a().missedAlerts(), c.b().missedAlerts());
                    num(o, "median_paired_final_error_difference", c.medianPairedDifference(), 4);
                }
            });
        }
        root.set("config", configNode(m.configs().get(0)));
        ArrayNode configs = root.putArray("configs");
        m.configs().forEach(c -> configs.add(configNode(c)));
        root.set("options", options(m.options()));
        ArrayNode logs = root.putArray("logs");
        for (ScoringRun.LogScores l : m.logs()) {
            ObjectNode o = logs.addObject();
            o.put("log", l.name());
            o.put("reference", l.reference().wireName());
            o.put("estimate_point", l.reference().estimatePoint());
            o.put("samples", l.samples());
            num(o, "start", l.startT(), 3);
            num(o, "duration", l.endT() - l.startT(), 3);
            ObjectNode origin = o.putObject("origin");
            num(origin, "lat", l.frame().origin().latDeg(), 9);
            num(origin, "lon", l.frame().origin().lonDeg(), 9);
            num(origin, "alt", l.frame().origin().altM(), 4);
            ArrayNode gaps = o.putArray("real_gaps");
            for (TimeSpan g : l.gaps()) {
                ObjectNode go = gaps.addObject();
                num(go, "start", g.startT(), 3);
                num(go, "seconds", g.lengthS(), 3);
            }
            o.put("windows", l.plan().windows().size());
            o.put("windows_left_out", l.plan().skipped());
            ArrayNode notes = o.putArray("notes");
            l.notes().forEach(notes::add);
        }
        return root;
    }

    private static void summaryFields(ObjectNode o, LengthSummary s) {
        o.put("seconds", s.lengthS());
        o.put("count", s.count());
        num(o, "median_final_error", s.medianFinalErrorM(), 4);
        num(o, "p95_final_error", s.p95FinalErrorM(), 4);
        num(o, "median_error_pct", s.medianErrorPct(), 4);
        num(o, "inside95", s.inside95(), 4);
        o.put("missed_alerts", s.missedAlerts());
        o.put("alerts", s.alerts());
        num(o, "max_final_error", s.maxFinalErrorM(), 4);
        num(o, "p95_error_pct", s.p95ErrorPct(), 4);
        num(o, "mean_nees", s.meanNees(), 4);
        num(o, "median_smoothed_max_error_m", s.medianSmoothedMaxErrorM(), 4);
        num(o, "p95_smoothed_max_error_m", s.p95SmoothedMaxErrorM(), 4);
        num(o, "smoothed_inside95", s.smoothedInside95(), 4);
        num(o, "median_gap_fill_ratio", s.medianGapFillRatio(), 4);
    }

    private static void diff(ObjectNode o, String name, double a, double b) {
        num(o, name + "_a", a, 4);
        num(o, name + "_b", b, 4);
        num(o, name + "_diff", b - a, 4);
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
        ArrayNode lengths = n.putArray("outage");
        for (double l : o.schedule().lengthsS()) {
            lengths.add(l);
        }
        n.put("schedule", o.schedule().perLength() == 0 ? "fixed" : "random");
        n.put("every", o.schedule().everyS());
        n.put("skip", o.schedule().skipS());
        n.put("random", o.schedule().perLength());
        n.put("seed", o.schedule().seed());
        n.put("min_aided", o.minAidedS());
        n.put("eval_step", o.evalStepS());
        n.put("vehicle", o.vehicle());
        n.put("smooth_tail", o.smoothTailS());
        return n;
    }

    /** A number rounded half-up to {@code decimals}, or null when it does not exist. */
    static void num(ObjectNode o, String name, double v, int decimals) {
        if (!Double.isFinite(v)) {
            o.putNull(name);
        } else {
            o.put(name, new java.math.BigDecimal(v).setScale(decimals, java.math.RoundingMode.HALF_UP)
                    .stripTrailingZeros());
        }
    }
}
