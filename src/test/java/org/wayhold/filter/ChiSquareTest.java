package org.wayhold.filter;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;
import static org.assertj.core.api.Assertions.within;

import java.util.SplittableRandom;
import org.apache.commons.math3.distribution.ChiSquaredDistribution;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

class ChiSquareTest {

    /** The handbook prints its quantiles to 3 decimals: half a unit of the last place. */
    private static final double TABLE_HALF_UNIT = 0.0005;

    @ParameterizedTest
    @CsvSource({
            // NIST/SEMATECH e-Handbook of Statistical Methods, 1.3.6.7.4 "Critical values of the
            // chi-square distribution", row nu = 2, upper-tail areas 0.05, 0.01, 0.001.
            "0.95, 5.991",
            "0.99, 9.210",
            "0.999, 13.816"})
    void quantileMatchesTheNistSematechTableFor2Dof(double probability, double table) {
        assertThat(ChiSquare.quantile2Dof(probability)).isCloseTo(table, within(TABLE_HALF_UNIT));
    }

    @Test
    void quantileMatchesCommonsMathInverseCumulativeProbability() {
        // Apache Commons Math 3.6.1 ChiSquaredDistribution(2) inverts the regularised gamma function
        // with a root finder of absolute accuracy 1e-9; the closed form -2 ln(1 - p) is exact to a few
        // ulps. Near p = 1 the oracle cannot do better than the resolution of its own CDF: a change of
        // one ulp of 1.0 in the CDF moves x by ulp(1) / pdf(x), pdf(x) = (1 - p) / 2 for 2 dof. The
        // tolerance is 1e-8 plus four of those steps.
        ChiSquaredDistribution oracle = new ChiSquaredDistribution(2);
        SplittableRandom random = new SplittableRandom(20240611L);
        double[] fixed = {1e-9, 0.01, 0.5, 0.9, 0.95, 0.99, 0.999, 0.9999, 1.0 - 1e-9};
        for (double p : fixed) {
            assertAgreesWithCommonsMath(oracle, p);
        }
        for (int i = 0; i < 200; i++) {
            assertAgreesWithCommonsMath(oracle, random.nextDouble(1e-6, 1.0 - 1e-6));
        }
    }

    private static void assertAgreesWithCommonsMath(ChiSquaredDistribution oracle, double p) {
        double tol = 1e-8 + 4.0 * Math.ulp(1.0) / (0.5 * (1.0 - p));
        assertThat(ChiSquare.quantile2Dof(p)).as("p = %s", p)
                .isCloseTo(oracle.inverseCumulativeProbability(p), within(tol));
    }

    @Test
    void quantileInvertsTheCommonsMathCumulativeProbability() {
        // The forward direction of the same oracle is a closed-form gamma evaluation, accurate to ~1e-15.
        ChiSquaredDistribution oracle = new ChiSquaredDistribution(2);
        for (double p = 0.01; p < 1.0; p += 0.01) {
            assertThat(oracle.cumulativeProbability(ChiSquare.quantile2Dof(p))).isCloseTo(p, within(1e-13));
        }
    }

    @Test
    void probabilityOutsideTheOpenUnitIntervalIsRefusedWithItsValue() {
        assertThatThrownBy(() -> ChiSquare.quantile2Dof(1.0)).hasMessageContaining("probability")
                .hasMessageContaining("1.0");
        assertThatThrownBy(() -> ChiSquare.quantile2Dof(0.0)).hasMessageContaining("probability");
        assertThatThrownBy(() -> ChiSquare.quantile2Dof(Double.NaN)).hasMessageContaining("probability");
    }
}
