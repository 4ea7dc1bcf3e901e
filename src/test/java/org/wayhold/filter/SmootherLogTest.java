package org.wayhold.filter;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;
import static org.assertj.core.api.Assertions.within;
import static org.wayhold.filter.StateIndex.EAST;
import static org.wayhold.filter.StateIndex.GYRO_BIAS;
import static org.wayhold.filter.StateIndex.NORTH;
import static org.wayhold.filter.StateIndex.SIZE;
import static org.wayhold.filter.StateIndex.YAW;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.SplittableRandom;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.LUDecomposition;
import org.apache.commons.math3.linear.MatrixUtils;
import org.apache.commons.math3.linear.RealMatrix;
import org.apache.commons.math3.linear.RealVector;
import org.junit.jupiter.api.Test;
import org.wayhold.filter.FilterState.Slot;

/**
 * What the smoother's log does with the filter's changes of P that are neither a step nor an update,
 * driven here through the log's hooks on a state the test holds: a random walk of east and north (F =
 * I, Q = q I per step) with position fixes through the filter's own {@link JosephUpdate}, and a node
 * after every step.
 *
 * <ul>
 *   <li>A positive semi-definite addition (as a jump or an inconsistency widens P) is process noise at
 *       that instant: the smoothed result equals a textbook RTS smoother (Sarkka, <i>Bayesian Filtering
 *       and Smoothing</i>, 2013, Theorem 8.2) whose Q of that step carries the addition.</li>
 *   <li>Rows and columns scaled with their cross-covariances (as {@link InnovationMonitor#widen} does)
 *       is no added noise: the segment is cut, and nothing after the cut changes the smoothed estimate
 *       of a node before it.</li>
 *   <li>A reset ends the segment too; nodes taken while the filter has no state have no smoothed
 *       state.</li>
 * </ul>
 * Tolerance 1e-10: the recursions differ only in rounding.
 */
class SmootherLogTest {

    private static final double Q = 0.04;
    private static final double R = 0.25;
    private static final int STEPS = 40;
    private static final int WIDEN_AT = 17;

    /** The test's filter: a state, the log, and the filter's update mechanics. */
    private static final class Rig {
        final FilterState s = new FilterState(3);
        final SmootherLog log = new SmootherLog(s);
        final JosephUpdate u = new JosephUpdate();
        final double[] identity = new double[SIZE * SIZE];

        Rig() {
            for (int i = 0; i < SIZE; i++) {
                identity[i * SIZE + i] = 1.0;
            }
            s.set(Slot.INITIALIZED, true);
            s.set(Slot.T_REL, 0.0);
            s.p[EAST * SIZE + EAST] = 4.0;
            s.p[NORTH * SIZE + NORTH] = 4.0;
            s.p[EAST * SIZE + NORTH] = 1.0;
            s.p[NORTH * SIZE + EAST] = 1.0;
            // A yaw and a bias that are uncertain and correlated, untouched by the walk and the fixes.
            s.p[YAW * SIZE + YAW] = 0.01;
            s.p[GYRO_BIAS * SIZE + GYRO_BIAS] = 1e-6;
            s.p[YAW * SIZE + GYRO_BIAS] = 5e-5;
            s.p[GYRO_BIAS * SIZE + YAW] = 5e-5;
            u.smoothing = log;
        }

        void step(double t) {
            log.beforeStep();
            s.p[EAST * SIZE + EAST] += Q;
            s.p[NORTH * SIZE + NORTH] += Q;
            s.set(Slot.T_REL, t);
            log.afterStep(identity);
        }

        void fix(double e, double n) {
            Arrays.fill(u.h, 0.0);
            u.h[EAST] = 1.0;
            u.h[SIZE + NORTH] = 1.0;
            u.r[0] = R;
            u.r[1] = 0.0;
            u.r[2] = 0.0;
            u.r[3] = R;
            u.nu[0] = e - s.x[EAST];
            u.nu[1] = n - s.x[NORTH];
            u.prepare(s.p, 2);
            assertThat(u.apply(s, 2)).isTrue();
        }
    }

    private static double[][] fixes(long seed) {
        SplittableRandom rnd = new SplittableRandom(seed);
        double[][] z = new double[STEPS + 1][2];
        double e = 0;
        double n = 0;
        for (int k = 1; k <= STEPS; k++) {
            e += Math.sqrt(Q) * gaussian(rnd);
            n += Math.sqrt(Q) * gaussian(rnd);
            z[k][0] = e + Math.sqrt(R) * gaussian(rnd);
            z[k][1] = n + Math.sqrt(R) * gaussian(rnd);
        }
        return z;
    }

    @Test
    void anAddedPositiveSemiDefiniteAmountIsFoldedInAsProcessNoise() {
        Rig rig = new Rig();
        double[][] z = fixes(3);
        double extraEe = 9.0;
        double extraEn = 3.0;
        double extraNn = 1.5;
        List<Integer> nodes = new ArrayList<>();
        nodes.add(rig.log.mark());
        // The reference: the same walk with Q of step WIDEN_AT carrying the addition (east, north only).
        RealMatrix p = new Array2DRowRealMatrix(new double[][] {{4.0, 1.0}, {1.0, 4.0}});
        RealVector m = new ArrayRealVector(2);
        List<RealVector> mf = new ArrayList<>(List.of(m));
        List<RealMatrix> pf = new ArrayList<>(List.of(p));
        List<RealVector> mp = new ArrayList<>(java.util.Collections.singletonList((RealVector) null));
        List<RealMatrix> pp = new ArrayList<>(java.util.Collections.singletonList((RealMatrix) null));
        for (int k = 1; k <= STEPS; k++) {
            rig.step(k);
            RealMatrix q = MatrixUtils.createRealIdentityMatrix(2).scalarMultiply(Q);
            if (k == WIDEN_AT) {
                // Added after the step, before the fix, as a jump is (rank one plus a raised variance).
                rig.s.p[EAST * SIZE + EAST] += extraEe;
                rig.s.p[EAST * SIZE + NORTH] += extraEn;
                rig.s.p[NORTH * SIZE + EAST] += extraEn;
                rig.s.p[NORTH * SIZE + NORTH] += extraNn;
                q = q.add(new Array2DRowRealMatrix(new double[][] {{extraEe, extraEn}, {extraEn, extraNn}}));
            }
            rig.fix(z[k][0], z[k][1]);
            nodes.add(rig.log.mark());
            p = p.add(q);
            mp.add(m);
            pp.add(p);
            RealMatrix s = p.add(MatrixUtils.createRealIdentityMatrix(2).scalarMultiply(R));
            RealMatrix gain = p.multiply(new LUDecomposition(s).getSolver().getInverse());
            m = m.add(gain.operate(new ArrayRealVector(z[k]).subtract(m)));
            p = p.subtract(gain.multiply(p));
            p = p.add(p.transpose()).scalarMultiply(0.5);
            mf.add(m);
            pf.add(p);
        }
        rig.log.finish();
        assertThat(rig.log.foldedChanges()).isEqualTo(1);
        assertThat(rig.log.cuts()).isZero();
        SmoothedTrack st = RtsSmoother.smooth(rig.log);
        // Sarkka (2013) Theorem 8.2 with A = I.
        RealVector ms = mf.get(STEPS);
        RealMatrix ps = pf.get(STEPS);
        for (int k = STEPS; k >= 0; k--) {
            if (k < STEPS) {
                RealMatrix g = pf.get(k).multiply(new LUDecomposition(pp.get(k + 1)).getSolver().getInverse());
                ms = mf.get(k).add(g.operate(ms.subtract(mp.get(k + 1))));
                ps = pf.get(k).add(g.multiply(ps.subtract(pp.get(k + 1))).multiply(g.transpose()));
            }
            double[] x = st.stateVector(nodes.get(k));
            double[] pk = st.covariance(nodes.get(k));
            assertThat(x[EAST]).as("east at %d", k).isCloseTo(ms.getEntry(0), within(1e-10));
            assertThat(x[NORTH]).as("north at %d", k).isCloseTo(ms.getEntry(1), within(1e-10));
            assertThat(pk[EAST * SIZE + EAST]).isCloseTo(ps.getEntry(0, 0), within(1e-10));
            assertThat(pk[EAST * SIZE + NORTH]).isCloseTo(ps.getEntry(0, 1), within(1e-10));
            assertThat(pk[NORTH * SIZE + NORTH]).isCloseTo(ps.getEntry(1, 1), within(1e-10));
        }
    }

    /** Runs the walk, scaling east, north and yaw with their cross-covariances by 2 after step WIDEN_AT. */
    private static SmoothedTrack scaledRun(double[][] z, Rig rig, List<Integer> nodes) {
        nodes.add(rig.log.mark());
        for (int k = 1; k <= STEPS; k++) {
            rig.step(k);
            rig.fix(z[k][0], z[k][1]);
            if (k == WIDEN_AT) {
                // Yaw is correlated with the bias: scaling its row and column is no added noise.
                InnovationMonitor.widen(rig.s, 4.0);
            }
            nodes.add(rig.log.mark());
        }
        rig.log.finish();
        return RtsSmoother.smooth(rig.log);
    }

    @Test
    void scaledRowsAndColumnsCutTheSmootherAndNoInformationCrossesTheCut() {
        double[][] a = fixes(5);
        double[][] b = fixes(5);
        // The same data up to the cut, other data after it.
        SplittableRandom rnd = new SplittableRandom(99);
        for (int k = WIDEN_AT + 1; k <= STEPS; k++) {
            b[k][0] += 3.0 + gaussian(rnd);
            b[k][1] -= 2.0 + gaussian(rnd);
        }
        Rig ra = new Rig();
        Rig rb = new Rig();
        List<Integer> na = new ArrayList<>();
        List<Integer> nb = new ArrayList<>();
        SmoothedTrack sa = scaledRun(a, ra, na);
        SmoothedTrack sb = scaledRun(b, rb, nb);
        assertThat(ra.log.cuts()).isEqualTo(1);
        assertThat(ra.log.segmentCount()).isEqualTo(2);
        assertThat(ra.log.foldedChanges()).isZero();
        // The widening comes after the fix of step WIDEN_AT, before its node: that node starts the second
        // segment, the nodes before it end the first.
        for (int k = 0; k < WIDEN_AT; k++) {
            assertThat(sa.stateVector(na.get(k))).as("node %d before the cut", k)
                    .containsExactly(sb.stateVector(nb.get(k)));
        }
        // After the cut the data differ, and so must the estimates (the check above can fail).
        assertThat(sa.stateVector(na.get(STEPS))[EAST]).isNotCloseTo(sb.stateVector(nb.get(STEPS))[EAST], within(1.0));
        // Before the cut the smoother still used the data up to it: the first node moved.
        assertThat(sa.stateVector(na.get(0))[EAST]).isNotEqualTo(0.0);
    }

    @Test
    void aResetEndsTheSegmentAndNodesWithoutAStateHaveNoSmoothedState() {
        Rig rig = new Rig();
        double[][] z = fixes(8);
        List<Integer> nodes = new ArrayList<>();
        nodes.add(rig.log.mark());
        for (int k = 1; k <= STEPS; k++) {
            rig.step(k);
            if (k == 20) {
                rig.s.set(Slot.INITIALIZED, false);
            } else if (k == 23) {
                // A new start: a state from a fix.
                rig.s.set(Slot.INITIALIZED, true);
                rig.s.x[EAST] = z[k][0];
                rig.s.x[NORTH] = z[k][1];
                Arrays.fill(rig.s.p, 0.0);
                rig.s.p[EAST * SIZE + EAST] = R;
                rig.s.p[NORTH * SIZE + NORTH] = R;
            } else if (rig.s.is(Slot.INITIALIZED)) {
                rig.fix(z[k][0], z[k][1]);
            }
            nodes.add(rig.log.mark());
        }
        rig.log.finish();
        SmoothedTrack st = RtsSmoother.smooth(rig.log);
        assertThat(rig.log.segmentCount()).isEqualTo(2);
        assertThat(rig.log.cuts()).isEqualTo(1);
        for (int k = 20; k < 23; k++) {
            assertThat(st.hasState(nodes.get(k))).as("node %d, taken while reset", k).isFalse();
            int node = nodes.get(k);
            assertThatThrownBy(() -> st.state(node)).isInstanceOf(IllegalArgumentException.class);
        }
        // The last node of the first segment has only the data up to the reset: its filtered estimate.
        assertThat(st.stateVector(nodes.get(19))).containsExactly(rig.log.filteredState(nodes.get(19)));
        assertThat(st.hasState(nodes.get(23))).isTrue();
    }

    @Test
    void aRewoundFilterCannotBeSmoothed() {
        Rig rig = new Rig();
        rig.log.mark();
        rig.log.rewind();
        assertThatThrownBy(() -> RtsSmoother.smooth(rig.log)).isInstanceOf(IllegalStateException.class)
                .hasMessageContaining("earlier state");
    }

    private static double gaussian(SplittableRandom rnd) {
        double u1 = 1.0 - rnd.nextDouble();
        double u2 = rnd.nextDouble();
        return Math.sqrt(-2.0 * Math.log(u1)) * Math.cos(2.0 * Math.PI * u2);
    }
}
