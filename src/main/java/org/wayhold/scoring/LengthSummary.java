package org.wayhold.scoring;

import java.util.ArrayList;
import java.util.List;

/**
 * The windows of one outage length summed up.
 *
 * @param lengthS         outage length (s)
 * @param count           windows scored (count)
 * @param medianFinalErrorM median of the final horizontal error (m), NaN when no window
 * @param p95FinalErrorM  95th percentile of the final error (m), R-7 definition ({@link Quantiles})
 * @param maxFinalErrorM  largest final error (m)
 * @param medianErrorPct  median of the final error as a percentage of the distance (%), over the windows
 *                        with at least {@link WindowScore#MIN_DISTANCE_FOR_PCT_M} driven; NaN when none
 * @param p95ErrorPct     95th percentile of that percentage (%), over the same windows
 * @param inside95        fraction of all evaluation times of these windows at which the reference lay
 *                        inside the 95% ellipse (0..1; pooled, so long and short windows weigh by their
 *                        evaluations)
 * @param meanNees        mean NEES over all evaluation times (unitless, 2 for a consistent filter)
 * @param pastLimit       windows whose error passed the alert limit (count)
 * @param warnedLate      windows whose error passed the alert limit before the state turned
 *                        {@code unreliable} (count)
 * @param pctCount        windows long enough in distance for the percentage figures (count)
 * @param medianSmoothedMaxErrorM median of the smoothed gap fill's largest in-window error (m)
 * @param p95SmoothedMaxErrorM    95th percentile of that error (m, R-7)
 * @param smoothedInside95        fraction of all evaluation times at which the reference lay inside the
 *                                smoothed 95% ellipse (0..1, pooled)
 * @param medianGapFillRatio      median over the windows of the smoothed largest error over the forward
 *                                final error (unitless, {@link WindowScore#gapFillRatio()})
 */
public record LengthSummary(double lengthS, int count, double medianFinalErrorM, double p95FinalErrorM,
                            double maxFinalErrorM, double medianErrorPct, double p95ErrorPct, double inside95,
                            double meanNees, int pastLimit, int warnedLate, int pctCount,
                            double medianSmoothedMaxErrorM, double p95SmoothedMaxErrorM, double smoothedInside95,
                            double medianGapFillRatio) {

    /** Summaries of the windows of each length, in the order of {@code lengthsS}. */
    public static List<LengthSummary> byLength(List<WindowScore> scores, double[] lengthsS) {
        List<LengthSummary> out = new ArrayList<>();
        for (double len : lengthsS) {
            out.add(of(len, scores.stream().filter(w -> w.window().lengthS() == len).toList()));
        }
        return out;
    }

    /** The summary of windows of one length. */
    public static LengthSummary of(double lengthS, List<WindowScore> w) {
        double[] fin = w.stream().mapToDouble(WindowScore::finalErrorM).toArray();
        double[] pct = w.stream().mapToDouble(WindowScore::shownErrorPct).filter(Double::isFinite).toArray();
        double evaluations = w.stream().mapToDouble(WindowScore::samples).sum();
        double inside = evaluations == 0 ? Double.NaN
                : w.stream().filter(s -> s.samples() > 0).mapToDouble(s -> s.inside95() * s.samples()).sum()
                / evaluations;
        double nees = evaluations == 0 ? Double.NaN
                : w.stream().filter(s -> s.samples() > 0).mapToDouble(s -> s.meanNees() * s.samples()).sum()
                / evaluations;
        double max = w.stream().mapToDouble(WindowScore::finalErrorM).max().orElse(Double.NaN);
        int pastLimit = (int) w.stream().filter(s -> !Double.isNaN(s.timeToLimitS())).count();
        int late = (int) w.stream().filter(WindowScore::warnedLate).count();
        double[] smMax = w.stream().mapToDouble(s -> s.smoothed().maxErrorM()).filter(Double::isFinite).toArray();
        double[] ratio = w.stream().mapToDouble(WindowScore::gapFillRatio).filter(Double::isFinite).toArray();
        double smEvaluations = w.stream().filter(s -> Double.isFinite(s.smoothed().inside95()))
                .mapToDouble(WindowScore::samples).sum();
        double smInside = smEvaluations == 0 ? Double.NaN
                : w.stream().filter(s -> Double.isFinite(s.smoothed().inside95()))
                .mapToDouble(s -> s.smoothed().inside95() * s.samples()).sum() / smEvaluations;
        return new LengthSummary(lengthS, w.size(), Quantiles.median(fin), Quantiles.of(fin, 0.95), max,
                Quantiles.median(pct), Quantiles.of(pct, 0.95), inside, nees, pastLimit, late, pct.length,
                Quantiles.median(smMax), Quantiles.of(smMax, 0.95), smInside, Quantiles.median(ratio));
    }
}
