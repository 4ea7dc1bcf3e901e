package org.wayhold.report;

import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import org.wayhold.geo.Geodetic;
import org.wayhold.scoring.LengthSummary;
import org.wayhold.scoring.Quantiles;
import org.wayhold.scoring.ScoringRun;
import org.wayhold.scoring.WindowScore;

/**
 * Everything the writers show, computed once: rows per window, summaries per configuration and length,
 * and with several configurations the comparison of each with the first (B - A).
 *
 * @param logs        the scored logs
 * @param configs     the configurations, the first being the baseline of comparisons
 * @param options     how the windows were chosen and scored
 * @param run         the tool, command line and date the report was made with
 * @param rows        one row per window, per configuration: logs in order, then configurations, then
 *                    simulated windows by start and length, then real gaps
 * @param summaries   per configuration, one summary per outage length (simulated windows of all logs)
 * @param byLog       per log, then per configuration, one summary per outage length
 * @param comparisons per configuration after the first, one comparison per length
 */
public record ReportModel(List<ScoringRun.LogScores> logs, List<ScoringRun.NamedSettings> configs,
                          ScoringRun.Options options, RunInfo run, List<OutageRow> rows,
                          Map<String, List<LengthSummary>> summaries,
                          Map<String, Map<String, List<LengthSummary>>> byLog,
                          Map<String, List<Comparison>> comparisons) {

    /**
     * One length compared between the baseline A and a configuration B on the same windows.
     *
     * @param seconds               outage length (s)
     * @param baseline              A's name
     * @param config                B's name
     * @param a                     A's summary
     * @param b                     B's summary
     * @param pairs                 windows scored under both (count)
     * @param medianPairedDifference median over those windows of B's final error minus A's (m)
     */
    public record Comparison(double seconds, String baseline, String config, LengthSummary a, LengthSummary b,
                             int pairs, double medianPairedDifference) {
    }

    /** Builds the model. */
    public static ReportModel of(List<ScoringRun.LogScores> logs, List<ScoringRun.NamedSettings> configs,
                                 ScoringRun.Options options, RunInfo run) {
        List<OutageRow> rows = new ArrayList<>();
        Map<String, List<WindowScore>> byConfig = new HashMap<>();
        Map<String, Map<String, List<LengthSummary>>> byLog = new java.util.LinkedHashMap<>();
        for (ScoringRun.LogScores log : logs) {
            Map<String, List<LengthSummary>> perConfig = new java.util.LinkedHashMap<>();
            for (ScoringRun.ConfigScores cs : log.configs()) {
                perConfig.put(cs.config(), LengthSummary.byLength(cs.windows(), options.schedule().lengthsS()));
                for (WindowScore w : cs.windows()) {
                    rows.add(row(log, cs.config(), OutageRow.SIMULATED, w));
                }
                for (WindowScore w : cs.realGaps()) {
                    rows.add(row(log, cs.config(), OutageRow.REAL_GAP, w));
                }
                byConfig.computeIfAbsent(cs.config(), k -> new ArrayList<>()).addAll(cs.windows());
            }
            byLog.put(log.name(), perConfig);
        }
        double[] lengths = options.schedule().lengthsS();
        Map<String, List<LengthSummary>> summaries = new java.util.LinkedHashMap<>();
        for (ScoringRun.NamedSettings c : configs) {
            summaries.put(c.name(), LengthSummary.byLength(byConfig.getOrDefault(c.name(), List.of()), lengths));
        }
        Map<String, List<Comparison>> comparisons = new java.util.LinkedHashMap<>();
        String base = configs.get(0).name();
        for (int ci = 1; ci < configs.size(); ci++) {
            String name = configs.get(ci).name();
            List<Comparison> list = new ArrayList<>();
            for (int li = 0; li < lengths.length; li++) {
                double len = lengths[li];
                List<Double> diffs = new ArrayList<>();
                for (ScoringRun.LogScores log : logs) {
                    Map<Object, WindowScore> a = new HashMap<>();
                    log.configs().get(0).windows().stream().filter(w -> w.window().lengthS() == len)
                            .forEach(w -> a.put(w.window(), w));
                    log.configs().get(ci).windows().stream().filter(w -> w.window().lengthS() == len)
                            .forEach(w -> {
                                WindowScore wa = a.get(w.window());
                                if (wa != null) {
                                    diffs.add(w.finalErrorM() - wa.finalErrorM());
                                }
                            });
                }
                list.add(new Comparison(len, base, name, summaries.get(base).get(li), summaries.get(name).get(li),
                        diffs.size(), Quantiles.median(diffs.stream().mapToDouble(Double::doubleValue).toArray())));
            }
            comparisons.put(name, list);
        }
        return new ReportModel(List.copyOf(logs), List.copyOf(configs), options, run, List.copyOf(rows), summaries,
                byLog, comparisons);
    }

    private static OutageRow row(ScoringRun.LogScores log, String config, String kind, WindowScore w) {
        double endLat = Double.NaN;
        double endLon = Double.NaN;
        double refLat = Double.NaN;
        double refLon = Double.NaN;
        if (!Double.isNaN(w.finalT())) {
            // Both at the reference's height, so the horizontal distance between them is the final error.
            double up = log.track().upAt(w.finalT());
            Geodetic end = log.frame().toGeodetic(w.finalEastM(), w.finalNorthM(), up);
            Geodetic ref = log.frame().toGeodetic(w.refEastM(), w.refNorthM(), up);
            endLat = end.latDeg();
            endLon = end.lonDeg();
            refLat = ref.latDeg();
            refLon = ref.lonDeg();
        }
        // A real gap is reported from its last fix, the time a reader finds in the log.
        double start = OutageRow.REAL_GAP.equals(kind) ? Math.nextDown(w.window().startT()) : w.window().startT();
        double seconds = OutageRow.REAL_GAP.equals(kind) ? w.window().endT() - start : w.window().lengthS();
        return new OutageRow(log.name(), config, kind, log.reference().wireName(), start, start - log.startT(),
                seconds, w.distanceM(), w.finalErrorM(), w.maxErrorM(), w.shownErrorPct(), w.inside95(), endLat,
                endLon, refLat, refLon, w.timeToLimitS(), w.timeToUnreliableS(), w.warnedLate(), w.meanNees(),
                w.finalNees(), w.alongTrackErrorM(), w.crossTrackErrorM(), w.samples(), w.smoothed().finalErrorM(),
                w.smoothed().maxErrorM(), w.smoothed().inside95(), w.smoothed().meanNees(), w.smoothed().fixesAfter(),
                w.gapFillRatio(), log.odometryGapS(w.window()), log.timeDecimals());
    }

    /** Simulated windows scored, over all logs and configurations (count). */
    public long simulatedRows() {
        return rows.stream().filter(r -> r.kind().equals(OutageRow.SIMULATED)).count();
    }

    /** Planned windows not scored, over all logs (count; a random schedule's shortfall counts each window). */
    public int unscoredCount() {
        return logs.stream().mapToInt(l -> l.unscored().stream().mapToInt(u -> u.count()).sum()).sum();
    }

    /**
     * Why nothing was scored, in one sentence per reason with its count, for the warning a run without a
     * single scored window gives; empty when windows were scored.
     */
    public List<String> whyNothingWasScored() {
        if (simulatedRows() > 0) {
            return List.of();
        }
        Map<org.wayhold.scoring.UnscoredWindow.Reason, Integer> counts = new java.util.EnumMap<>(
                org.wayhold.scoring.UnscoredWindow.Reason.class);
        for (ScoringRun.LogScores l : logs) {
            for (org.wayhold.scoring.UnscoredWindow u : l.unscored()) {
                counts.merge(u.reason(), u.count(), Integer::sum);
            }
        }
        List<String> out = new ArrayList<>();
        counts.forEach((reason, n) -> out.add(n + (n == 1 ? " planned window: " : " planned windows: ")
                + reason.words()));
        if (out.isEmpty()) {
            out.add("the schedule planned no window");
        }
        if (counts.containsKey(org.wayhold.scoring.UnscoredWindow.Reason.BEYOND_LOG_END)) {
            double longest = logs.stream().mapToDouble(l -> l.endT() - l.startT()).max().orElse(0.0);
            out.add(String.format(java.util.Locale.ROOT, "the longest log lasts %.1f s", longest));
        }
        return out;
    }

    /** The one reference kind of all logs, or {@code mixed}. */
    public String referenceKind() {
        List<String> kinds = logs.stream().map(l -> l.reference().wireName()).distinct().toList();
        return kinds.size() == 1 ? kinds.get(0) : "mixed";
    }

    /** True when more than one configuration is compared. */
    public boolean comparing() {
        return configs.size() > 1;
    }
}
