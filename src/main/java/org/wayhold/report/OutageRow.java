package org.wayhold.report;

/**
 * One scored window as it appears in the report.
 *
 * @param log               the log's name
 * @param config            the configuration's name
 * @param kind              {@code simulated} or {@code real_gap}
 * @param reference         {@code reference} or {@code withheld_fixes}
 * @param startT            start (s, log clock)
 * @param offsetS           start after the log's first sample (s)
 * @param seconds           length (s)
 * @param meters            distance driven in the window (m, from the reference)
 * @param finalError        horizontal error at the last evaluation (m)
 * @param maxError          largest horizontal error (m)
 * @param errorPct          final error as a percentage of the distance (%), NaN when no distance
 * @param inside95          fraction of evaluations with the reference inside the 95% ellipse (0..1)
 * @param endLat            estimated latitude at the last evaluation (deg, WGS-84)
 * @param endLon            estimated longitude at the last evaluation (deg, WGS-84)
 * @param refLat            reference latitude at the last evaluation (deg, WGS-84)
 * @param refLon            reference longitude at the last evaluation (deg, WGS-84)
 * @param timeToAlert       time until the error passed the alert limit (s), NaN if never
 * @param timeToUnreliable  time until the state turned unreliable (s), NaN if never
 * @param missedAlert       the error passed the alert limit before the state turned unreliable
 * @param meanNees          mean NEES (unitless)
 * @param finalNees         NEES at the end (unitless)
 * @param alongTrackError   final error along the reference direction (m, positive ahead)
 * @param crossTrackError   final error across it (m, positive left)
 * @param evaluations       evaluation times (count)
 * @param smoothedFinalError   horizontal error of the smoothed gap fill at the last evaluation (m)
 * @param smoothedMaxError     largest horizontal error of the smoothed gap fill (m)
 * @param smoothedInside95     fraction of evaluations inside the smoothed 95% ellipse (0..1)
 * @param smoothedMeanNees     mean NEES of the smoothed gap fill (unitless)
 * @param smoothedFixesAfter   fixes after the window the smoother used (count)
 * @param gapFillRatio         smoothed largest error over the forward final error (unitless)
 */
public record OutageRow(String log, String config, String kind, String reference, double startT, double offsetS,
                        double seconds, double meters, double finalError, double maxError, double errorPct,
                        double inside95, double endLat, double endLon, double refLat, double refLon,
                        double timeToAlert, double timeToUnreliable, boolean missedAlert, double meanNees,
                        double finalNees, double alongTrackError, double crossTrackError, int evaluations,
                        double smoothedFinalError, double smoothedMaxError, double smoothedInside95,
                        double smoothedMeanNees, int smoothedFixesAfter, double gapFillRatio) {

    public static final String SIMULATED = "simulated";
    public static final String REAL_GAP = "real_gap";
}
