package org.wayhold.filter;

/**
 * Chi-square quantiles for the two-dimensional tests the filter and the pose need.
 *
 * <p>For 2 degrees of freedom the chi-square distribution is exponential with mean 2, so its
 * cumulative distribution is 1 - exp(-x/2) and the quantile has the closed form -2 ln(1 - p)
 * (NIST/SEMATECH e-Handbook of Statistical Methods, 1.3.6.6.6; table values 1.3.6.7.4).
 */
public final class ChiSquare {

    private ChiSquare() {
    }

    /**
     * The p-quantile of the chi-square distribution with 2 degrees of freedom.
     *
     * @param probability cumulative probability (unitless, strictly between 0 and 1)
     */
    public static double quantile2Dof(double probability) {
        if (!(probability > 0.0 && probability < 1.0)) {
            throw new IllegalArgumentException("probability: must lie strictly between 0 and 1, was " + probability);
        }
        return -2.0 * Math.log1p(-probability);
    }
}
