package org.wayhold.scoring;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;
import static org.assertj.core.api.Assertions.within;

import java.util.Random;
import org.apache.commons.math3.stat.descriptive.rank.Percentile;
import org.apache.commons.math3.stat.descriptive.rank.Percentile.EstimationType;
import org.junit.jupiter.api.Test;

class QuantilesTest {

    /** Commons Math 3.6.1 Percentile with estimation type R_7 (Hyndman and Fan definition 7). */
    private static double commonsR7(double[] v, double p) {
        return new Percentile().withEstimationType(EstimationType.R_7).evaluate(v, p * 100.0);
    }

    @Test
    void medianAndP95MatchCommonsMathR7OnSeededSamplesOfManySizes() {
        Random random = new Random(20240611L);
        for (int n = 1; n <= 60; n++) {
            double[] v = new double[n];
            for (int i = 0; i < n; i++) {
                // Log-normal like drift figures: skewed, all positive.
                v[i] = Math.exp(random.nextGaussian());
            }
            for (double p : new double[] {0.01, 0.05, 0.5, 0.9, 0.95, 1.0}) {
                // Both interpolate the same two order statistics: agreement to rounding.
                assertThat(Quantiles.of(v, p)).as("n=%d p=%s", n, p).isCloseTo(commonsR7(v, p), within(1e-12));
            }
        }
    }

    @Test
    void theDefaultCommonsMathEstimatorIsADifferentDefinition() {
        // Guards the choice stated in the docs: Commons Math's default (LEGACY, position p(n+1))
        // differs from R-7 on this sample, so matching R_7 above is a real check.
        double[] v = {1, 2, 3, 4, 10};
        assertThat(new Percentile().evaluate(v, 95.0)).isNotCloseTo(commonsR7(v, 0.95), within(1e-6));
        // Exact hand case: h = 4 * 0.95 = 3.8, so 4 + 0.8 * (10 - 4) = 8.8.
        assertThat(Quantiles.of(v, 0.95)).isCloseTo(8.8, within(1e-12));
    }

    @Test
    void missingValuesAreLeftOutAndAnEmptySampleHasNoQuantile() {
        double[] v = {Double.NaN, 3, 1, Double.NaN, 2};
        assertThat(Quantiles.median(v)).isEqualTo(2.0);
        assertThat(Quantiles.median(new double[] {Double.NaN})).isNaN();
        assertThatThrownBy(() -> Quantiles.of(v, 1.5)).hasMessageContaining("p:");
    }
}
