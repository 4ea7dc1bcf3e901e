package org.wayhold.pose;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;
import static org.assertj.core.api.Assertions.within;

import java.util.SplittableRandom;
import org.apache.commons.math3.distribution.ChiSquaredDistribution;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.EigenDecomposition;
import org.apache.commons.math3.linear.RealVector;
import org.junit.jupiter.api.Test;

class Ellipse95Test {

    /** The expected semi-axes are written to 3 decimals: half a unit of the last place. */
    private static final double PRINTED_HALF_UNIT_M = 0.0005;

    @Test
    void eastWestElongatedCovarianceGivesThePublishedAxesAndPointsEast() {
        // Hand case: cov ee = 4, nn = 1, en = 0 has eigenvalues 4 and 1, so the semi-axes are
        // sqrt(5.991 * 4) = 4.895 m and sqrt(5.991) = 2.448 m, with 5.991 the 0.95 quantile of chi-square
        // with 2 degrees of freedom (NIST/SEMATECH e-Handbook of Statistical Methods, 1.3.6.7.4). The
        // major axis lies east-west, which is 90 deg clockwise from north.
        Ellipse95 e = Ellipse95.of(4.0, 0.0, 1.0);
        assertThat(e.semiMajorM()).isCloseTo(4.895, within(PRINTED_HALF_UNIT_M));
        assertThat(e.semiMinorM()).isCloseTo(2.448, within(PRINTED_HALF_UNIT_M));
        assertThat(e.orientationDeg()).isCloseTo(90.0, within(1e-12));
    }

    @Test
    void handCasesOfOrientation() {
        // Exact hand cases: north-south elongation points at 0 deg; equal variances with a positive
        // east-north covariance elongate along north-east (45 deg clockwise from north), a negative
        // one along north-west (135 deg in [0, 180)).
        assertThat(Ellipse95.of(1.0, 0.0, 4.0).orientationDeg()).isCloseTo(0.0, within(1e-12));
        assertThat(Ellipse95.of(2.0, 1.0, 2.0).orientationDeg()).isCloseTo(45.0, within(1e-12));
        assertThat(Ellipse95.of(2.0, -1.0, 2.0).orientationDeg()).isCloseTo(135.0, within(1e-12));
        // Eigenvalues of [[2, 1], [1, 2]] are 3 and 1.
        Ellipse95 e = Ellipse95.of(2.0, 1.0, 2.0);
        assertThat(e.semiMajorM()).isCloseTo(Math.sqrt(3.0 * Ellipse95.SCALE_2DOF_95), within(1e-14));
        assertThat(e.semiMinorM()).isCloseTo(Math.sqrt(Ellipse95.SCALE_2DOF_95), within(1e-14));
    }

    @Test
    void scaleIsTheCommonsMathChiSquare95Quantile() {
        // Commons Math 3.6.1 ChiSquaredDistribution(2) inverse; its root finder is accurate to 1e-9.
        assertThat(Ellipse95.SCALE_2DOF_95)
                .isCloseTo(new ChiSquaredDistribution(2).inverseCumulativeProbability(0.95), within(1e-8));
    }

    @Test
    void axesAndOrientationMatchCommonsMathEigenDecompositionForRandomCovariances() {
        // Oracle: Commons Math 3.6.1 EigenDecomposition of the symmetric 2x2 matrix (exact to a few ulps).
        // Axes: 1e-12 relative to the major axis (both sides are within ~1e-15 of the truth).
        // Orientation: an eigenvector's direction is ill-conditioned when the eigenvalues are close (its
        // error is about eps l1 / (l1 - l2)), so it is compared to 1e-9 deg only when the eigenvalues
        // differ by at least 0.1%; closer ones are still checked for the axes.
        SplittableRandom rnd = new SplittableRandom(95L);
        int orientationChecks = 0;
        for (int n = 0; n < 100; n++) {
            double a = rnd.nextDouble(-3, 3);
            double b = rnd.nextDouble(-3, 3);
            double c = rnd.nextDouble(-3, 3);
            double d = rnd.nextDouble(-3, 3);
            double magnitude = Math.pow(10.0, rnd.nextDouble(-4, 4));
            // cov = M M' + 1e-3 I, scaled to m^2 between 1e-4 and 1e4: symmetric positive definite.
            double ee = magnitude * (a * a + b * b + 1e-3);
            double en = magnitude * (a * c + b * d);
            double nn = magnitude * (c * c + d * d + 1e-3);
            EigenDecomposition eig = new EigenDecomposition(new Array2DRowRealMatrix(new double[][] {{ee, en}, {en, nn}}));
            double[] lambda = eig.getRealEigenvalues();
            int major = lambda[0] >= lambda[1] ? 0 : 1;
            double l1 = lambda[major];
            double l2 = lambda[1 - major];
            RealVector v = eig.getEigenvector(major);
            double orientation = Math.toDegrees(Math.atan2(v.getEntry(0), v.getEntry(1)));

            Ellipse95 e = Ellipse95.of(ee, en, nn);
            double k = Ellipse95.SCALE_2DOF_95;
            assertThat(e.semiMajorM()).as("case %d", n).isCloseTo(Math.sqrt(k * l1), within(1e-12 * Math.sqrt(k * l1)));
            assertThat(e.semiMinorM()).as("case %d", n).isCloseTo(Math.sqrt(k * Math.max(l2, 0)),
                    within(1e-12 * Math.sqrt(k * l1)));
            assertThat(e.orientationDeg()).isGreaterThanOrEqualTo(0.0).isLessThan(180.0);
            if ((l1 - l2) / l1 >= 1e-3) {
                // An axis has no sign: compare directions modulo 180 deg.
                double diff = Math.IEEEremainder(e.orientationDeg() - orientation, 180.0);
                assertThat(diff).as("case %d orientation %s vs %s", n, e.orientationDeg(), orientation)
                        .isCloseTo(0.0, within(1e-9));
                orientationChecks++;
            }
        }
        assertThat(orientationChecks).isGreaterThan(90);
    }

    @Test
    void circularAndZeroCovariancesGiveValidEllipses() {
        Ellipse95 round = Ellipse95.of(2.0, 0.0, 2.0);
        assertThat(round.semiMajorM()).isEqualTo(round.semiMinorM());
        assertThat(round.orientationDeg()).isBetween(0.0, 180.0);
        Ellipse95 zero = Ellipse95.of(0.0, 0.0, 0.0);
        assertThat(zero.semiMajorM()).isZero();
        assertThat(zero.semiMinorM()).isZero();
    }

    @Test
    void axesInTheWrongOrderAreRefusedNamingBoth() {
        assertThatThrownBy(() -> new Ellipse95(1.0, 2.0, 0.0)).hasMessageContaining("semi_major")
                .hasMessageContaining("1.0").hasMessageContaining("2.0");
    }
}
