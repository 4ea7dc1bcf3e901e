package org.wayhold.filter;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;
import static org.wayhold.filter.StateIndex.EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_NORTH;
import static org.wayhold.filter.StateIndex.NORTH;
import static org.wayhold.filter.StateIndex.SIZE;
import static org.wayhold.filter.StateIndex.SPEED_SCALE;

import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.EigenDecomposition;
import org.apache.commons.math3.linear.LUDecomposition;
import org.apache.commons.math3.linear.RealMatrix;
import org.apache.commons.math3.linear.RealVector;
import org.junit.jupiter.api.Test;
import org.wayhold.settings.FilterSettings;
import org.wayhold.settings.GatingSettings;
import org.wayhold.settings.VehicleProfile;

/**
 * The smoother in the filter's linear special case against a fixed-interval Rauch-Tung-Striebel
 * smoother written here from the published equations.
 *
 * <p>The case is the one {@code LinearCaseVsCommonsMathTest} uses: yaw, gyro bias and gyro scale known
 * exactly, no turn, a constant wheel speed, fixes every 16 steps of 1/16 s, so each step of the filter
 * is linear with a transition A written here from the model. The reference is the RTS smoother of
 * Sarkka, <i>Bayesian Filtering and Smoothing</i>, 2013, Theorem 8.2 (the equations of Rauch, Tung and
 * Striebel, AIAA Journal 3(8), 1965), run over every step of the filter:
 * <pre>
 *   G_k   = P_k A' (P-_{k+1})^-1
 *   ms_k  = m_k + G_k (ms_{k+1} - m-_{k+1})
 *   Ps_k  = P_k + G_k (Ps_{k+1} - P-_{k+1}) G_k'
 * </pre>
 * with Commons Math 3.6.1 matrices and its LU decomposition for the inverse. Its inputs are the
 * filter's own predicted (m-, P-) and filtered (m, P) moments at every step, read through the public
 * {@code state()} and {@code covariance()}: the smoother is checked, not the forward model (which
 * {@code LinearCaseVsCommonsMathTest} holds against Commons Math's {@code KalmanFilter}). wayhold takes
 * nodes only every fifth step, so a fix falls sometimes on a node and sometimes between two: the
 * composed cross-covariances and the fixed-point bookkeeping between nodes are what is checked. Nodes
 * are asked for before and after the step's fix: both must be one node, holding the state after it.
 *
 * <p>Uncertain are east, north, the wheel-speed scale (coupled into the position through A) and the
 * GNSS error; two cases: wheel-speed noise at 12 m/s, and a walking scale at 3 m/s. The states held
 * exactly (variance 0: yaw, bias, gyro scale, lever arm, latency) are left out of the reference,
 * which then has an invertible P-.
 * Tolerance 1e-8 (relative for positions of hundreds of metres, absolute for covariances of order
 * 1 m^2): the two backward recursions differ only in rounding (a Cholesky solve against an LU inverse,
 * composed links against stepwise ones).
 */
class SmootherLinearCaseTest {

    private static final double DT_S = 1.0 / 16.0;
    private static final int STEPS_PER_FIX = 16;
    private static final int STEPS_PER_NODE = 5;
    private static final int FIXES = 40;
    private static final double TOL = 1e-8;

    /** A linear case: which states the reference carries and how they move. */
    private record Case(int[] states, double wheelMps, double yawRad, double scale, double scaleVar,
                        double scaleWalk, double wheelNoiseMps, double truthScale, long seed) {
    }

    /** The states that carry uncertainty in this case; the others stay exactly known. */
    private static final int[] UNCERTAIN = {EAST, NORTH, SPEED_SCALE, GNSS_ERR_EAST, GNSS_ERR_NORTH};

    @Test
    void wheelNoiseAndAnUncertainScaleMatchTheTextbookSmoother() {
        check(new Case(UNCERTAIN, 12.0, 0.6, 1.0, 4e-4, 0.0, 0.08, 1.004, 31L));
    }

    @Test
    void aWalkingScaleAtLowSpeedMatchesTheTextbookSmoother() {
        check(new Case(UNCERTAIN, 3.0, -2.1, 1.013, 1e-4, 1e-4, 0.05, 1.02, 32L));
    }

    private void check(Case cs) {
        double sigma = 1.2;
        double share = 0.6;
        double tau = 20.0;
        double corr = share * sigma * sigma;
        FilterSettings settings = FilterFixtures.settings(cs.wheelNoiseMps, 16.0, 0.0, 16.0, 0.0, cs.scaleWalk,
                sigma, share, tau);
        NavigationFilter f = FilterFixtures.filter(settings, GatingSettings.defaults(), new VehicleProfile(0, 0, 0));
        // A zero bias read by a gyro at exactly zero: no turn, and no change between readings that the
        // filter would take as yaw-rate noise, so the yaw stays exactly known.
        double[] x0 = FilterFixtures.state(3.0, -2.0, cs.yawRad, 0.0, cs.scale, 0.4, -0.3);
        double[] p0 = FilterFixtures.diagonal(4.0, 2.5, 0.0, 0.0, cs.scaleVar, corr, corr);
        p0[EAST * SIZE + NORTH] = 0.7;
        p0[NORTH * SIZE + EAST] = 0.7;
        p0[EAST * SIZE + GNSS_ERR_EAST] = -0.5 * corr;
        p0[GNSS_ERR_EAST * SIZE + EAST] = -0.5 * corr;
        f.initialize(0.0, x0, p0);
        f.predictTo(0.0);
        f.setWheelSpeed(cs.wheelMps);
        double rate = 0.0;
        f.setYawRate(rate);
        SmootherLog log = f.recordForSmoothing();

        int n = cs.states.length;
        double c = Math.cos(cs.yawRad);
        double sn = Math.sin(cs.yawRad);
        double decay = Math.exp(-DT_S / tau);
        // A of one step in the reduced state: identity; the Gauss-Markov errors decay (Brown and Hwang,
        // 4th ed., sec. 4.2); east' = east + s v dt cos(yaw) couples the scale in. The process noise
        // the filter adds (wheel speed through the scale's estimate, the scale's walk and its floor for
        // tyre growth, the Gauss-Markov driving noise) is in its predicted covariance, which the
        // reference takes as it is.
        double[][] a = new double[n][n];
        for (int i = 0; i < n; i++) {
            a[i][i] = cs.states[i] == GNSS_ERR_EAST || cs.states[i] == GNSS_ERR_NORTH ? decay : 1.0;
        }
        int iScale = indexOf(cs.states, SPEED_SCALE);
        a[0][iScale] = cs.wheelMps * DT_S * c;
        a[1][iScale] = cs.wheelMps * DT_S * sn;
        Reference ref = new Reference(new Array2DRowRealMatrix(a));
        ref.filtered(reduce(f.state(), cs.states), reduceCov(f.covariance(), cs.states));

        List<Integer> nodeSteps = new ArrayList<>();
        List<Integer> nodes = new ArrayList<>();
        nodeSteps.add(0);
        nodes.add(log.mark());
        SplittableRandom rnd = new SplittableRandom(cs.seed);
        double white = (1.0 - share) * sigma * sigma;
        double errE = 0;
        double errN = 0;
        double fixDecay = Math.exp(-STEPS_PER_FIX * DT_S / tau);
        int steps = FIXES * STEPS_PER_FIX;
        for (int step = 1; step <= steps; step++) {
            f.predictTo(step * DT_S);
            f.setWheelSpeed(cs.wheelMps);
            f.setYawRate(rate);
            ref.predicted(reduce(f.state(), cs.states), reduceCov(f.covariance(), cs.states));
            // A node asked for before a fix of the same time is the same node, and holds the state after it.
            int before = step % STEPS_PER_NODE == 0 ? log.mark() : -1;
            if (step % STEPS_PER_FIX == 0) {
                double t = step * DT_S;
                errE = fixDecay * errE + Math.sqrt(corr * (1 - fixDecay * fixDecay)) * gaussian(rnd);
                errN = fixDecay * errN + Math.sqrt(corr * (1 - fixDecay * fixDecay)) * gaussian(rnd);
                double ze = 3.5 + cs.truthScale * cs.wheelMps * t * c + errE + Math.sqrt(white) * gaussian(rnd);
                double zn = -2.2 + cs.truthScale * cs.wheelMps * t * sn + errN + Math.sqrt(white) * gaussian(rnd);
                GnssOutcome o = f.updateGnss(FilterFixtures.fix(t, sigma), ze, zn, Double.NaN);
                assertThat(o.kind()).as("fix at step %d, NIS %s", step, o.nis()).isEqualTo(GnssOutcome.Kind.ACCEPTED);
            }
            ref.filtered(reduce(f.state(), cs.states), reduceCov(f.covariance(), cs.states));
            if (step % STEPS_PER_NODE == 0) {
                nodeSteps.add(step);
                nodes.add(log.mark());
                assertThat(nodes.get(nodes.size() - 1)).isEqualTo(before);
            }
        }
        log.finish();
        // Nothing but steps and updates happened: one segment, nothing folded in.
        assertThat(log.segmentCount()).isEqualTo(1);
        assertThat(log.cuts()).isZero();
        assertThat(log.foldedChanges()).isZero();

        SmoothedTrack smoothed = RtsSmoother.smooth(log);
        List<RealVector> ms = new ArrayList<>();
        List<RealMatrix> ps = new ArrayList<>();
        ref.smooth(ms, ps);
        double worstX = 0;
        double worstP = 0;
        for (int i = 0; i < nodes.size(); i++) {
            int node = nodes.get(i);
            int step = nodeSteps.get(i);
            double[] xs = smoothed.stateVector(node);
            double[] pSm = smoothed.covariance(node);
            for (int u = 0; u < n; u++) {
                double expected = ms.get(step).getEntry(u);
                worstX = Math.max(worstX, Math.abs(xs[cs.states[u]] - expected) / Math.max(1, Math.abs(expected)));
                assertThat(xs[cs.states[u]]).as("node %d (step %d) state %d", node, step, cs.states[u])
                        .isCloseTo(expected, within(TOL * Math.max(1, Math.abs(expected))));
                for (int v = 0; v < n; v++) {
                    double pe = ps.get(step).getEntry(u, v);
                    worstP = Math.max(worstP, Math.abs(pSm[cs.states[u] * SIZE + cs.states[v]] - pe));
                    assertThat(pSm[cs.states[u] * SIZE + cs.states[v]]).as("node %d P[%d][%d]", node, u, v)
                            .isCloseTo(pe, within(TOL));
                }
            }
            // States held exactly stay as they were, with no variance.
            assertThat(xs[StateIndex.YAW]).isCloseTo(cs.yawRad, within(1e-15));
            assertThat(pSm[StateIndex.YAW * SIZE + StateIndex.YAW]).isZero();
        }
        // The smoother must have moved something: the first node's east against its filtered value.
        double moved = Math.abs(smoothed.stateVector(nodes.get(0))[EAST] - log.filteredState(nodes.get(0))[EAST]);
        assertThat(moved).isGreaterThan(0.01);
        assertThat(worstX).isLessThan(TOL);
        assertThat(worstP).isLessThan(TOL);
        assertThat(smoothed.pseudoInverseSteps()).isZero();
    }

    private static double[] reduce(double[] x, int[] states) {
        double[] r = new double[states.length];
        for (int i = 0; i < states.length; i++) {
            r[i] = x[states[i]];
        }
        return r;
    }

    private static double[][] reduceCov(double[] p, int[] states) {
        double[][] r = new double[states.length][states.length];
        for (int i = 0; i < states.length; i++) {
            for (int j = 0; j < states.length; j++) {
                r[i][j] = p[states[i] * SIZE + states[j]];
            }
        }
        return r;
    }

    @Test
    void smoothedCovarianceIsNeverLargerThanTheFilteredOne() {
        // Same linear case; P_filtered - P_smoothed must be positive semi-definite at every node
        // (Rauch, Tung, Striebel 1965: smoothing only adds information). Checked by the eigenvalues of
        // the difference with Commons Math's EigenDecomposition; rounding tolerance 1e-12 m^2.
        FilterSettings settings = FilterFixtures.settings(0.08, 16.0, 0.0, 16.0, 0.0, 0.0, 1.2, 0.6, 20.0);
        NavigationFilter f = FilterFixtures.filter(settings, GatingSettings.defaults(), new VehicleProfile(0, 0, 0));
        double[] x0 = FilterFixtures.state(0.0, 0.0, 0.3, 0.0, 1.0, 0.0, 0.0);
        f.initialize(0.0, x0, FilterFixtures.diagonal(9.0, 9.0, 0.0, 0.0, 0.0, 0.86, 0.86));
        f.predictTo(0.0);
        f.setWheelSpeed(10.0);
        f.setYawRate(0.0);
        SmootherLog log = f.recordForSmoothing();
        log.mark();
        SplittableRandom rnd = new SplittableRandom(5);
        for (int step = 1; step <= 400; step++) {
            f.predictTo(step * DT_S);
            f.setWheelSpeed(10.0);
            f.setYawRate(0.0);
            // A gap of fixes in the middle, where smoothing gains most.
            if (step % STEPS_PER_FIX == 0 && (step < 120 || step > 260)) {
                double t = step * DT_S;
                f.updateGnss(FilterFixtures.fix(t, 1.2), 10.0 * t * Math.cos(0.3) + gaussian(rnd),
                        10.0 * t * Math.sin(0.3) + gaussian(rnd), Double.NaN);
            }
            if (step % 3 == 0) {
                log.mark();
            }
        }
        log.finish();
        SmoothedTrack s = RtsSmoother.smooth(log);
        double largestGain = 0;
        for (int k = 0; k < log.nodeCount(); k++) {
            RealMatrix diff = new Array2DRowRealMatrix(SIZE, SIZE);
            double[] pf = log.filteredCovariance(k);
            double[] psm = s.covariance(k);
            for (int i = 0; i < SIZE; i++) {
                for (int j = 0; j < SIZE; j++) {
                    diff.setEntry(i, j, 0.5 * (pf[i * SIZE + j] - psm[i * SIZE + j] + pf[j * SIZE + i]
                            - psm[j * SIZE + i]));
                }
            }
            for (double ev : new EigenDecomposition(diff).getRealEigenvalues()) {
                assertThat(ev).as("node %d eigenvalue of P_filtered - P_smoothed", k).isGreaterThan(-1e-12);
                largestGain = Math.max(largestGain, ev);
            }
        }
        // In the gap the smoother must gain a lot: the filtered variance grows to metres squared there.
        assertThat(largestGain).isGreaterThan(0.5);
    }

    private static int indexOf(int[] a, int v) {
        for (int i = 0; i < a.length; i++) {
            if (a[i] == v) {
                return i;
            }
        }
        return -1;
    }

    private static double gaussian(SplittableRandom rnd) {
        double u1 = 1.0 - rnd.nextDouble();
        double u2 = rnd.nextDouble();
        return Math.sqrt(-2.0 * Math.log(u1)) * Math.cos(2.0 * Math.PI * u2);
    }

    /**
     * The moments of every step and the textbook backward pass over them (Sarkka 2013, Theorem 8.2),
     * in Commons Math matrices.
     */
    private static final class Reference {
        final RealMatrix a;
        final List<RealVector> predicted = new ArrayList<>();
        final List<RealMatrix> predictedCov = new ArrayList<>();
        final List<RealVector> filtered = new ArrayList<>();
        final List<RealMatrix> filteredCov = new ArrayList<>();

        Reference(RealMatrix a) {
            this.a = a;
            predicted.add(null);
            predictedCov.add(null);
        }

        void predicted(double[] m, double[][] p) {
            predicted.add(new ArrayRealVector(m));
            predictedCov.add(new Array2DRowRealMatrix(p));
        }

        void filtered(double[] m, double[][] p) {
            filtered.add(new ArrayRealVector(m));
            filteredCov.add(new Array2DRowRealMatrix(p));
        }

        /** Theorem 8.2 over every step, into {@code ms} and {@code ps} indexed by step. */
        void smooth(List<RealVector> ms, List<RealMatrix> ps) {
            int last = filtered.size() - 1;
            RealVector[] m = new RealVector[last + 1];
            RealMatrix[] p = new RealMatrix[last + 1];
            m[last] = filtered.get(last);
            p[last] = filteredCov.get(last);
            for (int k = last - 1; k >= 0; k--) {
                RealMatrix pk = filteredCov.get(k);
                RealMatrix gain = pk.multiply(a.transpose())
                        .multiply(new LUDecomposition(predictedCov.get(k + 1)).getSolver().getInverse());
                m[k] = filtered.get(k).add(gain.operate(m[k + 1].subtract(predicted.get(k + 1))));
                p[k] = pk.add(gain.multiply(p[k + 1].subtract(predictedCov.get(k + 1))).multiply(gain.transpose()));
            }
            for (int k = 0; k <= last; k++) {
                ms.add(m[k]);
                ps.add(p[k]);
            }
        }
    }
}
