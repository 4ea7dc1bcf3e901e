package org.wayhold.filter;

import static org.wayhold.filter.StateIndex.SIZE;
import static org.wayhold.filter.StateIndex.YAW;

import org.ejml.data.DMatrixRMaj;
import org.ejml.dense.row.CommonOps_DDRM;
import org.ejml.dense.row.factory.LinearSolverFactory_DDRM;
import org.ejml.interfaces.linsol.LinearSolverDense;
import org.wayhold.geo.Angles;

/**
 * The backward pass of the Rauch-Tung-Striebel fixed-interval smoother (Rauch, Tung, Striebel,
 * "Maximum likelihood estimates of linear dynamic systems", AIAA Journal 3(8), 1965; in the extended
 * form for a non-linear model, with the forward pass's Jacobians: Sarkka, <i>Bayesian Filtering and
 * Smoothing</i>, 2013, sec. 9.1), over the nodes of a {@link SmootherLog}.
 *
 * <p>Per segment, from its last node back to its first:
 * <pre>
 *   last node:  x_N = x~,  P_N = P~                        (its estimate given the segment's data)
 *   node k:     J = C_k P_{k+1}^-1
 *               x_k|N = x~_k + J (x_{k+1|N} - x_{k+1})
 *               P_k|N = P~_k + J (P_{k+1|N} - P_{k+1}) J'
 * </pre>
 * with x_{k+1}, P_{k+1} the filtered state at node k+1 and x~_k, P~_k, C_k the node's link (see
 * {@link SmootherLog}). J is found by solving P_{k+1} J' = C_k' with a Cholesky factorisation rather
 * than forming an inverse. States the filter holds exactly (a variance of zero, so every covariance
 * with them is zero too) are left out of the solve: their column of J is zero. Should P_{k+1} still not
 * factor (not positive definite to rounding), the pseudo-inverse by singular values is used and the
 * step counted. Yaw differences are wrapped to (-pi, pi].
 *
 * <p>The filter's non-linear decisions are taken care of by the log (folded in or cut); this class sees
 * only linked and ending nodes.
 */
public final class RtsSmoother {

    private static final int NN = SIZE * SIZE;

    private final DMatrixRMaj pNext = new DMatrixRMaj(SIZE, SIZE);
    private final DMatrixRMaj cT = new DMatrixRMaj(SIZE, SIZE);
    private final DMatrixRMaj jT = new DMatrixRMaj(SIZE, SIZE);
    private final DMatrixRMaj j = new DMatrixRMaj(SIZE, SIZE);
    private final DMatrixRMaj dp = new DMatrixRMaj(SIZE, SIZE);
    private final DMatrixRMaj jdp = new DMatrixRMaj(SIZE, SIZE);
    private final DMatrixRMaj correction = new DMatrixRMaj(SIZE, SIZE);
    private final DMatrixRMaj work = new DMatrixRMaj(SIZE, SIZE);
    private final DMatrixRMaj cm = new DMatrixRMaj(SIZE, SIZE);
    private final int[] active = new int[SIZE];
    private final LinearSolverDense<DMatrixRMaj> cholesky = LinearSolverFactory_DDRM.symmPosDef(SIZE);
    private final LinearSolverDense<DMatrixRMaj> pseudoInverse = LinearSolverFactory_DDRM.pseudoInverse(true);
    private int pseudoInverseSteps;

    private RtsSmoother() {
    }

    /**
     * Smooths a finished log.
     *
     * @param log the forward pass ({@link SmootherLog#finish()} called)
     * @return the smoothed state at every node that has a state
     * @throws IllegalStateException when the log is not finished, or was rewound while recording
     */
    public static SmoothedTrack smooth(SmootherLog log) {
        if (log.rewound()) {
            throw new IllegalStateException("the filter was returned to an earlier state while recording: "
                    + "the log does not describe one forward pass");
        }
        if (!log.isFinished()) {
            throw new IllegalStateException("the log must be finished before it is smoothed");
        }
        return new RtsSmoother().run(log);
    }

    private SmoothedTrack run(SmootherLog log) {
        int n = log.nodeCount();
        double[] xOut = new double[n * SIZE];
        double[] pOut = new double[n * SmootherLog.TRIANGLE];
        boolean[] has = new boolean[n];
        double[] tRel = new double[n];
        // Smoothed and filtered state of the node after the current one.
        double[] xsNext = new double[SIZE];
        double[] psNext = new double[NN];
        double[] xfNext = new double[SIZE];
        double[] pfNext = new double[NN];
        // This node's link, and its smoothed result.
        double[] xl = new double[SIZE];
        double[] pl = new double[NN];
        double[] cl = new double[NN];
        double[] xs = new double[SIZE];
        double[] d = new double[SIZE];
        for (int k = n - 1; k >= 0; k--) {
            tRel[k] = log.tRel(k);
            byte kind = log.kind(k);
            if (kind == SmootherLog.NO_STATE) {
                continue;
            }
            if (kind == SmootherLog.END) {
                log.readLink(k, xl, pl, null);
                System.arraycopy(xl, 0, xs, 0, SIZE);
                System.arraycopy(pl, 0, psNext, 0, NN);
            } else {
                // LINKED: node k + 1 is the next node of the segment and was smoothed just before.
                log.readLink(k, xl, pl, cl);
                for (int i = 0; i < SIZE; i++) {
                    d[i] = xsNext[i] - xfNext[i];
                }
                d[YAW] = Angles.wrapPi(d[YAW]);
                gain(pfNext, cl);
                // x_k|N = x~_k + J d
                for (int a = 0; a < SIZE; a++) {
                    double v = xl[a];
                    for (int b = 0; b < SIZE; b++) {
                        v += j.data[a * SIZE + b] * d[b];
                    }
                    xs[a] = v;
                }
                xs[YAW] = Angles.wrapPi(xs[YAW]);
                // P_k|N = P~_k + J (P_{k+1|N} - P_{k+1}) J'
                for (int i = 0; i < NN; i++) {
                    dp.data[i] = psNext[i] - pfNext[i];
                }
                CommonOps_DDRM.mult(j, dp, jdp);
                CommonOps_DDRM.multTransB(jdp, j, correction);
                for (int i = 0; i < NN; i++) {
                    psNext[i] = pl[i] + correction.data[i];
                }
                SmootherLog.symmetrise(psNext);
            }
            has[k] = true;
            System.arraycopy(xs, 0, xOut, k * SIZE, SIZE);
            SmootherLog.packUpper(psNext, pOut, k * SmootherLog.TRIANGLE);
            System.arraycopy(xs, 0, xsNext, 0, SIZE);
            log.readFiltered(k, xfNext, pfNext);
        }
        return new SmoothedTrack(tRel, has, xOut, pOut, pseudoInverseSteps);
    }

    /** J = C P^-1 into {@link #j}, from P J' = C'. */
    private void gain(double[] p, double[] cRowMajor) {
        // States held exactly are left out: their rows and columns of P and columns of C are zero.
        int m = 0;
        for (int i = 0; i < SIZE; i++) {
            if (p[i * SIZE + i] > 0.0) {
                active[m++] = i;
            }
        }
        if (m == SIZE) {
            System.arraycopy(p, 0, pNext.data, 0, NN);
            System.arraycopy(cRowMajor, 0, cm.data, 0, NN);
            CommonOps_DDRM.transpose(cm, cT);
            solve(pNext, cT, jT);
            CommonOps_DDRM.transpose(jT, j);
            return;
        }
        j.zero();
        if (m == 0) {
            return;
        }
        DMatrixRMaj pa = new DMatrixRMaj(m, m);
        DMatrixRMaj ca = new DMatrixRMaj(m, SIZE);
        for (int a = 0; a < m; a++) {
            for (int b = 0; b < m; b++) {
                pa.data[a * m + b] = p[active[a] * SIZE + active[b]];
            }
            for (int r = 0; r < SIZE; r++) {
                ca.data[a * SIZE + r] = cRowMajor[r * SIZE + active[a]];
            }
        }
        DMatrixRMaj ja = new DMatrixRMaj(m, SIZE);
        solve(pa, ca, ja);
        for (int a = 0; a < m; a++) {
            for (int r = 0; r < SIZE; r++) {
                j.data[r * SIZE + active[a]] = ja.data[a * SIZE + r];
            }
        }
    }

    /** X = A^-1 B by Cholesky, or by the pseudo-inverse when A does not factor. */
    private void solve(DMatrixRMaj a, DMatrixRMaj b, DMatrixRMaj x) {
        LinearSolverDense<DMatrixRMaj> chol = a.numRows == SIZE ? cholesky : LinearSolverFactory_DDRM.symmPosDef(a.numRows);
        // The solver may keep and modify the matrix it is given: give it a work copy.
        DMatrixRMaj copy = a.numRows == SIZE ? work : new DMatrixRMaj(a.numRows, a.numCols);
        copy.setTo(a);
        if (chol.setA(copy)) {
            chol.solve(b, x);
            if (finite(x)) {
                return;
            }
        }
        pseudoInverseSteps++;
        pseudoInverse.setA(a.copy());
        pseudoInverse.solve(b, x);
    }

    private static boolean finite(DMatrixRMaj m) {
        for (double v : m.data) {
            if (!Double.isFinite(v)) {
                return false;
            }
        }
        return true;
    }
}
