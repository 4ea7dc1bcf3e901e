package org.wayhold.simulate;

import org.wayhold.settings.Check;

/**
 * Urban-canyon fixes biased by non-line-of-sight reception, used instead of the scattered offsets of
 * {@link GnssSettings} when switched on.
 *
 * <p>Between tall buildings the receiver tracks satellites across the street through reflections off
 * the facades. A reflected signal travels further than the direct one, and its extra path lies across
 * the street, so the position is pulled across the street, by an amount that changes slowly as the
 * car moves along the facades and the satellites move. The model: each fix carries a bias of size
 * {@code m(t)} pointing perpendicular to the street (the car's heading), to one side; the side is drawn
 * afresh for each street (a new street starts at the canyon's entry and whenever the heading has turned
 * more than 45 degrees from the street's). {@code m(t) = minBiasM + (maxBiasM - minBiasM) * Phi(x(t))}
 * with x a unit first-order Gauss-Markov process of correlation time {@code timeConstantS} and Phi the
 * standard normal distribution function, so m wanders slowly and is uniform on [minBiasM, maxBiasM] in
 * the long run. Fewer direct satellites mean more reflected ones: the satellite count is
 * {@code maxSats - round((maxSats - minSats) * Phi(x))}. HDOP is the open-sky value times
 * {@code hdopFactor}; the reported {@code sigma_h} stays optimistic at {@code reportedSigmaHM}. Fixes are
 * still dropped with {@link GnssSettings#canyonDropProbability()}, and the ordinary noise is added.
 *
 * @param enabled         whether canyons use this model
 * @param minBiasM        smallest bias (m, >= 0)
 * @param maxBiasM        largest bias (m, >= minBiasM)
 * @param timeConstantS   correlation time of the bias (s, > 0)
 * @param reportedSigmaHM {@code sigma_h} the receiver reports inside canyons (m, > 0)
 * @param hdopFactor      HDOP inside canyons relative to open sky (unitless, >= 1)
 * @param minSats         fewest satellites (>= 4)
 * @param maxSats         most satellites (>= minSats)
 */
public record CanyonNlos(boolean enabled, double minBiasM, double maxBiasM, double timeConstantS,
                         double reportedSigmaHM, double hdopFactor, int minSats, int maxSats) {

    /**
     * 5-30 m, 30 s, sigma_h 2.5 m, HDOP doubled, 5-8 satellites: non-line-of-sight errors between
     * tall buildings are metres to tens of metres and change over tens of seconds (P. D. Groves,
     * Principles of GNSS, Inertial, and Multisensor Integrated Navigation Systems, 2nd ed., 2013,
     * ch. 10, from memory); receivers keep reporting their open-sky accuracy (common practice).
     */
    public static CanyonNlos off() {
        return new CanyonNlos(false, 5.0, 30.0, 30.0, 2.5, 2.0, 5, 8);
    }

    public CanyonNlos {
        Check.nonNegative("gnss.canyonNlos.minBiasM", minBiasM, "m");
        Check.nonNegative("gnss.canyonNlos.maxBiasM", maxBiasM, "m");
        Check.range("gnss.canyonNlos.maxBiasM", minBiasM, maxBiasM, "m");
        Check.positive("gnss.canyonNlos.timeConstantS", timeConstantS, "s");
        Check.positive("gnss.canyonNlos.reportedSigmaHM", reportedSigmaHM, "m");
        if (!(hdopFactor >= 1.0) || Double.isInfinite(hdopFactor)) {
            throw new IllegalArgumentException("gnss.canyonNlos.hdopFactor: must be a finite number >= 1, was "
                    + hdopFactor);
        }
        Check.atLeast("gnss.canyonNlos.minSats", minSats, 4);
        Check.atLeast("gnss.canyonNlos.maxSats", maxSats, minSats);
    }

    /** The same magnitudes, switched on. */
    public CanyonNlos on() {
        return new CanyonNlos(true, minBiasM, maxBiasM, timeConstantS, reportedSigmaHM, hdopFactor, minSats, maxSats);
    }

    /** The same magnitudes, switched on or off. */
    public CanyonNlos withEnabled(boolean value) {
        return new CanyonNlos(value, minBiasM, maxBiasM, timeConstantS, reportedSigmaHM, hdopFactor, minSats, maxSats);
    }

    /** This bias range (m), switched on. */
    public CanyonNlos withBiasM(double minM, double maxM) {
        return new CanyonNlos(true, minM, maxM, timeConstantS, reportedSigmaHM, hdopFactor, minSats, maxSats);
    }

    /** This correlation time (s), switched on. */
    public CanyonNlos withTimeConstantS(double value) {
        return new CanyonNlos(true, minBiasM, maxBiasM, value, reportedSigmaHM, hdopFactor, minSats, maxSats);
    }

    /** This reported sigma_h (m), switched on. */
    public CanyonNlos withReportedSigmaHM(double value) {
        return new CanyonNlos(true, minBiasM, maxBiasM, timeConstantS, value, hdopFactor, minSats, maxSats);
    }

    /** The standard normal distribution function: Phi(x) = erfc(-x / sqrt 2) / 2. */
    static double normalCdf(double x) {
        return 0.5 * erfc(-x / Math.sqrt(2.0));
    }

    /**
     * Complementary error function with a fractional error below 1.2e-7 everywhere: the Chebyshev fit
     * of W. H. Press et al., Numerical Recipes in C, 2nd ed., 1992, sec. 6.2. Written out rather than
     * taken from a library because the numerical core carries no statistics library, and a bias of
     * tens of metres needs no more digits.
     */
    static double erfc(double x) {
        double z = Math.abs(x);
        double t = 1.0 / (1.0 + 0.5 * z);
        double ans = t * StrictMath.exp(-z * z - 1.26551223 + t * (1.00002368 + t * (0.37409196 + t * (0.09678418
                + t * (-0.18628806 + t * (0.27886807 + t * (-1.13520398 + t * (1.48851587
                + t * (-0.82215223 + t * 0.17087277)))))))));
        return x >= 0.0 ? ans : 2.0 - ans;
    }
}
