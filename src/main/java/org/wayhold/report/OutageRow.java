package org.wayhold.report;

/**
 * One scored window as it appears in the report; the JSON and CSV keys are the component names in
 * snake case with their units ({@code start_t}, {@code length_s}, {@code distance_m}, ...).
 *
 * @param log               the log's name
 * @param config            the configuration's name
 * @param kind              {@code simulated} or {@code real_gap}
 * @param reference         {@code reference} or {@code withheld_fixes}
 * @param startT            start (s, log clock)
 * @param startOffsetS      start after the log's first sample (s)
 * @param lengthS           length (s)
 * @param distanceM         distance driven in the window (m, from the reference)
 * @param finalErrorM       horizontal error at the last evaluation (m)
 * @param maxErrorM         largest horizontal error (m)
 * @param errorPct          final error as a percentage of the distance (%), NaN under
 *                          {@link org.wayhold.scoring.WindowScore#MIN_DISTANCE_FOR_PCT_M} driven
 * @param inside95          fraction of evaluations with the reference inside the 95% ellipse (0..1)
 * @param endLat            estimated latitude at the last evaluation (deg, WGS-84)
 * @param endLon            estimated longitude at the last evaluation (deg, WGS-84)
 * @param refLat            reference latitude at the last evaluation (deg, WGS-84)
 * @param refLon            reference longitude at the last evaluation (deg, WGS-84)
 * @param timeToLimitS      time until the error passed the alert limit (s), NaN if never
 * @param timeToUnreliableS time until the state turned unreliable (s), NaN if never
 * @param warnedLate        the error passed the alert limit before the state turned unreliable
 * @param meanNees          mean NEES (unitless)
 * @param finalNees         NEES at the end (unitless)
 * @param alongTrackErrorM  final error along the reference direction (m, positive ahead)
 * @param crossTrackErrorM  final error across it (m, positive left)
 * @param evaluations       evaluation times (count)
 * @param smoothedFinalErrorM horizontal error of the smoothed gap fill at the last evaluation (m)
 * @param smoothedMaxErrorM   largest horizontal error of the smoothed gap fill (m)
 * @param smoothedInside95    fraction of evaluations inside the smoothed 95% ellipse (0..1)
 * @param smoothedMeanNees    mean NEES of the smoothed gap fill (unitless)
 * @param smoothedFixesAfter  fixes after the window the smoother used (count)
 * @param gapFillRatio        smoothed largest error over the forward final error (unitless)
 * @param odometryGapS        seconds of the window in which a wheel-speed or yaw-rate stream was silent
 *                            (an odometry gap); always 0 for a simulated window, which is never placed
 *                            over one; above 0 a real gap's error owes to the missing readings too
 * @param timeDecimals      decimals of the log's own times, the precision its times are given in
 */
public record OutageRow(String log, String config, String kind, String reference, double startT, double startOffsetS,
                        double lengthS, double distanceM, double finalErrorM, double maxErrorM, double errorPct,
                        double inside95, double endLat, double endLon, double refLat, double refLon,
                        double timeToLimitS, double timeToUnreliableS, boolean warnedLate, double meanNees,
                        double finalNees, double alongTrackErrorM, double crossTrackErrorM, int evaluations,
                        double smoothedFinalErrorM, double smoothedMaxErrorM, double smoothedInside95,
                        double smoothedMeanNees, int smoothedFixesAfter, double gapFillRatio, double odometryGapS,
                        int timeDecimals) {

    public static final String SIMULATED = "simulated";
    public static final String REAL_GAP = "real_gap";
}
