package org.wayhold.report;

import java.io.IOException;
import java.io.Writer;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;

/**
 * Writes {@code outages.csv}: one row per scored window (and configuration). The header's names are
 * {@code report.json}'s keys, with their units in them (RFC 4180 quoting; empty cells where a value
 * does not exist). Times are at the log's own precision.
 */
public final class CsvReport {

    /** The header: the keys of report.json's outage entries, units in the names. */
    public static final String HEADER = "log,config,kind,reference,start_t,start_offset_s,length_s,distance_m,"
            + "final_error_m,max_error_m,error_pct,inside95,end_lat,end_lon,ref_lat,ref_lon,time_to_limit_s,"
            + "time_to_unreliable_s,warned_late,mean_nees,final_nees,along_track_error_m,cross_track_error_m,"
            + "evaluations,smoothed_final_error_m,smoothed_max_error_m,smoothed_inside95,smoothed_mean_nees,"
            + "smoothed_fixes_after,gap_fill_ratio,odometry_gap_s";

    private CsvReport() {
    }

    public static void write(ReportModel m, Path file) throws IOException {
        try (Writer w = Files.newBufferedWriter(file, StandardCharsets.UTF_8)) {
            w.write(HEADER);
            w.write("\r\n");
            for (OutageRow r : m.rows()) {
                int td = r.timeDecimals();
                int dd = JsonReport.durationDecimals(td, m.options().evalStepS());
                w.write(String.join(",", quote(r.log()), quote(r.config()), r.kind(), r.reference(),
                        f(r.startT(), td), f(r.startOffsetS(), td), f(r.lengthS(), td), f(r.distanceM(), 4),
                        f(r.finalErrorM(), 4), f(r.maxErrorM(), 4), f(r.errorPct(), 4), f(r.inside95(), 4),
                        f(r.endLat(), 9), f(r.endLon(), 9), f(r.refLat(), 9), f(r.refLon(), 9),
                        f(r.timeToLimitS(), dd), f(r.timeToUnreliableS(), dd), Boolean.toString(r.warnedLate()),
                        f(r.meanNees(), 4), f(r.finalNees(), 4), f(r.alongTrackErrorM(), 4),
                        f(r.crossTrackErrorM(), 4), Integer.toString(r.evaluations()), f(r.smoothedFinalErrorM(), 4),
                        f(r.smoothedMaxErrorM(), 4), f(r.smoothedInside95(), 4), f(r.smoothedMeanNees(), 4),
                        Integer.toString(r.smoothedFixesAfter()), f(r.gapFillRatio(), 4),
                        f(r.odometryGapS(), td)));
                w.write("\r\n");
            }
        }
    }

    /** Rounded half-up to {@code decimals}, as report.json rounds; empty when the value does not exist. */
    private static String f(double v, int decimals) {
        return Double.isFinite(v) ? JsonReport.rounded(v, decimals).toPlainString() : "";
    }

    /** RFC 4180: a field with a comma, quote or line break is quoted and its quotes doubled. */
    static String quote(String s) {
        if (s.indexOf(',') < 0 && s.indexOf('"') < 0 && s.indexOf('\n') < 0 && s.indexOf('\r') < 0) {
            return s;
        }
        return '"' + s.replace("\"", "\"\"") + '"';
    }
}
