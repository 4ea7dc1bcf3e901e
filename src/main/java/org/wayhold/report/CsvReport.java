package org.wayhold.report;

import java.io.IOException;
import java.io.Writer;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Locale;

/**
 * Writes {@code outages.csv}: one row per scored window (and configuration), with the unit of each
 * column in its header (RFC 4180 quoting; empty cells where a value does not exist).
 */
public final class CsvReport {

    /** The header; units in brackets. */
    public static final String HEADER = "log,config,kind,reference,start_t[s],start_offset[s],seconds[s],meters[m],"
            + "final_error[m],max_error[m],error_pct[%],inside95[fraction],end_lat[deg],end_lon[deg],"
            + "ref_lat[deg],ref_lon[deg],time_to_alert[s],time_to_unreliable[s],missed_alert[bool],"
            + "mean_nees[1],final_nees[1],along_track_error[m],cross_track_error[m],evaluations[count],"
            + "smoothed_final_error[m],smoothed_max_error[m],smoothed_inside95[fraction],smoothed_mean_nees[1],"
            + "smoothed_fixes_after[count],gap_fill_ratio[1]";

    private CsvReport() {
    }

    public static void write(ReportModel m, Path file) throws IOException {
        try (Writer w = Files.newBufferedWriter(file, StandardCharsets.UTF_8)) {
            w.write(HEADER);
            w.write("\r\n");
            for (OutageRow r : m.rows()) {
                w.write(String.join(",", quote(r.log()), quote(r.config()), r.kind(), r.reference(),
                        f(r.startT(), 3), f(r.offsetS(), 3), f(r.seconds(), 3), f(r.meters(), 4),
                        f(r.finalError(), 4), f(r.maxError(), 4), f(r.errorPct(), 4), f(r.inside95(), 4),
                        f(r.endLat(), 9), f(r.endLon(), 9), f(r.refLat(), 9), f(r.refLon(), 9),
                        f(r.timeToAlert(), 3), f(r.timeToUnreliable(), 3), Boolean.toString(r.missedAlert()),
                        f(r.meanNees(), 4), f(r.finalNees(), 4), f(r.alongTrackError(), 4),
                        f(r.crossTrackError(), 4), Integer.toString(r.evaluations()), f(r.smoothedFinalError(), 4),
                        f(r.smoothedMaxError(), 4), f(r.smoothedInside95(), 4), f(r.smoothedMeanNees(), 4),
                        Integer.toString(r.smoothedFixesAfter()), f(r.gapFillRatio(), 4)));
                w.write("\r\n");
            }
        }
    }

    private static String f(double v, int decimals) {
        return Double.isFinite(v) ? String.format(Locale.ROOT, "%." + decimals + "f", v) : "";
    }

    /** RFC 4180: a field with a comma, quote or line break is quoted and its quotes doubled. */
    static String quote(String s) {
        if (s.indexOf(',') < 0 && s.indexOf('"') < 0 && s.indexOf('\n') < 0 && s.indexOf('\r') < 0) {
            return s;
        }
        return '"' + s.replace("\"", "\"\"") + '"';
    }
}
