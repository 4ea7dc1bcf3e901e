package org.wayhold.filter;

import static org.assertj.core.api.Assertions.assertThat;

import java.util.SplittableRandom;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/**
 * The predict's covariance product skips the structural zeros of F. Checked here against the plain
 * dense triple loop (an exact hand-written reference: sum over l of F[i][l] P[l][j], then of
 * (F P)[i][l] F[j][l], in ascending l): the results must agree bit for bit, because the sparse product
 * adds the same nonzero terms in the same order. F comes from {@link MotionModel#step} itself, so the
 * test also fails if the motion model ever fills an entry outside the pattern the product assumes.
 * P is a seeded random symmetric positive definite matrix (B B' + I / 10).
 */
class SparseCovarianceProductTest {

    private static final int N = StateIndex.SIZE;

    @ParameterizedTest(name = "wheel {0} m/s, rate {1} rad/s, dt {2} s, standstill {3}")
    @CsvSource({
        "15.0, 0.05, 0.01, false",
        "12.0, 0.0, 0.01, false",
        "-3.0, -0.4, 0.1, false",
        "0.0, 0.002, 0.02, true",
        "30.0, 1e-7, 0.013, false"})
    void sparsePredictProductEqualsTheDenseOneBitForBit(double wheelMps, double rateRadPerS, double dtS,
                                                       boolean standstill) {
        SplittableRandom rnd = new SplittableRandom(Double.doubleToLongBits(wheelMps + rateRadPerS + dtS));
        double[] x = {12.0, -40.0, 2.9, 0.003, 1.02, 0.985, 0.4, -0.7, 1.3, -0.2, 0.08};
        double[] xOut = new double[N];
        double[] f = new double[N * N];
        double[] g = new double[6];
        MotionModel.step(x, wheelMps, rateRadPerS, dtS, standstill, Math.exp(-dtS / 40.0), xOut, f, g);
        double[] p = randomCovariance(rnd);

        double[] dense = multiplyTransposed(multiply(f, p), f);
        double[] sparse = p.clone();
        CovariancePrediction.predict(f, sparse, new double[N * N]);

        for (int i = 0; i < N * N; i++) {
            assertThat(Double.doubleToRawLongBits(sparse[i])).as("entry %d: sparse %s, dense %s", i, sparse[i],
                    dense[i]).isEqualTo(Double.doubleToRawLongBits(dense[i]));
        }
    }

    private static double[] randomCovariance(SplittableRandom rnd) {
        double[] b = new double[N * N];
        for (int i = 0; i < b.length; i++) {
            b[i] = rnd.nextDouble(-1.0, 1.0);
        }
        double[] p = multiplyTransposed(b, b);
        for (int i = 0; i < N; i++) {
            p[i * N + i] += 0.1;
        }
        return p;
    }

    private static double[] multiply(double[] a, double[] b) {
        double[] c = new double[N * N];
        for (int i = 0; i < N; i++) {
            for (int j = 0; j < N; j++) {
                double acc = 0.0;
                for (int l = 0; l < N; l++) {
                    acc += a[i * N + l] * b[l * N + j];
                }
                c[i * N + j] = acc;
            }
        }
        return c;
    }

    private static double[] multiplyTransposed(double[] a, double[] b) {
        double[] c = new double[N * N];
        for (int i = 0; i < N; i++) {
            for (int j = 0; j < N; j++) {
                double acc = 0.0;
                for (int l = 0; l < N; l++) {
                    acc += a[i * N + l] * b[j * N + l];
                }
                c[i * N + j] = acc;
            }
        }
        return c;
    }
}
