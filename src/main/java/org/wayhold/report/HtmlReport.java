package org.wayhold.report;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import org.jfree.data.xy.XYSeries;
import org.wayhold.filter.OdometryInterruption;
import org.wayhold.scoring.InputFile;
import org.wayhold.scoring.InterpolatedTrack;
import org.wayhold.scoring.LengthSummary;
import org.wayhold.scoring.OdometryGap;
import org.wayhold.scoring.OutageReplay;
import org.wayhold.scoring.ScoringRun;
import org.wayhold.scoring.UnscoredWindow;
import org.wayhold.scoring.WindowScore;

/**
 * Writes {@code report.html}: one self-contained page (inline SVG and CSS, no script, nothing fetched)
 * with what made the report (tool, command line, date, inputs with their rejected lines), the summaries
 * (all logs pooled and per log), the comparison of configurations (one number per cell), drift against
 * outage length, the error inside the windows against the 95% radius, the tracks, every window, and
 * every planned window that was not scored with its reason. Sections have ids ({@code about},
 * {@code summary}, {@code comparison}, {@code drift}, {@code errors}, {@code tracks}, {@code windows},
 * {@code unscored}) so that they can be linked to.
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
                .append("h3{font-size:1.05em;margin-top:1.5em}\n")
                .append("table{border-collapse:collapse;margin:0.5em 0;font-size:0.9em}\n")
                .append("th,td{border:1px solid #ccc;padding:0.25em 0.5em;text-align:right}\n")
                .append("th{background:#f2f2f2}td.l,th.l{text-align:left}\n")
                .append("code{font-size:0.95em;word-break:break-all}\n")
                .append(".caution{border-left:4px solid #c2571a;background:#fbf3ee;padding:0.5em 1em}\n")
                .append(".warning{border-left:4px solid #a01010;background:#fbeaea;padding:0.5em 1em;font-weight:600}\n")
                .append(".plot svg{max-width:100%;height:auto}\n")
                .append(".pair{display:flex;flex-wrap:wrap;gap:0.5em}.pair .plot{flex:1 1 480px;min-width:0}\n")
                .append("</style>\n</head>\n<body>\n<h1>Drift through simulated GNSS outages</h1>\n");
        b.append("<p class=\"caution\">").append(esc(CAUTION)).append("</p>\n");
        List<String> why = m.whyNothingWasScored();
        if (!why.isEmpty()) {
            b.append("<p class=\"warning\" id=\"nothing-scored\">No window could be scored: ");
            b.append(esc(String.join("; ", why))).append(". See the windows not scored below.</p>\n");
        }
        about(b, m);
        summaryTables(b, m);
        b.append("<section id=\"drift\">\n<h2>Drift against outage length</h2>\n<p>Final horizontal error by "
                + "outage length: the median (solid) and 95th percentile (dashed) of all logs together, and the median "
                + "of each log on its own (thin). Each marker is one figure of the tables above.</p>\n")
                .append("<div class=\"plot\">").append(driftPlot(m)).append("</div>\n</section>\n");
        ScoringRun.Options o = m.options();
        b.append("<section id=\"errors\">\n<h2>Error inside the windows</h2>\n<p>Left: the forward filter's drift, "
                + "horizontal error against time since the window began (solid), and its 95% radius, the radius of "
                + "the circle that holds the position with 95% probability (dashed). Right: the smoothed gap fill of "
                + "the same windows, with the fixes after each window used, and its 95% radius. Lines are simplified "
                + "to what the plot's pixels can show.</p>\n");
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
        b.append("</section>\n");
        b.append("<section id=\"tracks\">\n<h2>Tracks</h2>\n<p>Each log in its local frame (metres east and north "
                + "of its first fix): the reference in grey, its stretches inside windows in black, and the "
                + "dead-reckoned path of each window in the colour of its configuration (solid), with its smoothed "
                + "gap fill (dashed).</p>\n");
        for (ScoringRun.LogScores log : m.logs()) {
            b.append("<div class=\"plot\">").append(trackPlot(m, log)).append("</div>\n");
        }
        b.append("</section>\n");
        windowTable(b, m);
        unscoredTable(b, m);
        b.append("<p class=\"caution\">").append(esc(CAUTION)).append("</p>\n</body>\n</html>\n");
        return b.toString();
    }

    /** The tool, command line, date, every input with its rejected lines, the configurations and the method. */
    private static void about(StringBuilder b, ReportModel m) {
        RunInfo run = m.run();
        b.append("<section id=\"about\">\n<h2>This report</h2>\n<table>\n")
                .append("<tr><th class=\"l\">tool</th><td class=\"l\">wayhold ").append(esc(run.version()))
                .append(" (commit ").append(esc(run.commit())).append(")</td></tr>\n")
                .append("<tr><th class=\"l\">command line</th><td class=\"l\"><code>").append(esc(run.commandLine()))
                .append("</code></td></tr>\n")
                .append("<tr><th class=\"l\">date</th><td class=\"l\">").append(esc(run.date())).append("</td></tr>\n")
                .append("</table>\n<h3>Inputs</h3>\n<table>\n<tr><th class=\"l\">file</th><th class=\"l\">kind</th>"
                        + "<th class=\"l\">log</th><th>accepted</th><th>rejected lines</th></tr>\n");
        for (ScoringRun.LogScores l : m.logs()) {
            for (InputFile f : l.inputs()) {
                b.append("<tr><td class=\"l\">").append(esc(f.path())).append("</td><td class=\"l\">")
                        .append(esc(f.kind())).append("</td><td class=\"l\">").append(esc(l.name())).append("</td>")
                        .append(td(Long.toString(f.accepted()))).append(td(Long.toString(f.rejectedLines())))
                        .append("</tr>\n");
            }
        }
        for (ScoringRun.NamedSettings c : m.configs()) {
            b.append("<tr><td class=\"l\">").append(esc(c.source())).append("</td><td class=\"l\">config</td>")
                    .append("<td class=\"l\"></td>").append(td("&ndash;")).append(td("0")).append("</tr>\n");
        }
        b.append("</table>\n<p>Accepted: sample lines (NDJSON) or fixes (NMEA) read; a configuration is read whole "
                + "or refused whole. The notes of each log, rejected lines with their reasons among them, are in "
                + "report.json.</p>\n");
        b.append("<p>Configurations: ");
        for (int i = 0; i < m.configs().size(); i++) {
            ScoringRun.NamedSettings c = m.configs().get(i);
            b.append(i == 0 ? "" : "; ").append("<b style=\"color:").append(hex(Charts.configColor(i))).append("\">")
                    .append(esc(c.name())).append("</b> (").append(esc(c.source())).append(")");
        }
        b.append(m.comparing() ? ". Differences are the later configuration minus the first." : ".").append("</p>\n");
        ScoringRun.Options o = m.options();
        b.append("<p>Error measured against ").append(esc(describe(m.referenceKind()))).append(". ");
        b.append(String.format(Locale.ROOT, "Outage lengths %s s; %s; each window starts after at least %s s of "
                        + "aided filtering and overlaps no real gap in the fixes and no odometry gap (a wheel-speed "
                        + "or yaw-rate stream silent for longer than the filter allows, the poses' "
                        + "<code>odometry_interrupted</code>, or not yet begun): over one, dead reckoning would "
                        + "measure the missing readings. Real gaps in the fixes are scored whole all the same; "
                        + "where the odometry was silent inside one, the windows table gives those seconds "
                        + "(odometry silent) and that row's error owes to the missing readings too. ",
                lengths(o.schedule().lengthsS()), o.schedule().perLength() == 0
                        ? String.format(Locale.ROOT, "one window of each length every %s s after the first %s s",
                        g(o.schedule().everyS()), g(o.schedule().skipS()))
                        : String.format(Locale.ROOT, "%d random windows per length (seed %d)", o.schedule().perLength(),
                        o.schedule().seed()), g(o.minAidedS())));
        b.append(String.format(Locale.ROOT, "The error as a percentage of the distance driven is given only for "
                + "windows in which at least %s m were driven: over a standstill or a crawl a percentage says "
                + "nothing about drift. ", g(WindowScore.MIN_DISTANCE_FOR_PCT_M)));
        b.append("Time to limit: seconds from the start of a window until the horizontal error first passed the "
                + "alert limit (<code>outage.alert_limit_m</code>). Warned late: the error passed that limit before "
                + "the navigation state turned <code>unreliable</code>. Times are given at each log's own "
                + "precision.</p>\n</section>\n");
    }

    private static final String SUMMARY_HEAD = "<th>outage [s]</th><th>windows</th><th>median final error [m]</th>"
            + "<th>p95 final error [m]</th><th>max final error [m]</th><th>windows with % of distance</th>"
            + "<th>median error [% of distance]</th><th>p95 error [% of distance]</th><th>inside 95% ellipse</th>"
            + "<th>mean NEES</th><th>past limit</th><th>warned late</th>"
            + "<th>smoothed: median max error [m]</th><th>smoothed: p95 max error [m]</th>"
            + "<th>smoothed: inside 95%</th><th>median gap-fill ratio</th></tr>\n";

    private static void summaryRow(StringBuilder b, LengthSummary s) {
        b.append(td(g(s.lengthS()))).append(td(Integer.toString(s.count())))
                .append(td(f(s.medianFinalErrorM(), 2))).append(td(f(s.p95FinalErrorM(), 2)))
                .append(td(f(s.maxFinalErrorM(), 2))).append(td(Integer.toString(s.pctCount())))
                .append(td(f(s.medianErrorPct(), 2))).append(td(f(s.p95ErrorPct(), 2))).append(td(f(s.inside95(), 3)))
                .append(td(f(s.meanNees(), 2))).append(td(Integer.toString(s.pastLimit())))
                .append(td(Integer.toString(s.warnedLate()))).append(td(f(s.medianSmoothedMaxErrorM(), 2)))
                .append(td(f(s.p95SmoothedMaxErrorM(), 2))).append(td(f(s.smoothedInside95(), 3)))
                .append(td(f(s.medianGapFillRatio(), 3))).append("</tr>\n");
    }

    private static void summaryTables(StringBuilder b, ReportModel m) {
        b.append("<section id=\"summary\">\n<h2>Summary per outage length</h2>\n<p>All logs together.</p>\n"
                + "<table>\n<tr>");
        if (m.comparing()) {
            b.append("<th class=\"l\">config</th>");
        }
        b.append(SUMMARY_HEAD);
        m.summaries().forEach((config, list) -> {
            for (LengthSummary s : list) {
                b.append("<tr>");
                if (m.comparing()) {
                    b.append("<td class=\"l\">").append(esc(config)).append("</td>");
                }
                summaryRow(b, s);
            }
        });
        b.append("</table>\n<p>Percentiles by linear interpolation between order statistics (Hyndman and Fan "
                + "definition 7). Inside 95%: share of all evaluation times with the reference inside the filter's "
                + "95% ellipse; about 0.95 for an honest covariance. Past limit: windows whose error passed the alert "
                + "limit; warned late: those of them in which it did so before the state turned unreliable. "
                + String.format(Locale.ROOT, "Percentages only over windows of at least %s m driven. ",
                g(WindowScore.MIN_DISTANCE_FOR_PCT_M))
                + "Smoothed: the gap fill of the same window by the Rauch-Tung-Striebel smoother, with the window's "
                + "fixes still withheld and the fixes of the " + g(m.options().smoothTailS()) + " s after it used; "
                + "its max error is the largest error anywhere inside the window, and the gap-fill ratio is that "
                + "error over the forward filter's final error (per window, then the median). A smoothed estimate "
                + "needs the data after the gap: it exists only after the fact, never live.</p>\n");
        b.append("<h3>Per log</h3>\n<table>\n<tr><th class=\"l\">log</th>");
        if (m.comparing()) {
            b.append("<th class=\"l\">config</th>");
        }
        b.append(SUMMARY_HEAD);
        m.byLog().forEach((log, perConfig) -> perConfig.forEach((config, list) -> {
            for (LengthSummary s : list) {
                b.append("<tr><td class=\"l\">").append(esc(log)).append("</td>");
                if (m.comparing()) {
                    b.append("<td class=\"l\">").append(esc(config)).append("</td>");
                }
                summaryRow(b, s);
            }
        }));
        b.append("</table>\n</section>\n");
        if (m.comparing()) {
            b.append("<section id=\"comparison\">\n<h2>Comparison (same windows)</h2>\n<p>Each configuration against "
                    + "the first, <b>").append(esc(m.configs().get(0).name())).append("</b>, on the windows both scored; "
                    + "difference = this configuration minus the first.</p>\n<table>\n<tr><th class=\"l\">config</th>"
                    + "<th>outage [s]</th><th class=\"l\">figure</th><th>first</th><th>this</th><th>difference</th>"
                    + "</tr>\n");
            m.comparisons().forEach((config, list) -> {
                for (ReportModel.Comparison c : list) {
                    String head = "<tr><td class=\"l\">" + esc(config) + "</td>" + td(g(c.seconds()));
                    b.append(head).append("<td class=\"l\">windows scored by both</td>")
                            .append(td(Integer.toString(c.pairs()))).append(td(Integer.toString(c.pairs())))
                            .append(td("0")).append("</tr>\n");
                    compare(b, head, "median final error [m]", c.a().medianFinalErrorM(), c.b().medianFinalErrorM(), 2);
                    compare(b, head, "p95 final error [m]", c.a().p95FinalErrorM(), c.b().p95FinalErrorM(), 2);
                    compare(b, head, "median error [% of distance]", c.a().medianErrorPct(), c.b().medianErrorPct(), 2);
                    compare(b, head, "inside 95% ellipse", c.a().inside95(), c.b().inside95(), 3);
                    compare(b, head, "warned late [windows]", c.a().warnedLate(), c.b().warnedLate(), 0);
                    b.append(head).append("<td class=\"l\">median of paired final error differences [m]</td>")
                            .append(td("&ndash;")).append(td("&ndash;")).append(td(signed(c.medianPairedDifference(), 3)))
                            .append("</tr>\n");
                }
            });
            b.append("</table>\n</section>\n");
        }
    }

    /** One figure of a comparison: the first's value, this one's, and the difference, each in its cell. */
    private static void compare(StringBuilder b, String head, String figure, double a, double v, int decimals) {
        b.append(head).append("<td class=\"l\">").append(esc(figure)).append("</td>").append(td(f(a, decimals)))
                .append(td(f(v, decimals))).append(td(signed(v - a, decimals))).append("</tr>\n");
    }

    private static void windowTable(StringBuilder b, ReportModel m) {
        b.append("<section id=\"windows\">\n<h2>Every window</h2>\n<details><summary>").append(m.rows().size())
                .append(" rows (also in outages.csv)</summary>\n<table>\n<tr><th class=\"l\">log</th>");
        if (m.comparing()) {
            b.append("<th class=\"l\">config</th>");
        }
        b.append("<th class=\"l\">kind</th><th>start after log start [s]</th><th>length [s]</th><th>distance [m]</th>"
                + "<th>final error [m]</th><th>max error [m]</th><th>error [% of distance]</th><th>inside 95%</th>"
                + "<th>along [m]</th><th>across [m]</th><th>time to limit [s]</th><th>warned late</th>"
                + "<th>smoothed max error [m]</th><th>smoothed inside 95%</th><th>fixes after</th>"
                + "<th>gap-fill ratio</th><th>odometry silent [s]</th></tr>\n");
        for (OutageRow r : m.rows()) {
            b.append("<tr><td class=\"l\">").append(esc(r.log())).append("</td>");
            if (m.comparing()) {
                b.append("<td class=\"l\">").append(esc(r.config())).append("</td>");
            }
            int dd = JsonReport.durationDecimals(r.timeDecimals(), m.options().evalStepS());
            b.append("<td class=\"l\">").append(r.kind().replace('_', ' ')).append("</td>")
                    .append(td(f(r.startOffsetS(), r.timeDecimals()))).append(td(f(r.lengthS(), r.timeDecimals())))
                    .append(td(f(r.distanceM(), 1))).append(td(f(r.finalErrorM(), 2))).append(td(f(r.maxErrorM(), 2)))
                    .append(td(f(r.errorPct(), 2))).append(td(f(r.inside95(), 2)))
                    .append(td(f(r.alongTrackErrorM(), 2))).append(td(f(r.crossTrackErrorM(), 2)))
                    .append(td(f(r.timeToLimitS(), dd))).append(td(r.warnedLate() ? "yes" : "no"))
                    .append(td(f(r.smoothedMaxErrorM(), 2))).append(td(f(r.smoothedInside95(), 2)))
                    .append(td(Integer.toString(r.smoothedFixesAfter()))).append(td(f(r.gapFillRatio(), 3)))
                    .append(td(f(r.odometryGapS(), r.timeDecimals()))).append("</tr>\n");
        }
        b.append("</table>\n</details>\n</section>\n");
    }

    /** Every planned window that was not scored, with the reason; and the count per reason. */
    private static void unscoredTable(StringBuilder b, ReportModel m) {
        int total = m.unscoredCount();
        b.append("<section id=\"unscored\">\n<h2>Windows planned but not scored</h2>\n");
        if (total == 0) {
            b.append("<p>Every planned window was scored.</p>\n</section>\n");
            return;
        }
        java.util.Map<UnscoredWindow.Reason, Integer> counts = new java.util.EnumMap<>(UnscoredWindow.Reason.class);
        for (ScoringRun.LogScores l : m.logs()) {
            for (UnscoredWindow u : l.unscored()) {
                counts.merge(u.reason(), u.count(), Integer::sum);
            }
        }
        b.append("<p>").append(total).append(total == 1 ? " planned window was" : " planned windows were")
                .append(" not scored.</p>\n<table>\n<tr><th class=\"l\">reason</th><th>windows</th></tr>\n");
        counts.forEach((reason, n) -> b.append("<tr><td class=\"l\">").append(esc(reason.words())).append("</td>")
                .append(td(Integer.toString(n))).append("</tr>\n"));
        b.append("</table>\n<table>\n<tr><th class=\"l\">log</th><th>start after log start [s]</th>"
                + "<th>length [s]</th><th>windows</th><th class=\"l\">reason</th></tr>\n");
        for (ScoringRun.LogScores l : m.logs()) {
            for (UnscoredWindow u : l.unscored()) {
                b.append("<tr><td class=\"l\">").append(esc(l.name())).append("</td>")
                        .append(td(f(u.startT() - l.startT(), l.timeDecimals())))
                        .append(td(g(u.lengthS()))).append(td(Integer.toString(u.count())))
                        .append("<td class=\"l\">").append(esc(u.reason().words())).append("</td></tr>\n");
            }
        }
        b.append("</table>\n");
        odometryGapTable(b, m);
        b.append("</section>\n");
    }

    /** The odometry gaps of every log, when there are any: where windows could not go. */
    private static void odometryGapTable(StringBuilder b, ReportModel m) {
        if (m.logs().stream().allMatch(l -> l.odometryGaps().isEmpty())) {
            return;
        }
        b.append("<h3 id=\"odometry-gaps\">Odometry gaps</h3>\n<p>Stretches where a wheel-speed or yaw-rate "
                + "stream was silent for longer than the filter allows (more than " + g(OdometryInterruption.GAP_FACTOR)
                + " of its usual intervals and more than " + g(OdometryInterruption.GAP_MIN_S) + " s), from its last "
                + "reading before to its first after; or where it had not begun or had ended.</p>\n<table>\n<tr><th class=\"l\">log</th><th class=\"l\">stream</th>"
                + "<th>start after log start [s]</th><th>length [s]</th></tr>\n");
        for (ScoringRun.LogScores l : m.logs()) {
            for (OdometryGap g : l.odometryGaps()) {
                b.append("<tr><td class=\"l\">").append(esc(l.name())).append("</td><td class=\"l\">")
                        .append(esc(g.stream().wireName())).append("</td>")
                        .append(td(f(g.startT() - l.startT(), l.timeDecimals())))
                        .append(td(f(g.lengthS(), l.timeDecimals()))).append("</tr>\n");
            }
        }
        b.append("</table>\n");
    }

    /** Most logs drawn with a curve of their own in the drift plot: beyond it the plot turns to a tangle. */
    static final int PER_LOG_CURVES = 12;

    private static String driftPlot(ReportModel m) {
        List<Charts.Line> lines = new ArrayList<>();
        int i = 0;
        for (var e : m.summaries().entrySet()) {
            XYSeries median = Charts.series(e.getKey() + " median, all logs");
            XYSeries p95 = Charts.series(e.getKey() + " p95, all logs");
            for (LengthSummary s : e.getValue()) {
                if (s.count() > 0) {
                    median.add(s.lengthS(), s.medianFinalErrorM());
                    p95.add(s.lengthS(), s.p95FinalErrorM());
                }
            }
            lines.add(new Charts.Line(median, Charts.configColor(i), Charts.solid(2.2f), true, true));
            lines.add(new Charts.Line(p95, Charts.configColor(i), Charts.dashed(2f), true, true));
            i++;
        }
        if (m.logs().size() > 1 && m.logs().size() <= PER_LOG_CURVES) {
            for (var perLog : m.byLog().entrySet()) {
                int ci = 0;
                for (var e : perLog.getValue().entrySet()) {
                    XYSeries median = Charts.series(perLog.getKey() + (m.comparing() ? " " + e.getKey() : "")
                            + " median");
                    for (LengthSummary s : e.getValue()) {
                        if (s.count() > 0) {
                            median.add(s.lengthS(), s.medianFinalErrorM());
                        }
                    }
                    java.awt.Color c = Charts.configColor(ci);
                    lines.add(new Charts.Line(median, new java.awt.Color(c.getRed(), c.getGreen(), c.getBlue(), 110),
                            Charts.solid(1f), true, true));
                    ci++;
                }
            }
        }
        return Charts.svg("Final error against outage length", "outage length (s)", "final horizontal error (m)",
                lines, 800, 460, false, "drift");
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

    private static String signed(double v, int decimals) {
        return Double.isFinite(v) ? String.format(Locale.ROOT, "%+." + decimals + "f", v) : "&ndash;";
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
