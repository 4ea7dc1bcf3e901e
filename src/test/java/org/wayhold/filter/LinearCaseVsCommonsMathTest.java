package org.wayhold.filter;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;
import static org.wayhold.filter.StateIndex.EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_NORTH;
import static org.wayhold.filter.StateIndex.GYRO_BIAS;
import static org.wayhold.filter.StateIndex.NORTH;
import static org.wayhold.filter.StateIndex.SIZE;
import static org.wayhold.filter.StateIndex.SPEED_SCALE;
import static org.wayhold.filter.StateIndex.YAW;

import java.util.SplittableRandom;
import org.apache.commons.math3.filter.DefaultMeasurementModel;
import org.apache.commons.math3.filter.DefaultProcessModel;
import org.apache.commons.math3.filter.KalmanFilter;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.RealMatrix;
import org.junit.jupiter.api.Test;
import org.wayhold.settings.FilterSettings;
import org.wayhold.settings.GatingSettings;
import org.wayhold.settings.VehicleProfile;

/**
 * The filter's linear special case against Apache Commons Math 3.6.1's {@code KalmanFilter}, a
 * textbook linear Kalman filter (predict x = A x + B u, P = A P A' + Q; correct with K = P H' S^-1).
 *
 * <p>With the yaw known exactly (initial yaw variance 0, gyro noise 0), no bias or scale random walk
 * and no initial bias or scale uncertainty, a zero turn rate (the gyro reads exactly the known bias)
 * and a constant wheel speed, the extended
 * filter's model is linear: east and north move by s v dt (cos yaw, sin yaw) per step, the GNSS error
 * states decay by exp(-dt / tau), and a fix observes position + lever arm rotated by the known yaw +
 * GNSS error. Commons Math caches A and H at construction, so the step is fixed: dt = 1/16 s, exactly
 * representable, and shorter than the filter's 0.1 s split, so the filter takes one step per call.
 *
 * <p>Gating: fixes are the simulated truth plus noise drawn from the model's own R and Gauss-Markov
 * error, every 16 steps (1 s, within the 1.5 s default gap, so no reacquisition probation starts);
 * the test asserts that every fix was ACCEPTED by the default 0.999 gate, so none was skipped.
 *
 * <p>Tolerance 1e-9 (absolute for covariances of order 1 m^2, relative for positions that grow to
 * 700 m): the two filters differ only in rounding (Joseph form and symmetrisation in wayhold, the
 * short form (I - K H) P in Commons Math), which accumulates to about 1e-14 over these runs.
 */
class LinearCaseVsCommonsMathTest {

    private static final double DT_S = 1.0 / 16.0;
    private static final int STEPS_PER_FIX = 16;
    private static final double TOL = 1e-9;
    /** Largest state (relative) and covariance (absolute) difference seen by the full-state runs. */
    private static final double[] WORST = new double[2];

    @Test
    void commonsMathReproducesTheRecordedConstantVelocityCase() {
        // Harness check of Commons Math 3.6.1 KalmanFilter on a constant-velocity case: dt = 1,
        // A = [[1,1],[0,1]], Q = 0.01 [[1/4,1/2],[1/2,1]], H = [1 0], R = 0.25, x0 = [0, 1], P0 = I,
        // measurements 1.1, 1.9, 3.05, 4.1, 4.95. Expected: what Commons Math 3.6.1 gave when this test
        // was written, which an independent Joseph-form computation reproduces to about 1e-16; recorded
        // to 15 decimals, so the tolerance is 1e-12.
        RealMatrix a = new Array2DRowRealMatrix(new double[][] {{1, 1}, {0, 1}});
        RealMatrix q = new Array2DRowRealMatrix(new double[][] {{0.25, 0.5}, {0.5, 1.0}}).scalarMultiply(0.01);
        RealMatrix h = new Array2DRowRealMatrix(new double[][] {{1, 0}});
        RealMatrix r = new Array2DRowRealMatrix(new double[][] {{0.25}});
        KalmanFilter kf = new KalmanFilter(
                new DefaultProcessModel(a, null, q, new ArrayRealVector(new double[] {0, 1}),
                        new Array2DRowRealMatrix(new double[][] {{1, 0}, {0, 1}})),
                new DefaultMeasurementModel(h, r));
        for (double z : new double[] {1.1, 1.9, 3.05, 4.1, 4.95}) {
            kf.predict();
            kf.correct(new double[] {z});
        }
        double[] x = kf.getStateEstimation();
        double[][] p = kf.getErrorCovariance();
        assertThat(x[0]).isCloseTo(5.003681121364123, within(1e-12));
        assertThat(x[1]).isCloseTo(0.991446452682525, within(1e-12));
        assertThat(p[0][0]).isCloseTo(0.144805480432768, within(1e-12));
        assertThat(p[0][1]).isCloseTo(0.050210142345994, within(1e-12));
        assertThat(p[1][0]).isCloseTo(0.050210142345994, within(1e-12));
        assertThat(p[1][1]).isCloseTo(0.034900333948114, within(1e-12));
    }

    /** The scenario both filters see. */
    private record Scenario(double yawRad, double wheelMps, double scale, double sigmaM, double share,
                            double tauS, double wheelNoiseMps, double leverFwdM, double leverLeftM,
                            double[] x0, double[] p0, int fixes, long seed) {
    }

    private static Scenario scenario(long seed, double yawRad, double wheelMps, double scale, double fwd,
                                     double left) {
        double sigma = 1.2;
        double share = 0.6;
        double corr = share * sigma * sigma;
        double[] x0 = FilterFixtures.withLever(FilterFixtures.state(3.0, -2.0, yawRad, 0.0015, scale, 0.4, -0.3), fwd,
                left);
        double[] p0 = FilterFixtures.diagonal(4.0, 2.5, 0.0, 0.0, 0.0, corr, corr);
        // A correlated start, as after a first fix: position and GNSS error share -sigma_corr^2 / 2.
        p0[EAST * SIZE + NORTH] = 0.7;
        p0[NORTH * SIZE + EAST] = 0.7;
        p0[EAST * SIZE + GNSS_ERR_EAST] = -0.5 * corr;
        p0[GNSS_ERR_EAST * SIZE + EAST] = -0.5 * corr;
        p0[NORTH * SIZE + GNSS_ERR_NORTH] = -0.5 * corr;
        p0[GNSS_ERR_NORTH * SIZE + NORTH] = -0.5 * corr;
        return new Scenario(yawRad, wheelMps, scale, sigma, share, 20.0, 0.08, fwd, left, x0, p0, 60, seed);
    }

    private static FilterSettings settingsOf(Scenario s) {
        // Gyro noise 0 and bias/scale random walks 0 keep yaw, bias and scale exactly fixed; the
        // default GNSS sigma equals the fixes' sigma_h so the Gauss-Markov variance stays constant. Both
        // streams are configured at 16 Hz, the rate they are fed at, so the first step's noise (before two
        // readings show the interval) is the same as every other step's.
        return FilterFixtures.settings(s.wheelNoiseMps, 16.0, 0.0, 16.0, 0.0, 0.0, s.sigmaM, s.share, s.tauS);
    }

    /** Fix positions (east, north) of the antenna: truth + Gauss-Markov error + white noise. */
    private static double[][] fixes(Scenario s) {
        SplittableRandom rnd = new SplittableRandom(s.seed);
        double c = Math.cos(s.yawRad);
        double sn = Math.sin(s.yawRad);
        double decay = Math.exp(-STEPS_PER_FIX * DT_S / s.tauS);
        double corrSigma = Math.sqrt(s.share) * s.sigmaM;
        double whiteSigma = Math.sqrt(1.0 - s.share) * s.sigmaM;
        double errE = 0.0;
        double errN = 0.0;
        double[][] z = new double[s.fixes][2];
        for (int i = 0; i < s.fixes; i++) {
            double t = (i + 1) * STEPS_PER_FIX * DT_S;
            errE = decay * errE + corrSigma * Math.sqrt(1 - decay * decay) * gaussian(rnd);
            errN = decay * errN + corrSigma * Math.sqrt(1 - decay * decay) * gaussian(rnd);
            double e = 3.5 + s.scale * s.wheelMps * t * c + s.leverFwdM * c - s.leverLeftM * sn;
            double n = -2.2 + s.scale * s.wheelMps * t * sn + s.leverFwdM * sn + s.leverLeftM * c;
            z[i][0] = e + errE + whiteSigma * gaussian(rnd);
            z[i][1] = n + errN + whiteSigma * gaussian(rnd);
        }
        return z;
    }

    private static double gaussian(SplittableRandom rnd) {
        // Box-Muller, so the test depends on nothing but the seed.
        double u1 = 1.0 - rnd.nextDouble();
        double u2 = rnd.nextDouble();
        return Math.sqrt(-2.0 * Math.log(u1)) * Math.cos(2.0 * Math.PI * u2);
    }

    @Test
    void fullStateLinearModelMatchesCommonsMath() {
        for (Scenario s : new Scenario[] {
                scenario(11L, 0.6, 12.0, 1.0, 0.0, 0.0),
                scenario(12L, -2.4, 25.0, 1.013, 1.5, -0.4),
                scenario(13L, Math.PI / 2, -3.0, 0.99, 2.0, 0.3)}) {
            runFullState(s);
        }
        assertThat(WORST[0]).isLessThan(TOL);
        assertThat(WORST[1]).isLessThan(TOL);
    }

    private void runFullState(Scenario s) {
        NavigationFilter wayhold = FilterFixtures.filter(settingsOf(s), GatingSettings.defaults(),
                new VehicleProfile(s.leverFwdM, s.leverLeftM, 0.0));
        wayhold.initialize(0.0, s.x0, s.p0);
        wayhold.predictTo(0.0);
        wayhold.setWheelSpeed(s.wheelMps);
        // The gyro reads exactly the (known, fixed) bias: the true turn rate is zero.
        double rate = s.x0[GYRO_BIAS];
        wayhold.setYawRate(rate);

        double c = Math.cos(s.yawRad);
        double sn = Math.sin(s.yawRad);
        double decay = Math.exp(-DT_S / s.tauS);
        // A: identity, east and north move by v dt (cos, sin) per unit of scale; yaw loses dt per unit of
        // bias (yaw' = yaw + (rate - bias) dt); the GNSS errors decay as first-order Gauss-Markov.
        double[][] a = identity(SIZE);
        a[EAST][SPEED_SCALE] = s.wheelMps * DT_S * c;
        a[NORTH][SPEED_SCALE] = s.wheelMps * DT_S * sn;
        a[YAW][GYRO_BIAS] = -DT_S;
        a[GNSS_ERR_EAST][GNSS_ERR_EAST] = decay;
        a[GNSS_ERR_NORTH][GNSS_ERR_NORTH] = decay;
        // B u: the yaw-rate input enters the yaw as dt * rate and cancels the bias row of A.
        double[][] b = new double[SIZE][1];
        b[YAW][0] = DT_S;
        // Q: wheel-speed noise of density sigma^2 times the reading interval (DT_S here) through
        // d(position)/d(speed) = s dt (cos, sin): Q = s^2 dt density [c^2, cs; cs, s^2]; Gauss-Markov
        // driving noise sigma_c^2 (1 - decay^2).
        double[][] q = new double[SIZE][SIZE];
        double density = s.wheelNoiseMps * s.wheelNoiseMps * DT_S;
        double k = s.scale * s.scale * DT_S * density;
        q[EAST][EAST] = k * c * c;
        q[EAST][NORTH] = k * c * sn;
        q[NORTH][EAST] = k * c * sn;
        q[NORTH][NORTH] = k * sn * sn;
        double corr = s.share * s.sigmaM * s.sigmaM;
        q[GNSS_ERR_EAST][GNSS_ERR_EAST] = corr * (1.0 - decay * decay);
        q[GNSS_ERR_NORTH][GNSS_ERR_NORTH] = corr * (1.0 - decay * decay);
        // H: antenna = position + GNSS error (the lever arm is a known offset because the yaw is known).
        double[][] h = new double[2][SIZE];
        h[0][EAST] = 1.0;
        h[0][GNSS_ERR_EAST] = 1.0;
        h[1][NORTH] = 1.0;
        h[1][GNSS_ERR_NORTH] = 1.0;
        double white = (1.0 - s.share) * s.sigmaM * s.sigmaM;
        double[][] r = {{white, 0.0}, {0.0, white}};
        Oracle oracle = new Oracle(a, b, q, h, r, s.x0, square(s.p0, SIZE).getData());

        double leverE = s.leverFwdM * c - s.leverLeftM * sn;
        double leverN = s.leverFwdM * sn + s.leverLeftM * c;
        double[][] z = fixes(s);
        int step = 0;
        for (int i = 0; i < s.fixes; i++) {
            for (int j = 0; j < STEPS_PER_FIX; j++) {
                step++;
                wayhold.predictTo(step * DT_S);
                // Readings arrive with every step, as from a 16 Hz logger: the filter takes their
                // density from the observed interval, DT_S.
                wayhold.setWheelSpeed(s.wheelMps);
                wayhold.setYawRate(rate);
                oracle.predict(new double[] {rate});
            }
            GnssOutcome outcome = wayhold.updateGnss(FilterFixtures.fix(step * DT_S, s.sigmaM), z[i][0], z[i][1],
                    Double.NaN);
            assertThat(outcome.kind()).as("fix %d must pass the gate, NIS %s", i, outcome.nis())
                    .isEqualTo(GnssOutcome.Kind.ACCEPTED);
            oracle.correct(new double[] {z[i][0] - leverE, z[i][1] - leverN});
            assertSame(wayhold.state(), oracle.getStateEstimation(), wayhold.covariance(),
                    oracle.getErrorCovariance(), "fix " + i);
        }
    }

    @Test
    void reducedFourStateModelWithTheSpeedAsControlInputMatchesCommonsMath() {
        // The same filter against a smaller oracle: state (east, north, GNSS error east, north), the
        // fixed scale folded into B, the wheel speed as the control input u: x' = A x + B u with
        // B = s dt (cos, sin, 0, 0)'.
        Scenario s = scenario(21L, 2.0, 17.0, 1.021, 0.8, 0.0);
        NavigationFilter wayhold = FilterFixtures.filter(settingsOf(s), GatingSettings.defaults(),
                new VehicleProfile(s.leverFwdM, s.leverLeftM, 0.0));
        wayhold.initialize(0.0, s.x0, s.p0);
        wayhold.predictTo(0.0);
        wayhold.setWheelSpeed(s.wheelMps);
        wayhold.setYawRate(s.x0[GYRO_BIAS]);

        int[] idx = {EAST, NORTH, GNSS_ERR_EAST, GNSS_ERR_NORTH};
        double c = Math.cos(s.yawRad);
        double sn = Math.sin(s.yawRad);
        double decay = Math.exp(-DT_S / s.tauS);
        double[][] a = identity(4);
        a[2][2] = decay;
        a[3][3] = decay;
        double[][] b = {{s.scale * DT_S * c}, {s.scale * DT_S * sn}, {0.0}, {0.0}};
        double density = s.wheelNoiseMps * s.wheelNoiseMps * DT_S;
        double k = s.scale * s.scale * DT_S * density;
        double corr = s.share * s.sigmaM * s.sigmaM;
        double[][] q = {
                {k * c * c, k * c * sn, 0, 0},
                {k * c * sn, k * sn * sn, 0, 0},
                {0, 0, corr * (1 - decay * decay), 0},
                {0, 0, 0, corr * (1 - decay * decay)}};
        double[][] h = {{1, 0, 1, 0}, {0, 1, 0, 1}};
        double white = (1.0 - s.share) * s.sigmaM * s.sigmaM;
        double[][] r = {{white, 0}, {0, white}};
        double[] x0 = new double[4];
        double[][] p0 = new double[4][4];
        for (int i = 0; i < 4; i++) {
            x0[i] = s.x0[idx[i]];
            for (int j = 0; j < 4; j++) {
                p0[i][j] = s.p0[idx[i] * SIZE + idx[j]];
            }
        }
        Oracle oracle = new Oracle(a, b, q, h, r, x0, p0);
        double leverE = s.leverFwdM * c - s.leverLeftM * sn;
        double leverN = s.leverFwdM * sn + s.leverLeftM * c;
        double[][] z = fixes(s);
        int step = 0;
        for (int i = 0; i < s.fixes; i++) {
            for (int j = 0; j < STEPS_PER_FIX; j++) {
                step++;
                wayhold.predictTo(step * DT_S);
                wayhold.setWheelSpeed(s.wheelMps);
                wayhold.setYawRate(s.x0[GYRO_BIAS]);
                oracle.predict(new double[] {s.wheelMps});
            }
            GnssOutcome outcome = wayhold.updateGnss(FilterFixtures.fix(step * DT_S, s.sigmaM), z[i][0], z[i][1],
                    Double.NaN);
            assertThat(outcome.kind()).isEqualTo(GnssOutcome.Kind.ACCEPTED);
            oracle.correct(new double[] {z[i][0] - leverE, z[i][1] - leverN});
            double[] x = wayhold.state();
            double[] p = wayhold.covariance();
            double[] xo = oracle.getStateEstimation();
            double[][] po = oracle.getErrorCovariance();
            for (int m = 0; m < 4; m++) {
                assertThat(x[idx[m]]).as("fix %d state %d", i, idx[m])
                        .isCloseTo(xo[m], within(TOL * Math.max(1.0, Math.abs(xo[m]))));
                for (int n = 0; n < 4; n++) {
                    assertThat(p[idx[m] * SIZE + idx[n]]).as("fix %d P[%d][%d]", i, idx[m], idx[n])
                            .isCloseTo(po[m][n], within(TOL));
                }
            }
            // The fixed parts stay fixed.
            assertThat(x[YAW]).isEqualTo(s.yawRad);
            assertThat(x[SPEED_SCALE]).isEqualTo(s.scale);
        }
    }

    /**
     * Commons Math's {@code KalmanFilter} with one workaround. It updates the covariance in the short
     * form (I - K H) P, which leaves P asymmetric by rounding, and its Cholesky factorisation of S
     * refuses any asymmetry above 1e-15 relative (observed here as NonSymmetricMatrixException after
     * a few fixes). So before each correction the oracle is restarted from its own predicted state
     * and its covariance averaged with its transpose: a change of the order of one ulp per entry, far
     * below the 1e-9 tolerance. A, B, Q, H and R are the same objects throughout.
     */
    private static final class Oracle {
        private final RealMatrix a;
        private final RealMatrix b;
        private final RealMatrix q;
        private final RealMatrix h;
        private final RealMatrix r;
        private KalmanFilter kf;

        Oracle(double[][] a, double[][] b, double[][] q, double[][] h, double[][] r, double[] x0, double[][] p0) {
            this.a = new Array2DRowRealMatrix(a);
            this.b = new Array2DRowRealMatrix(b);
            this.q = new Array2DRowRealMatrix(q);
            this.h = new Array2DRowRealMatrix(h);
            this.r = new Array2DRowRealMatrix(r);
            start(x0, p0);
        }

        private void start(double[] x, double[][] p) {
            kf = new KalmanFilter(new DefaultProcessModel(a, b, q, new ArrayRealVector(x),
                    new Array2DRowRealMatrix(p)), new DefaultMeasurementModel(h, r));
        }

        void predict(double[] u) {
            kf.predict(u);
        }

        void correct(double[] z) {
            double[][] p = kf.getErrorCovariance();
            for (int i = 0; i < p.length; i++) {
                for (int j = i + 1; j < p.length; j++) {
                    double avg = 0.5 * (p[i][j] + p[j][i]);
                    p[i][j] = avg;
                    p[j][i] = avg;
                }
            }
            start(kf.getStateEstimation(), p);
            kf.correct(z);
        }

        double[] getStateEstimation() {
            return kf.getStateEstimation();
        }

        double[][] getErrorCovariance() {
            return kf.getErrorCovariance();
        }
    }

    private static void assertSame(double[] x, double[] xo, double[] p, double[][] po, String where) {
        for (int i = 0; i < SIZE; i++) {
            WORST[0] = Math.max(WORST[0], Math.abs(x[i] - xo[i]) / Math.max(1.0, Math.abs(xo[i])));
            for (int j = 0; j < SIZE; j++) {
                WORST[1] = Math.max(WORST[1], Math.abs(p[i * SIZE + j] - po[i][j]));
            }
            assertThat(x[i]).as("%s state %d", where, i).isCloseTo(xo[i], within(TOL * Math.max(1.0, Math.abs(xo[i]))));
            for (int j = 0; j < SIZE; j++) {
                assertThat(p[i * SIZE + j]).as("%s P[%d][%d]", where, i, j).isCloseTo(po[i][j], within(TOL));
            }
        }
    }

    private static double[][] identity(int n) {
        double[][] m = new double[n][n];
        for (int i = 0; i < n; i++) {
            m[i][i] = 1.0;
        }
        return m;
    }

    private static RealMatrix square(double[] rowMajor, int n) {
        double[][] m = new double[n][n];
        for (int i = 0; i < n; i++) {
            System.arraycopy(rowMajor, i * n, m[i], 0, n);
        }
        return new Array2DRowRealMatrix(m);
    }
}
