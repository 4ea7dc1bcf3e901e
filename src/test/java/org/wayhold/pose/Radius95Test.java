package org.wayhold.pose;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import org.apache.commons.math3.analysis.integration.IterativeLegendreGaussIntegrator;
import org.apache.commons.math3.distribution.NormalDistribution;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/**
 * The circular 95 % radius against the probability it claims, computed independently: Apache Commons
 * Math 3.6.1's normal distribution and adaptive Legendre-Gauss integration over the principal axes
 * (P(|x| <= R) = integral over x1 in [-R, R] of phi(x1; sigma1) (2 Phi(sqrt(R^2 - x1^2) / sigma2) - 1), with
 * x1 = R sin t so that the integrand is smooth at the ends).
 */
class Radius95Test {

    /** The probability that a zero-mean normal with axis sigmas s1, s2 lies inside the circle of radius r. */
    private static double probabilityWithin(double r, double s1, double s2) {
        NormalDistribution n1 = new NormalDistribution(null, 0.0, s1);
        NormalDistribution n2 = new NormalDistribution(null, 0.0, s2);
        IterativeLegendreGaussIntegrator integrator = new IterativeLegendreGaussIntegrator(16, 1e-10, 1e-12);
        return integrator.integrate(1_000_000, t -> {
            double c = Math.cos(t);
            return n1.density(r * Math.sin(t)) * (2.0 * n2.cumulativeProbability(r * c) - 1.0) * r * c;
        }, -0.5 * Math.PI, 0.5 * Math.PI);
    }

    @ParameterizedTest
    @CsvSource({
            // ee, en, nn (m^2): circular, elongated, rotated, nearly one-dimensional
            "4.0, 0.0, 4.0",
            "9.0, 0.0, 1.0",
            "2.0, 1.5, 3.0",
            "0.25, -0.2, 0.5",
            "100.0, 0.0, 0.01",
            "1.0, 0.0, 0.3"})
    void theRadiusHoldsNinetyFivePercentOfTheProbability(double ee, double en, double nn) {
        double r = Radius95.of(ee, en, nn);
        double mean = 0.5 * (ee + nn);
        double root = Math.hypot(0.5 * (ee - nn), en);
        double p = probabilityWithin(r, Math.sqrt(mean + root), Math.sqrt(mean - root));
        assertThat(p).isCloseTo(0.95, within(2e-6));
    }

    @Test
    void theLimitsAreTheCircularAndTheOneDimensionalQuantiles() {
        // Circular: R95 = sigma sqrt(-2 ln 0.05) = 2.44775 sigma (Rayleigh distribution). One axis only:
        // the two-sided 95 % quantile of a normal, 1.95996 sigma (NIST/SEMATECH e-Handbook 1.3.6.7.1).
        assertThat(Radius95.of(1.0, 0.0, 1.0)).isCloseTo(Math.sqrt(-2.0 * Math.log(0.05)), within(1e-5));
        assertThat(Radius95.of(1.0, 0.0, 0.0)).isCloseTo(1.959964, within(1e-5));
        assertThat(Radius95.of(0.0, 0.0, 0.0)).isZero();
        assertThat(Radius95.of(Double.NaN, 0.0, 1.0)).isNaN();
    }
}
