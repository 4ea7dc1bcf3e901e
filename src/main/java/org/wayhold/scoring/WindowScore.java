package org.wayhold.scoring;

/**
 * How the estimate drifted through one outage window.
 *
 * @param window           the window
 * @param distanceM        distance driven in the window (m, from the reference)
 * @param finalErrorM      horizontal error at the end (m)
 * @param maxErrorM        largest horizontal error in the window (m)
 * @param errorPct         final error as a percentage of the distance (%), NaN when the distance is 0;
 *                         reports show it only from {@link #MIN_DISTANCE_FOR_PCT_M} driven
 * @param inside95         fraction of evaluation times the reference lay inside the 95% ellipse (0..1)
 * @param meanNees         mean normalised estimation error squared of the horizontal position (unitless)
 * @param finalNees        normalised estimation error squared at the end of the window (unitless)
 * @param timeToLimitS     time from the start until the error first passed the alert limit
 *                         ({@code outage.alert_limit_m}) (s), NaN if never
 * @param timeToUnreliableS time from the start until the state turned {@code unreliable} (s), NaN if never
 * @param warnedLate       true when the error passed the alert limit before the state turned
 *                         {@code unreliable} (or the state never did)
 * @param alongTrackErrorM final error along the reference heading (m, positive ahead)
 * @param crossTrackErrorM final error across the reference heading (m, positive to the left)
 * @param endEastM         estimated east at the end (m)
 * @param endNorthM        estimated north at the end (m)
 * @param samples          evaluation times in the window (count)
 * @param finalT           time of the last evaluation (s, vehicle clock): the window's end on a regular
 *                         step, the last withheld fix when the reference is the fixes; NaN if none
 * @param finalEastM       estimated east at {@code finalT} (m), the position {@code finalErrorM} is of
 * @param finalNorthM      estimated north at {@code finalT} (m)
 * @param refEastM         reference east at {@code finalT} (m)
 * @param refNorthM        reference north at {@code finalT} (m)
 */
public record WindowScore(OutageWindow window, double distanceM, double finalErrorM, double maxErrorM,
                          double errorPct, double inside95, double meanNees, double finalNees, double timeToLimitS,
                          double timeToUnreliableS, boolean warnedLate, double alongTrackErrorM,
                          double crossTrackErrorM, double endEastM, double endNorthM, int samples,
                          double finalT, double finalEastM, double finalNorthM, double refEastM,
                          double refNorthM) {

    /**
     * Shortest distance driven for which the error is also given as a percentage of it (m): over a few
     * metres (a standstill, a crawl in a queue) a percentage says nothing about drift, and a small error
     * becomes thousands of percent. 50 m is 3 to 4 s at town speeds (a value of our own choosing).
     */
    public static final double MIN_DISTANCE_FOR_PCT_M = 50.0;

    /** The error as a percentage of the distance when at least {@link #MIN_DISTANCE_FOR_PCT_M} was driven, else NaN. */
    public double shownErrorPct() {
        return distanceM >= MIN_DISTANCE_FOR_PCT_M ? errorPct : Double.NaN;
    }
}
