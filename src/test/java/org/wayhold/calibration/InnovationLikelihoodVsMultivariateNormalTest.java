package org.wayhold.calibration;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import java.util.SplittableRandom;
import org.hipparchus.distribution.multivariate.MultivariateNormalDistribution;
import org.hipparchus.linear.Array2DRowRealMatrix;
import org.hipparchus.linear.MatrixUtils;
import org.hipparchus.linear.RealMatrix;
import org.junit.jupiter.api.Test;
import org.wayhold.filter.GnssOutcome;
import org.wayhold.filter.NavigationFilter;
import org.wayhold.filter.StateIndex;
import org.wayhold.sample.GnssFix;
import org.wayhold.settings.FilterSettings;
import org.wayhold.settings.GatingSettings;
import org.wayhold.settings.OutageSettings;
import org.wayhold.settings.VehicleProfile;

/**
 * The innovation log-likelihood the calibration maximises, checked against the log density of the
 * stacked observations computed directly with Hipparchus 4.0.2's {@code MultivariateNormalDistribution}.
 *
 * <p>In a linear Gaussian state-space model the sum over fixes of -(2 ln 2 pi + ln det S + NIS) / 2 from
 * the Kalman filter equals ln p(z_1, ..., z_n), the joint Gaussian density of all fixes (the
 * prediction-error decomposition: Schweppe, IEEE Trans. Information Theory 11(1), 1965; Harvey, 1989,
 * sec. 3.4). The filter is made linear as in the project's Commons Math comparison: yaw, gyro bias and
 * scale, lever arm and latency known exactly (variance 0), no turn, a constant wheel speed, no wheel or
 * gyro noise (whose gain would follow the estimated scale). The unknowns are the position, the odometer
 * scale (a linear factor of the known distance per step) and the Gauss-Markov GNSS error. The reference
 * builds the mean and covariance of the stacked fixes from that model alone: x_j = M x_(j-1) + c + w_j
 * between fixes (M = A^16, w of covariance sum A^i Q A'^i), Cov(x_i, x_j) = M^(i-j) Var(x_j), and
 * z_j = H x_j + v_j.
 *
 * <p>Tolerance 1e-9 relative: both sides are exact in exact arithmetic and differ by rounding in a
 * 12-dimensional determinant and quadratic form.
 */
class InnovationLikelihoodVsMultivariateNormalTest {

    private static final double DT_S = 1.0 / 16.0;
    private static final int STEPS_PER_FIX = 16;
    private static final int FIXES = 6;
    private static final double SIGMA_M = 1.2;
    private static final double SHARE = 0.6;
    private static final double TAU_S = 20.0;

    @Test
    void sumOfInnovationTermsIsTheJointDensityOfTheFixes() {
        double yaw = 0.7;
        double wheel = 12.0;
        double scale0 = 1.01;
        double c = Math.cos(yaw);
        double sn = Math.sin(yaw);
        double corr = SHARE * SIGMA_M * SIGMA_M;
        double white = (1.0 - SHARE) * SIGMA_M * SIGMA_M;
        double decay = Math.exp(-DT_S / TAU_S);

        // Reduced state (east, north, odometer scale, GNSS error east, north) and its prior.
        double[] m0 = {3.0, -2.0, scale0, 0.4, -0.3};
        double[][] p0 = {
                {4.0, 0.7, 0.0, -0.5 * corr, 0.0},
                {0.7, 2.5, 0.0, 0.0, -0.5 * corr},
                {0.0, 0.0, 1e-4, 0.0, 0.0},
                {-0.5 * corr, 0.0, 0.0, corr, 0.0},
                {0.0, -0.5 * corr, 0.0, 0.0, corr}};
        int[] full = {StateIndex.EAST, StateIndex.NORTH, StateIndex.SPEED_SCALE, StateIndex.GNSS_ERR_EAST,
                StateIndex.GNSS_ERR_NORTH};

        NavigationFilter filter = new NavigationFilter(settings(), GatingSettings.defaults(), OutageSettings.defaults(),
                new VehicleProfile(0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 1.0, 1.0));
        double[] x0 = new double[StateIndex.SIZE];
        double[] cov0 = new double[StateIndex.SIZE * StateIndex.SIZE];
        x0[StateIndex.YAW] = yaw;
        x0[StateIndex.GYRO_SCALE] = 1.0;
        for (int i = 0; i < 5; i++) {
            x0[full[i]] = m0[i];
            for (int j = 0; j < 5; j++) {
                cov0[full[i] * StateIndex.SIZE + full[j]] = p0[i][j];
            }
        }
        filter.initialize(0.0, x0, cov0);
        filter.predictTo(0.0);
        filter.setWheelSpeed(wheel);
        filter.setYawRate(0.0);

        double[][] z = fixes(yaw, wheel, scale0, decay);
        double sum = 0.0;
        int step = 0;
        for (int k = 0; k < FIXES; k++) {
            for (int j = 0; j < STEPS_PER_FIX; j++) {
                step++;
                filter.predictTo(step * DT_S);
                filter.setWheelSpeed(wheel);
                filter.setYawRate(0.0);
            }
            GnssOutcome outcome = filter.updateGnss(GnssFix.position(step * DT_S, 0.0, 0.0, SIGMA_M), z[k][0],
                    z[k][1], Double.NaN);
            assertThat(outcome.kind()).as("fix %d is used, so the filter is the plain Kalman filter", k)
                    .isEqualTo(GnssOutcome.Kind.ACCEPTED);
            sum += InnovationLikelihood.positionTerm(filter.lastNis(), filter.lastLogDetS());
        }

        // The model, one step: east and north move by v dt (cos, sin) per unit of scale, GNSS errors decay.
        RealMatrix a = MatrixUtils.createRealIdentityMatrix(5);
        a.setEntry(0, 2, wheel * DT_S * c);
        a.setEntry(1, 2, wheel * DT_S * sn);
        a.setEntry(3, 3, decay);
        a.setEntry(4, 4, decay);
        RealMatrix q = new Array2DRowRealMatrix(5, 5);
        q.setEntry(3, 3, corr * (1.0 - decay * decay));
        q.setEntry(4, 4, corr * (1.0 - decay * decay));
        RealMatrix m = MatrixUtils.createRealIdentityMatrix(5);
        RealMatrix qf = new Array2DRowRealMatrix(5, 5);
        for (int i = 0; i < STEPS_PER_FIX; i++) {
            // Over one more step: w' = A w + q.
            qf = a.multiply(qf).multiplyTransposed(a).add(q);
            m = a.multiply(m);
        }
        RealMatrix h = new Array2DRowRealMatrix(new double[][] {{1, 0, 0, 1, 0}, {0, 1, 0, 0, 1}});
        RealMatrix[] var = new RealMatrix[FIXES];
        double[][] mean = new double[FIXES][];
        RealMatrix v = new Array2DRowRealMatrix(p0);
        double[] mu = m0.clone();
        for (int k = 0; k < FIXES; k++) {
            v = m.multiply(v).multiplyTransposed(m).add(qf);
            mu = m.operate(mu);
            var[k] = v;
            mean[k] = mu.clone();
        }
        double[] zMean = new double[2 * FIXES];
        double[][] zCov = new double[2 * FIXES][2 * FIXES];
        double[] zAll = new double[2 * FIXES];
        for (int i = 0; i < FIXES; i++) {
            double[] hm = h.operate(mean[i]);
            zMean[2 * i] = hm[0];
            zMean[2 * i + 1] = hm[1];
            zAll[2 * i] = z[i][0];
            zAll[2 * i + 1] = z[i][1];
            for (int j = 0; j <= i; j++) {
                // Cov(x_i, x_j) = M^(i-j) Var(x_j) for i >= j.
                RealMatrix cross = var[j];
                for (int r = j; r < i; r++) {
                    cross = m.multiply(cross);
                }
                RealMatrix block = h.multiply(cross).multiplyTransposed(h);
                if (i == j) {
                    block = block.add(MatrixUtils.createRealDiagonalMatrix(new double[] {white, white}));
                }
                for (int r = 0; r < 2; r++) {
                    for (int s = 0; s < 2; s++) {
                        zCov[2 * i + r][2 * j + s] = block.getEntry(r, s);
                        zCov[2 * j + s][2 * i + r] = block.getEntry(r, s);
                    }
                }
            }
        }
        double reference = Math.log(new MultivariateNormalDistribution(zMean, zCov).density(zAll));
        assertThat(sum).isCloseTo(reference, within(1e-9 * Math.abs(reference)));
    }

    /** Fixes drawn from the model itself (seeded): truth from the prior mean plus correlated and white error. */
    private static double[][] fixes(double yaw, double wheel, double scale, double decay16) {
        SplittableRandom rnd = new SplittableRandom(42L);
        double decay = Math.pow(decay16, STEPS_PER_FIX);
        double corrSigma = Math.sqrt(SHARE) * SIGMA_M;
        double whiteSigma = Math.sqrt(1.0 - SHARE) * SIGMA_M;
        double errE = 0.4;
        double errN = -0.3;
        double[][] z = new double[FIXES][2];
        for (int i = 0; i < FIXES; i++) {
            double t = (i + 1) * STEPS_PER_FIX * DT_S;
            errE = decay * errE + corrSigma * Math.sqrt(1 - decay * decay) * gaussian(rnd);
            errN = decay * errN + corrSigma * Math.sqrt(1 - decay * decay) * gaussian(rnd);
            z[i][0] = 3.5 + scale * wheel * t * Math.cos(yaw) + errE + whiteSigma * gaussian(rnd);
            z[i][1] = -2.2 + scale * wheel * t * Math.sin(yaw) + errN + whiteSigma * gaussian(rnd);
        }
        return z;
    }

    private static double gaussian(SplittableRandom rnd) {
        double u1 = 1.0 - rnd.nextDouble();
        double u2 = rnd.nextDouble();
        return Math.sqrt(-2.0 * Math.log(u1)) * Math.cos(2.0 * Math.PI * u2);
    }

    /**
     * Default GNSS handling with the fixes' sigma as the default; no wheel, gyro, random-walk,
     * rate-proportional or sideslip noise; no tyre growth; no geometry floor.
     */
    private static FilterSettings settings() {
        FilterSettings d = FilterSettings.defaults();
        return new FilterSettings(0.0, 16.0, 0.0, 16.0, 0.0, 0.0,
                d.initialYawSigmaRad(), d.initialGyroBiasSigmaRadPerS(), d.initialSpeedScaleSigma(),
                d.gnssFloorM(), d.gnssRangeErrorM(), SIGMA_M, null, SHARE, TAU_S,
                d.gnssVelocityMinSpeedMps(), d.gnssSpeedSigmaMps(), d.gnssCourseSigmaDeg(), d.standstillAfterS(),
                d.headingInitMinDistanceM(), 0.0, 0.0, 0.0, 0.0, d.wheelSpeedZeroBelowMps(), d.minTurnRadiusM(), 0.0,
                0.0);
    }
}
