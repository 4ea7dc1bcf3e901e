package org.wayhold.scoring;

import java.util.Arrays;

/**
 * Sample quantiles by linear interpolation between order statistics: for n sorted values and a
 * probability p the position is h = (n - 1) p, and the quantile is x[floor h] + (h - floor h)
 * (x[floor h + 1] - x[floor h]). This is definition 7 of Hyndman and Fan, "Sample quantiles in
 * statistical packages", The American Statistician 50(4), 1996 (the default of R and NumPy, and
 * Commons Math's {@code Percentile.EstimationType.R_7}). It never leaves the range of the data, which
 * suits small counts of outage windows.
 */
public final class Quantiles {

    private Quantiles() {
    }

    /**
     * The p-quantile of the finite values; NaN values (metrics that do not exist for a window) are
     * left out.
     *
     * @param values the sample (not modified)
     * @param p      probability (unitless, [0, 1])
     * @return the quantile, NaN when no finite value is left
     */
    public static double of(double[] values, double p) {
        if (!(p >= 0.0 && p <= 1.0)) {
            throw new IllegalArgumentException("p: must be a probability in [0, 1], was " + p);
        }
        double[] v = Arrays.stream(values).filter(x -> !Double.isNaN(x)).sorted().toArray();
        if (v.length == 0) {
            return Double.NaN;
        }
        double h = (v.length - 1) * p;
        int lo = (int) Math.floor(h);
        int hi = Math.min(lo + 1, v.length - 1);
        return v[lo] + (h - lo) * (v[hi] - v[lo]);
    }

    /** The median: {@code of(values, 0.5)}. */
    public static double median(double[] values) {
        return of(values, 0.5);
    }
}
