package org.wayhold.report;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import org.jfree.data.xy.XYSeries;
import org.wayhold.scoring.InterpolatedTrack;
import org.wayhold.scoring.LengthSummary;
import org.wayhold.scoring.OutageReplay;
import org.wayhold.scoring.ScoringRun;

/**
 * Writes {@code report.html}: one self-contained page (inline SVG and CSS, no script, nothing fetched)
 * with the tracks and windows of each log, the error inside the windows against the 95% radius, drift
 * against outage length per configuration, and the tables.
 */
public final class HtmlReport {

    static final String CAUTION = "The figures in this report are estimates from recorded or simulated data. "
            + "They are not for vehicle control or safety functions; follow applicable regulations and qualified "
            + "engineering practice.";

    /** Points of a track plot at most this fraction of the track's extent apart are merged, for size. */
    private static final double PLOT_RESOLUTION = 1.0 / 800.0;

    private HtmlReport() {
    }

    public static void write(ReportModel m, Path file) throws IOException {
        Files.writeString(file, html(m), StandardCharsets.UTF_8);
    }

    /** The page. */
    public static String html(ReportModel m) {
        // JFreeChart draws with AWT: no display is needed or wanted.
        System.setProperty("java.awt.headless", "true");
        StringBuilder b = new StringBuilder(1 << 20);
        b.append("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n")
                .append("<title>wayhold drift report</title>\n<style>\n")
                .append("body{font-family:system-ui,sans-serif;margin:1.5em auto;max-width:1100px;color:#222;padding:0 1em}\n")
                .append("h1{font-size:1.5em}h2{font-size:1.2em;margin-top:2em;border-bottom:1px solid #ccc}\n")
                .append("table{border-collapse:collapse;margin:0.5em 0;font-size:0.9em}\n")
                .append("th,td{border:1px solid #ccc;padding:0.25em 0.5em;text-align:right}\n")
                .append("th{background:#f2f2f2}td.l,th.l{text-align:left}\n")
                .append(".caution{border-left:4px solid #c2571a;background:#fbf3ee;padding:0.5em 1em}\n")
                .append(".plot svg{max-width:100%;height:auto}\n")
                .append(".pair{display:flex;flex-wrap:wrap;gap:0.5em}.pair .plot{flex:1 1 480px;min-width:0}\n")
                .append("</style>\n</head>\n<body>\n<h1>Drift through simulated GNSS outages</h1>\n");
        b.append("<p class=\"caution\">").append(esc(CAUTION)).append("</p>\n");
        b.append("<p>Error measured against ").append(esc(describe(m.referenceKind()))).append(". ");
        ScoringRun.Options o = m.options();
        b.append(String.format(Locale.ROOT, "Outage lengths %s s; %s; each window starts after at least %s s of "
                        + "aided filtering and overlaps no real gap in the fixes.</p>\n",
                lengths(o.schedule().lengthsS()), o.schedule().perLength() == 0
                        ? String.format(Locale.ROOT, "one window of each length every %s s after the first %s s",
                        g(o.schedule().everyS()), g(o.schedule().skipS()))
                        : String.format(Locale.ROOT, "%d random windows per length (seed %d)", o.schedule().perLength(),
                        o.schedule().seed()), g(o.minAidedS())));
        b.append("<p>Configurations: ");
        for (int i = 0; i < m.configs().size(); i++) {
            ScoringRun.NamedSettings c = m.configs().get(i);
            b.append(i == 0 ? "" : "; ").append("<b style=\"color:").append(hex(Charts.configColor(i))).append("\">")
                    .append(esc(c.name())).append("</b> (").append(esc(c.source())).append(")");
        }
        b.append(m.comparing() ? ". Differences are the later configuration minus the first." : ".").append("</p>\n");

        summaryTables(b, m);
        b.append("<h2>Drift against outage length</h2>\n<div class=\"plot\">").append(driftPlot(m)).append("</div>\n");
        b.append("<h2>Error inside the windows</h2>\n<p>Left: the forward filter's drift, horizontal error "
                + "against time since the window began (solid), and its 95% radius, the radius of the circle that "
                + "holds the position with 95% probability (dashed). Right: the smoothed gap fill of the same "
                + "windows, with the fixes after each window used, and its 95% radius.</p>\n");
        for (double len : o.schedule().lengthsS()) {
            b.append("<div class=\"pair\"><div class=\"plot\">").append(errorPlot(m, len, false, false))
                    .append("</div><div class=\"plot\">").append(errorPlot(m, len, false, true))
                    .append("</div></div>\n");
        }
        if (m.logs().stream().anyMatch(l -> l.configs().stream().anyMatch(c -> !c.realGaps().isEmpty()))) {
            b.append("<div class=\"pair\"><div class=\"plot\">").append(errorPlot(m, Double.NaN, true, false))
                    .append("</div><div class=\"plot\">").append(errorPlot(m, Double.NaN, true, true))
                    .append("</div></div>\n");
        }
        b.append("<h2>Tracks</h2>\n<p>Each log in its local frame (metres east and north of its first fix): the "
                + "reference in grey, its stretches inside windows in black, and the dead-reckoned path of each "
                + "window in the colour of its configuration (solid), with its smoothed gap fill (dashed).</p>\n");
        for (ScoringRun.LogScores log : m.logs()) {
            b.append("<div class=\"plot\">").append(trackPlot(m, log)).append("</div>\n");
        }
        windowTable(b, m);
        b.append("<p class=\"caution\">").append(esc(CAUTION)).append("</p>\n</body>\n</html>\n");
        return b.toString();
    }

    private static void summaryTables(StringBuilder b, ReportModel m) {
        b.append("<h2>Summary per outage length</h2>\n<table>\n<tr>");
        if (m.comparing()) {
            b.append("<th class=\"l\">config</th>");
        }
        b.append("<th>outage [s]</th><th>windows</th><th>median final error [m]</th><th>p95 final error [m]</th>"
                + "<th>max final error [m]</th><th>median error [% of distance]</th><th>p95 error [%]</th>"
                + "<th>inside 95% ellipse</th><th>mean NEES</th><th>alerts</th><th>missed alerts</th>"
                + "<th>smoothed: median max error [m]</th><th>smoothed: p95 max error [m]</th>"
                + "<th>smoothed: inside 95%</th><th>median gap-fill ratio</th></tr>\n");
        m.summaries().forEach((config, list) -> {
            for (LengthSummary s : list) {
                b.append("<tr>");
                if (m.comparing()) {
                    b.append("<td class=\"l\">").append(esc(config)).append("</td>");
                }
                b.append(td(g(s.lengthS()))).append(td(Integer.toString(s.count())))
                        .append(td(f(s.medianFinalErrorM(), 2))).append(td(f(s.p95FinalErrorM(), 2)))
                        .append(td(f(s.maxFinalErrorM(), 2))).append(td(f(s.medianErrorPct(), 2)))
                        .append(td(f(s.p95ErrorPct(), 2))).append(td(f(s.inside95(), 3)))
                        .append(td(f(s.meanNees(), 2))).append(td(Integer.toString(s.alerts())))
                        .append(td(Integer.toString(s.missedAlerts()))).append(td(f(s.medianSmoothedMaxErrorM(), 2)))
                        .append(td(f(s.p95SmoothedMaxErrorM(), 2))).append(td(f(s.smoothedInside95(), 3)))
                        .append(td(f(s.medianGapFillRatio(), 3))).append("</tr>\n");
            }
        });
        b.append("</table>\n<p>Percentiles by linear interpolation between order statistics (Hyndman and Fan "
                + "definition 7). Inside 95%: share of all evaluation times with the reference inside the filter's "
                + "95% ellipse; about 0.95 for an honest covariance. A missed alert is a window whose error passed "
                + "the alert limit before the state turned unreliable. Smoothed: the gap fill of the same window by "
                + "the Rauch-Tung-Striebel smoother, with the window's fixes still withheld and the fixes of the "
                + g(m.options().smoothTailS()) + " s after it used; its max error is the largest error anywhere "
                + "inside the window, and the gap-fill ratio is that error over the forward filter's final error "
                + "(per window, then the median). A smoothed estimate needs the data after the gap: it exists only "
                + "after the fact, never live.</p>\n");
        if (m.comparing()) {
            b.append("<h2>Comparison (same windows)</h2>\n<table>\n<tr><th class=\"l\">config</th><th>outage [s]</th>"
                    + "<th>pairs</th><th>median final error [m]<br>first / this / difference</th>"
                    + "<th>p95 final error [m]<br>first / this / difference</th>"
                    + "<th>median error [%]<br>first / this / difference</th>"
                    + "<th>inside 95%<br>first / this / difference</th><th>missed alerts<br>first / this / difference</th>"
                    + "<th>median of paired differences [m]</th></tr>\n");
            m.comparisons().forEach((config, list) -> {
                for (ReportModel.Comparison c : list) {
                    b.append("<tr><td class=\"l\">").append(esc(config)).append("</td>").append(td(g(c.seconds())))
                            .append(td(Integer.toString(c.pairs())))
                            .append(td(triple(c.a().medianFinalErrorM(), c.b().medianFinalErrorM(), 2)))
                            .append(td(triple(c.a().p95FinalErrorM(), c.b().p95FinalErrorM(), 2)))
                            .append(td(triple(c.a().medianErrorPct(), c.b().medianErrorPct(), 2)))
                            .append(td(triple(c.a().inside95(), c.b().inside95(), 3)))
                            .append(td(triple(c.a().missedAlerts(), c.b().missedAlerts(), 0)))
                            .append(td(f(c.medianPairedDifference(), 3))).append("</tr>\n");
                }
            });
            b.append("</table>\n");
        }
    }

    private static void windowTable(StringBuilder b, ReportModel m) {
        b.append("<h2>Every window</h2>\n<details><summary>").append(m.rows().size())
                .append(" rows (also in outages.csv)</summary>\n<table>\n<tr><th class=\"l\">log</th>");
        if (m.comparing()) {
            b.append("<th class=\"l\">config</th>");
        }
        b.append("<th class=\"l\">kind</th><th>start after log start [s]</th><th>length [s]</th><th>distance [m]</th>"
                + "<th>final error [m]</th><th>max error [m]</th><th>error [%]</th><th>inside 95%</th>"
                + "<th>along [m]</th><th>across [m]</th><th>time to alert [s]</th><th>missed alert</th>"
                + "<th>smoothed max error [m]</th><th>smoothed inside 95%</th><th>fixes after</th>"
                + "<th>gap-fill ratio</th></tr>\n");
        for (OutageRow r : m.rows()) {
            b.append("<tr><td class=\"l\">").append(esc(r.log())).append("</td>");
            if (m.comparing()) {
                b.append("<td class=\"l\">").append(esc(r.config())).append("</td>");
            }
            b.append("<td class=\"l\">").append(r.kind().replace('_', ' ')).append("</td>")
                    .append(td(f(r.offsetS(), 1))).append(td(f(r.seconds(), 1))).append(td(f(r.meters(), 1)))
                    .append(td(f(r.finalError(), 2))).append(td(f(r.maxError(), 2))).append(td(f(r.errorPct(), 2)))
                    .append(td(f(r.inside95(), 2))).append(td(f(r.alongTrackError(), 2)))
                    .append(td(f(r.crossTrackError(), 2))).append(td(f(r.timeToAlert(), 1)))
                    .append(td(r.missedAlert() ? "yes" : "")).append(td(f(r.smoothedMaxError(), 2)))
                    .append(td(f(r.smoothedInside95(), 2))).append(td(Integer.toString(r.smoothedFixesAfter())))
                    .append(td(f(r.gapFillRatio(), 3))).append("</tr>\n");
        }
        b.append("</table>\n</details>\n");
    }

    private static String driftPlot(ReportModel m) {
        List<Charts.Line> lines = new ArrayList<>();
        int i = 0;
        for (var e : m.summaries().entrySet()) {
            XYSeries median = Charts.series(e.getKey() + " median");
            XYSeries p95 = Charts.series(e.getKey() + " p95");
            for (LengthSummary s : e.getValue()) {
                if (s.count() > 0) {
                    median.add(s.lengthS(), s.medianFinalErrorM());
                    p95.add(s.lengthS(), s.p95FinalErrorM());
                }
            }
            lines.add(new Charts.Line(median, Charts.configColor(i), Charts.solid(2f), true));
            lines.add(new Charts.Line(p95, Charts.configColor(i), Charts.dashed(2f), true));
            i++;
        }
        return Charts.svg("Final error against outage length", "outage length (s)", "final horizontal error (m)",
                lines, 800, 420, false, "drift");
    }

    private static String errorPlot(ReportModel m, double lengthS, boolean realGaps, boolean smoothed) {
        List<Charts.Line> lines = new ArrayList<>();
        for (int ci = 0; ci < m.configs().size(); ci++) {
            String name = m.configs().get(ci).name();
            XYSeries err = Charts.series(name + (smoothed ? " gap-fill error" : " error"));
            XYSeries radius = Charts.series(name + (smoothed ? " smoothed 95% radius" : " 95% radius"));
            for (ScoringRun.LogScores log : m.logs()) {
                ScoringRun.ConfigScores cs = log.configs().get(ci);
                for (OutageReplay.WindowTrace t : realGaps ? cs.realGapTraces() : cs.traces()) {
                    if (!realGaps && t.window().lengthS() != lengthS) {
                        continue;
                    }
                    for (OutageReplay.TracePoint p : t.points()) {
                        err.add(p.t() - t.window().startT(), smoothed ? p.smoothedErrorM() : p.errorM());
                        radius.add(p.t() - t.window().startT(), smoothed ? p.smoothedRadius95M() : p.radius95M());
                    }
                    err.add(Double.NaN, Double.NaN);
                    radius.add(Double.NaN, Double.NaN);
                }
            }
            lines.add(new Charts.Line(err, Charts.configColor(ci), Charts.solid(1.2f), true));
            lines.add(new Charts.Line(radius, Charts.configColor(ci), Charts.dashed(1f), true));
        }
        String title = (realGaps ? "Real gaps in the logs" : "Outages of " + g(lengthS) + " s")
                + (smoothed ? ": smoothed gap fill" : ": forward drift");
        return Charts.svg(title, "time since the outage began (s)", "horizontal error (m)", lines, 540, 360, false,
                (smoothed ? "fill" : "") + (realGaps ? "gaps" : "err" + g(lengthS).replace('.', '_')));
    }

    private static String trackPlot(ReportModel m, ScoringRun.LogScores log) {
        InterpolatedTrack track = log.track();
        double extent = extent(track);
        double minStep = extent * PLOT_RESOLUTION;
        XYSeries ref = Charts.series("reference");
        double lastE = Double.NaN;
        double lastN = Double.NaN;
        double lastT = Double.NaN;
        for (int i = 0; i < track.size(); i++) {
            double e = track.pointEastM(i);
            double n = track.pointNorthM(i);
            if (!Double.isNaN(lastT) && track.timeAt(i) - lastT > ScoringRun.REFERENCE_MAX_GAP_S
                    && !track.continuous()) {
                ref.add(Double.NaN, Double.NaN);
            }
            if (Double.isNaN(lastE) || Math.hypot(e - lastE, n - lastN) >= minStep || i == track.size() - 1) {
                ref.add(e, n);
                lastE = e;
                lastN = n;
            }
            lastT = track.timeAt(i);
        }
        List<Charts.Line> lines = new ArrayList<>();
        lines.add(new Charts.Line(ref, Charts.REFERENCE, Charts.solid(1.5f), true));
        XYSeries inWindows = Charts.series("reference in windows");
        for (int ci = 0; ci < log.configs().size(); ci++) {
            ScoringRun.ConfigScores cs = log.configs().get(ci);
            XYSeries dr = Charts.series(cs.config() + " dead reckoning");
            XYSeries fill = Charts.series(cs.config() + " smoothed gap fill");
            List<OutageReplay.WindowTrace> all = new ArrayList<>(cs.traces());
            all.addAll(cs.realGapTraces());
            for (OutageReplay.WindowTrace t : all) {
                addDecimated(dr, t, minStep, false);
                addSmoothed(fill, t, minStep);
                if (ci == 0) {
                    addDecimated(inWindows, t, minStep, true);
                }
            }
            if (ci == 0) {
                lines.add(new Charts.Line(inWindows, Charts.WINDOW, Charts.solid(2.5f), true));
            }
            lines.add(new Charts.Line(dr, Charts.configColor(ci), Charts.solid(1.2f), true));
            lines.add(new Charts.Line(fill, Charts.configColor(ci), Charts.dashed(1.2f), true));
        }
        return Charts.svg(log.name(), "east (m)", "north (m)", lines, 900, 640, true, "track" + log.index());
    }

    private static void addSmoothed(XYSeries s, OutageReplay.WindowTrace t, double minStep) {
        double lastE = Double.NaN;
        double lastN = Double.NaN;
        List<OutageReplay.TracePoint> pts = t.points();
        for (int i = 0; i < pts.size(); i++) {
            OutageReplay.TracePoint p = pts.get(i);
            double e = p.smoothedEastM();
            double n = p.smoothedNorthM();
            if (!Double.isFinite(e) || !Double.isFinite(n)) {
                continue;
            }
            if (Double.isNaN(lastE) || Math.hypot(e - lastE, n - lastN) >= minStep || i == pts.size() - 1) {
                s.add(e, n);
                lastE = e;
                lastN = n;
            }
        }
        s.add(Double.NaN, Double.NaN);
    }

    private static void addDecimated(XYSeries s, OutageReplay.WindowTrace t, double minStep, boolean reference) {
        double lastE = Double.NaN;
        double lastN = Double.NaN;
        List<OutageReplay.TracePoint> pts = t.points();
        for (int i = 0; i < pts.size(); i++) {
            OutageReplay.TracePoint p = pts.get(i);
            double e = reference ? p.refEastM() : p.eastM();
            double n = reference ? p.refNorthM() : p.northM();
            if (Double.isNaN(lastE) || Math.hypot(e - lastE, n - lastN) >= minStep || i == pts.size() - 1) {
                s.add(e, n);
                lastE = e;
                lastN = n;
            }
        }
        s.add(Double.NaN, Double.NaN);
    }

    private static double extent(InterpolatedTrack t) {
        double minE = Double.POSITIVE_INFINITY;
        double maxE = Double.NEGATIVE_INFINITY;
        double minN = Double.POSITIVE_INFINITY;
        double maxN = Double.NEGATIVE_INFINITY;
        for (int i = 0; i < t.size(); i++) {
            minE = Math.min(minE, t.pointEastM(i));
            maxE = Math.max(maxE, t.pointEastM(i));
            minN = Math.min(minN, t.pointNorthM(i));
            maxN = Math.max(maxN, t.pointNorthM(i));
        }
        return t.size() == 0 ? 1.0 : Math.max(Math.max(maxE - minE, maxN - minN), 1.0);
    }

    private static String describe(String kind) {
        return switch (kind) {
            case "reference" -> "the logs' reference trajectories (reference lines, interpolated linearly in the "
                    + "local frame); the logs' real GNSS gaps are scored too";
            case "withheld_fixes" -> "the withheld GNSS fixes themselves, at their own times (so the figures include "
                    + "the fixes' own error); a fix is where the antenna was, so it is compared with the filter's "
                    + "antenna position, its reference point moved by the configured lever arm";
            default -> "reference trajectories where a log has them, else its withheld GNSS fixes (see each log)";
        };
    }

    private static String triple(double a, double b, int decimals) {
        return f(a, decimals) + " / " + f(b, decimals) + " / " + (Double.isFinite(b - a)
                ? String.format(Locale.ROOT, "%+." + decimals + "f", b - a) : "&ndash;");
    }

    private static String td(String s) {
        return "<td>" + s + "</td>";
    }

    private static String f(double v, int decimals) {
        return Double.isFinite(v) ? String.format(Locale.ROOT, "%." + decimals + "f", v) : "&ndash;";
    }

    /** A number without a needless ".0". */
    private static String g(double v) {
        return v == Math.rint(v) ? Long.toString((long) v) : Double.toString(v);
    }

    private static String lengths(double[] l) {
        StringBuilder b = new StringBuilder();
        for (int i = 0; i < l.length; i++) {
            b.append(i == 0 ? "" : ", ").append(g(l[i]));
        }
        return b.toString();
    }

    private static String hex(java.awt.Color c) {
        return String.format(Locale.ROOT, "#%02x%02x%02x", c.getRed(), c.getGreen(), c.getBlue());
    }

    /** Escapes text for HTML. */
    static String esc(String s) {
        StringBuilder b = new StringBuilder(s.length());
        for (char c : s.toCharArray()) {
            switch (c) {
                case '<' -> b.append("&lt;");
                case '>' -> b.append("&gt;");
                case '&' -> b.append("&amp;");
                case '"' -> b.append("&quot;");
                case '\'' -> b.append("&#39;");
                default -> b.append(c);
            }
        }
        return b.toString();
    }
}
