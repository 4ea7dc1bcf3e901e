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
 * @param smoothed         the smoothed gap fill of the same window, {@link Smoothed#NONE} until smoothed
 */
public record WindowScore(OutageWindow window, double distanceM, double finalErrorM, double maxErrorM,
                          double errorPct, double inside95, double meanNees, double finalNees, double timeToLimitS,
                          double timeToUnreliableS, boolean warnedLate, double alongTrackErrorM,
                          double crossTrackErrorM, double endEastM, double endNorthM, int samples,
                          double finalT, double finalEastM, double finalNorthM, double refEastM,
                          double refNorthM, Smoothed smoothed) {

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

    public WindowScore {
        java.util.Objects.requireNonNull(smoothed, "smoothed");
    }

    /** The forward scores alone, before the window is smoothed. */
    public WindowScore(OutageWindow window, double distanceM, double finalErrorM, double maxErrorM,
                       double errorPct, double inside95, double meanNees, double finalNees, double timeToLimitS,
                       double timeToUnreliableS, boolean warnedLate, double alongTrackErrorM,
                       double crossTrackErrorM, double endEastM, double endNorthM, int samples,
                       double finalT, double finalEastM, double finalNorthM, double refEastM,
                       double refNorthM) {
        this(window, distanceM, finalErrorM, maxErrorM, errorPct, inside95, meanNees, finalNees, timeToLimitS,
                timeToUnreliableS, warnedLate, alongTrackErrorM, crossTrackErrorM, endEastM, endNorthM, samples, finalT,
                finalEastM, finalNorthM, refEastM, refNorthM, Smoothed.NONE);
    }

    /** The same forward scores with the smoothed gap fill. */
    public WindowScore withSmoothed(Smoothed s) {
        return new WindowScore(window, distanceM, finalErrorM, maxErrorM, errorPct, inside95, meanNees, finalNees,
                timeToLimitS, timeToUnreliableS, warnedLate, alongTrackErrorM, crossTrackErrorM, endEastM, endNorthM,
                samples, finalT, finalEastM, finalNorthM, refEastM, refNorthM, s);
    }

    /**
     * The smoothed worst in-window error over the forward final error (unitless): how much of the
     * drift the fixes after the window take back. NaN when either is missing or the forward final
     * error is zero.
     */
    public double gapFillRatio() {
        return finalErrorM > 0.0 ? smoothed.maxErrorM() / finalErrorM : Double.NaN;
    }

    /**
     * The Rauch-Tung-Striebel smoothed estimate of a window, evaluated at the same times as the forward
     * one: the window's fixes withheld, the fixes after it used.
     *
     * @param finalErrorM horizontal error at the last evaluation (m), NaN when none
     * @param maxErrorM   largest horizontal error in the window (m), NaN when none
     * @param inside95    fraction of evaluations with the reference inside the smoothed 95% ellipse (0..1)
     * @param meanNees    mean normalised estimation error squared (unitless)
     * @param fixesAfter  fixes the filter used after the window, within the smoothing tail (count): with
     *                    none the smoothed estimate is only the forward one
     */
    public record Smoothed(double finalErrorM, double maxErrorM, double inside95, double meanNees, int fixesAfter) {

        /** Not smoothed. */
        public static final Smoothed NONE = new Smoothed(Double.NaN, Double.NaN, Double.NaN, Double.NaN, 0);
    }
}
