package org.wayhold.filter;

import static org.wayhold.filter.StateIndex.SIZE;
import static org.wayhold.filter.StateIndex.YAW;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import org.ejml.data.DMatrixRMaj;
import org.ejml.dense.row.CommonOps_DDRM;
import org.ejml.dense.row.factory.DecompositionFactory_DDRM;
import org.ejml.interfaces.decomposition.EigenDecomposition_F64;
import org.wayhold.filter.FilterState.Slot;
import org.wayhold.geo.Angles;

/**
 * What the forward pass of one filter did, kept for the Rauch-Tung-Striebel smoother
 * ({@link RtsSmoother}): the filtered state at chosen times (nodes) and, between consecutive nodes,
 * what the backward pass needs to go from one to the other.
 *
 * <h2>Nodes and links</h2>
 * A node is taken at {@link #mark()}: the filter's x_k and P_k at that time, given every sample
 * applied up to and at it (marks at one time share a node). Between node k and node k+1 the filter predicts (any number of steps with their own
 * F) and may apply updates (fixes, course and speed, zero-rate readings at rest). Instead of one node
 * per update, the log carries from each node, in step with the filter, a fixed-point smoother of
 * x_k (Gelb, <i>Applied Optimal Estimation</i>, 1974, sec. 5.3; Meditch, <i>Stochastic Optimal Linear
 * Estimation and Control</i>, 1969): the augmented state (x_k, x_t) with
 * <ul>
 *   <li>C = Cov(x_k, x_t), starting at P_k; a prediction x_t' = F x_t + w makes it C F';</li>
 *   <li>an update with H, R, innovation nu and S = H P_t H' + R (P_t its prior covariance) moves the
 *       node's own estimate by G nu with G = C H' S^-1, lowers its covariance by G S G', and makes the
 *       cross-covariance C - G H P_t. The last holds for any gain the filter itself used, so the
 *       Schmidt updates of {@link JosephUpdate} (consider states frozen) need nothing special: the
 *       error of x_t after such an update is e_t - K nu and E[(e_k - G nu)(e_t - K nu)'] =
 *       C - G H P_t whatever K is.</li>
 * </ul>
 * At node k+1 the link holds x~_k = E[x_k | data up to k+1], its covariance P~_k and C_k =
 * Cov(x_k, x_{k+1}), and the backward step is the Rauch-Tung-Striebel step with these in place of the
 * filtered and predicted quantities: J = C_k P_{k+1}^-1, x_k|N = x~_k + J (x_{k+1|N} - x_{k+1}),
 * P_k|N = P~_k + J (P_{k+1|N} - P_{k+1}) J' (Rauch, Tung, Striebel, AIAA Journal 3(8), 1965; with no
 * update between the nodes x~_k = x_k, P~_k = P_k, C_k = P_k Phi' and this is their smoother over the
 * composed transition Phi). Later data act on x_k only through x_{k+1}, so the step is exact for a
 * linear model whatever happened between the nodes.
 *
 * <h2>What the filter does besides predicting and updating</h2>
 * The filter's decisions also change P outright: they widen it when fixes disagree
 * ({@link InnovationMonitor}, {@link FixConsistency}, {@link Reacquisition}), and a reset starts it
 * afresh. The log does not rely on knowing them: it keeps a copy of x and P after every step and
 * update it saw, and any difference it finds at the next one is a change made by something else.
 * <ul>
 *   <li>P grew by a positive semi-definite amount (an added nu nu', a raised variance): that is extra
 *       process noise at that instant, independent of x_k, so it is folded in as it is: C and the
 *       node's estimate are unchanged, and the next node's covariance contains it.</li>
 *   <li>Any other change (rows and columns scaled, x moved, the filter no longer initialised): the
 *       segment ends there. The last node of the segment keeps x~ and P~ (its estimate given the data
 *       up to the change) and no information crosses to the nodes before it; the next node starts a
 *       new, independent segment. A reset therefore always cuts the smoother in two.</li>
 * </ul>
 *
 * <h2>Memory</h2>
 * A node takes {@value #RECORD} doubles (2.2 KB): x and P of the node, x~, P~ (upper triangles) and
 * C. Nodes are the times a caller asks for (every pose of a replay: every fix and every
 * {@code history.interval_s}), not the filter's steps or updates, so a one-hour drive with a pose
 * every 0.2 s takes about 40 MB whatever the rate of its inputs.
 *
 * <p>Not thread-safe; one log per filter, attached by {@link NavigationFilter#recordForSmoothing()}.
 */
public final class SmootherLog {

    /** Entries of an upper triangle of P, row by row. */
    static final int TRIANGLE = SIZE * (SIZE + 1) / 2;
    private static final int NN = SIZE * SIZE;

    // The layout of a node's record.
    private static final int T = 0;
    private static final int X = 1;
    private static final int P = X + SIZE;
    private static final int X_LINK = P + TRIANGLE;
    private static final int P_LINK = X_LINK + SIZE;
    private static final int C = P_LINK + TRIANGLE;
    /** Doubles per node. */
    static final int RECORD = C + NN;

    /** Nodes per storage chunk: about 2.3 MB, so growing never copies what is stored. */
    private static final int CHUNK_NODES = 1024;

    /** A node taken while the filter had no state (before its start, after a reset). */
    static final byte NO_STATE = 0;
    /** A node whose link to the next node is being built. */
    private static final byte OPEN = 1;
    /** A node linked to the next node of its segment. */
    static final byte LINKED = 2;
    /** The last node of a segment: its link holds its estimate given the data up to the segment's end. */
    static final byte END = 3;

    /**
     * Relative tolerance of the test that a change of P is positive semi-definite: the smallest
     * eigenvalue may be this far below zero, relative to the largest magnitude of P, and still count as
     * zero (the additions are made in place, so the difference carries rounding of P's own size).
     */
    private static final double PSD_TOLERANCE = 1e-12;

    private final FilterState s;
    private final List<double[]> chunks = new ArrayList<>();
    private byte[] kinds = new byte[CHUNK_NODES];
    private int nodes;
    /** The node the open link starts from. */
    private int current = -1;
    /** The newest node while its time lasts (no step since it was taken), else -1. */
    private int fresh = -1;
    private boolean open;
    private boolean finished;
    private boolean rewound;
    private int segments;
    private int folded;
    private int cuts;

    // The link being built: x~, P~ (full), C.
    private final double[] xLink = new double[SIZE];
    private final DMatrixRMaj pLink = new DMatrixRMaj(SIZE, SIZE);
    private final DMatrixRMaj c = new DMatrixRMaj(SIZE, SIZE);
    // x and P as the last step or update the log saw left them.
    private final double[] xSeen = new double[SIZE];
    private final double[] pSeen = new double[NN];
    // Work matrices of the products.
    private final double[] row = new double[SIZE];
    private final DMatrixRMaj[] h = {new DMatrixRMaj(1, SIZE), new DMatrixRMaj(2, SIZE)};
    private final DMatrixRMaj[] hp = {new DMatrixRMaj(1, SIZE), new DMatrixRMaj(2, SIZE)};
    private final DMatrixRMaj[] ch = {new DMatrixRMaj(SIZE, 1), new DMatrixRMaj(SIZE, 2)};
    private final DMatrixRMaj[] chT = {new DMatrixRMaj(1, SIZE), new DMatrixRMaj(2, SIZE)};
    private final DMatrixRMaj[] gT = {new DMatrixRMaj(1, SIZE), new DMatrixRMaj(2, SIZE)};
    private final DMatrixRMaj[] g = {new DMatrixRMaj(SIZE, 1), new DMatrixRMaj(SIZE, 2)};
    private final DMatrixRMaj[] innovation = {new DMatrixRMaj(1, 1), new DMatrixRMaj(2, 2)};
    private final double[] nu = new double[2];
    private int pendingRows;
    private DMatrixRMaj change;
    private EigenDecomposition_F64<DMatrixRMaj> eigen;

    SmootherLog(FilterState s) {
        this.s = s;
    }

    /**
     * Takes a node at the filter's current time. Marks with no prediction step between them (the same
     * time) share one node; a node holds the state after everything applied at its time, taken when
     * the filter first steps past it.
     *
     * @return the node's index: 0 for the first node, one more for each later time
     */
    public int mark() {
        if (finished) {
            throw new IllegalStateException("the log is finished: no node can be added");
        }
        if (open) {
            check();
        }
        if (fresh >= 0) {
            if (s.is(Slot.INITIALIZED) && s.tRel() == slot(fresh)[offset(fresh) + T]) {
                return fresh;
            }
            // The filter lost its state (a reset) before it stepped on: the node has none.
            kinds[fresh] = NO_STATE;
            fresh = -1;
        }
        int k = nodes;
        double[] rec = slot(k);
        rec[offset(k) + T] = s.tRel();
        nodes++;
        if (!s.is(Slot.INITIALIZED)) {
            kinds[k] = NO_STATE;
            return k;
        }
        kinds[k] = OPEN;
        fresh = k;
        return k;
    }

    /**
     * Ends the recording: the last node becomes the end of its segment, with its estimate given every
     * sample applied since. No node can be added afterwards; calling it again does nothing.
     */
    public void finish() {
        if (finished) {
            return;
        }
        if (open) {
            check();
        }
        if (fresh >= 0) {
            if (s.is(Slot.INITIALIZED)) {
                settle();
            } else {
                kinds[fresh] = NO_STATE;
                fresh = -1;
            }
        }
        if (open) {
            closeLink(END);
        }
        finished = true;
    }

    /** Nodes taken (count). */
    public int nodeCount() {
        return nodes;
    }

    /** Independent segments the nodes fall into (count): one, plus one per cut. */
    public int segmentCount() {
        return segments;
    }

    /** Changes of P made outside steps and updates that were folded in as process noise (count). */
    public int foldedChanges() {
        return folded;
    }

    /** Segments ended by a change that could not be folded in, or by a reset (count). */
    public int cuts() {
        return cuts;
    }

    /** Bytes of storage held for the nodes (B). */
    public long bytes() {
        return (long) chunks.size() * CHUNK_NODES * RECORD * Double.BYTES + kinds.length;
    }

    /** Time of node {@code k} (s since the session epoch). */
    public double tRel(int k) {
        checkIndex(k);
        return slot(k)[offset(k) + T];
    }

    /** True when node {@code k} has a state: the filter was initialised when it was taken. */
    public boolean hasState(int k) {
        checkIndex(k);
        return kinds[k] != NO_STATE;
    }

    /** The filtered state at node {@code k} (a copy, layout {@link StateIndex}). */
    public double[] filteredState(int k) {
        requireState(k);
        return Arrays.copyOfRange(slot(k), offset(k) + X, offset(k) + X + SIZE);
    }

    /** The filtered covariance at node {@code k} (a copy, row-major SIZE x SIZE). */
    public double[] filteredCovariance(int k) {
        requireState(k);
        double[] p = new double[NN];
        unpackUpper(slot(k), offset(k) + P, p);
        return p;
    }

    /** True once the filter was returned to an earlier state while recording: the log is void. */
    public boolean rewound() {
        return rewound;
    }

    // ----- what the backward pass reads

    byte kind(int k) {
        return kinds[k];
    }

    boolean isFinished() {
        return finished;
    }

    /** Copies the node's filtered x into {@code x} and full P into {@code p}. */
    void readFiltered(int k, double[] x, double[] p) {
        double[] rec = slot(k);
        int at = offset(k);
        System.arraycopy(rec, at + X, x, 0, SIZE);
        unpackUpper(rec, at + P, p);
    }

    /** Copies the node's link: x~ into {@code x}, P~ (full) into {@code p}, C (row-major) into {@code cOut}. */
    void readLink(int k, double[] x, double[] p, double[] cOut) {
        double[] rec = slot(k);
        int at = offset(k);
        System.arraycopy(rec, at + X_LINK, x, 0, SIZE);
        unpackUpper(rec, at + P_LINK, p);
        if (cOut != null) {
            System.arraycopy(rec, at + C, cOut, 0, NN);
        }
    }

    // ----- hooks called by the filter

    /** Before a prediction step: finds changes made since the log last looked. */
    void beforeStep() {
        if (open) {
            check();
        }
        if (fresh >= 0) {
            settle();
        }
    }

    /**
     * After a prediction step (P = F P F' + Q done): C = C F'.
     *
     * @param f the step's F, row-major SIZE x SIZE (not modified)
     */
    void afterStep(double[] f) {
        if (!open) {
            return;
        }
        timesTranspose(c.data, f, row);
        remember();
    }

    /** Per row b of F, the columns j != b where F[b][j] may be nonzero ({@link MotionModel#COUPLINGS}). */
    private static final int[][] ROW_COUPLINGS = rowCouplings();

    private static int[][] rowCouplings() {
        int[][] rows = new int[SIZE][];
        for (int b = 0; b < SIZE; b++) {
            int n = 0;
            for (int[] cp : MotionModel.COUPLINGS) {
                n += cp[0] == b ? 1 : 0;
            }
            rows[b] = new int[n];
            int k = 0;
            for (int[] cp : MotionModel.COUPLINGS) {
                if (cp[0] == b) {
                    rows[b][k++] = cp[1];
                }
            }
        }
        return rows;
    }

    /**
     * C = C F' in place, over the structure of F ({@link MotionModel#COUPLINGS}: the diagonal and ten
     * couplings, the same pattern {@link CovariancePrediction} uses): 231 multiplications where EJML's
     * dense product takes 1,331; measured 1.8 to 1.9 times faster than it in CPU time
     * ({@code CrossCovarianceBenchmark}, bench/RESULTS.md), which matters because it runs at every step
     * of a recording filter (360,000 steps in an hour of 100 Hz yaw rate).
     *
     * @param c   C, row-major SIZE x SIZE (replaced by C F')
     * @param f   F, row-major SIZE x SIZE (not modified)
     * @param row work array of SIZE
     */
    static void timesTranspose(double[] c, double[] f, double[] row) {
        for (int a = 0; a < SIZE; a++) {
            int ra = a * SIZE;
            // (C F')[a][b] = C[a][b] F[b][b] + sum over the couplings j of row b of C[a][j] F[b][j]
            for (int b = 0; b < SIZE; b++) {
                int rb = b * SIZE;
                double v = c[ra + b] * f[rb + b];
                for (int j : ROW_COUPLINGS[b]) {
                    v += c[ra + j] * f[rb + j];
                }
                row[b] = v;
            }
            System.arraycopy(row, 0, c, ra, SIZE);
        }
    }

    /**
     * Before an update whose H, R and innovation {@code u} holds: finds earlier changes, then prepares
     * the node's share of the update from the prior covariance.
     */
    void beforeUpdate(JosephUpdate u, int m) {
        pendingRows = 0;
        if (!open) {
            return;
        }
        check();
        if (!open) {
            return;
        }
        int i = m - 1;
        DMatrixRMaj hm = h[i];
        System.arraycopy(u.h, 0, hm.data, 0, m * SIZE);
        // HP, S = H P H' + R, C H'; then G = C H' S^-1 from S G' = (C H')', solved by Cholesky.
        CommonOps_DDRM.mult(hm, DMatrixRMaj.wrap(SIZE, SIZE, s.p), hp[i]);
        DMatrixRMaj innov = innovation[i];
        CommonOps_DDRM.multTransB(hp[i], hm, innov);
        for (int r = 0; r < m * m; r++) {
            innov.data[r] += u.r[m == 1 ? 0 : r];
        }
        CommonOps_DDRM.multTransB(c, hm, ch[i]);
        CommonOps_DDRM.transpose(ch[i], chT[i]);
        if (!CommonOps_DDRM.solveSPD(innov.copy(), chT[i], gT[i])) {
            // An innovation covariance that is not positive definite: the filter's own update would be
            // meaningless too. The node's estimate takes nothing from it.
            return;
        }
        CommonOps_DDRM.transpose(gT[i], g[i]);
        nu[0] = u.nu[0];
        nu[1] = m == 2 ? u.nu[1] : 0.0;
        pendingRows = m;
    }

    /**
     * After the update: when the filter applied it, the node's estimate, its covariance and C follow
     * (x~ += G nu; P~ -= G S G' = G (C H')'; C -= G H P).
     *
     * @param applied false when the filter refused the update and left its state as it was
     */
    void afterUpdate(boolean applied) {
        int m = pendingRows;
        pendingRows = 0;
        if (!open || m == 0 || !applied) {
            return;
        }
        DMatrixRMaj gm = g[m - 1];
        // x~ += G nu
        for (int i = 0; i < SIZE; i++) {
            double dx = gm.data[i * m] * nu[0];
            if (m == 2) {
                dx += gm.data[i * m + 1] * nu[1];
            }
            xLink[i] += dx;
        }
        xLink[YAW] = Angles.wrapPi(xLink[YAW]);
        // P~ -= G (C H')'
        CommonOps_DDRM.multAddTransB(-1.0, gm, ch[m - 1], pLink);
        // C -= G (H P)
        CommonOps_DDRM.multAdd(-1.0, gm, hp[m - 1], c);
        symmetrise(pLink.data);
        remember();
    }

    /** The filter was returned to an earlier state: what was recorded after it no longer happened. */
    void rewind() {
        rewound = true;
        open = false;
        fresh = -1;
        finished = true;
    }

    // ----- inner workings

    /** Compares x and P with what the log last saw and handles a change made by something else. */
    private void check() {
        if (!s.is(Slot.INITIALIZED)) {
            cut();
            return;
        }
        boolean pSame = Arrays.equals(s.p, pSeen);
        if (pSame && Arrays.equals(s.x, xSeen)) {
            return;
        }
        if (!Arrays.equals(s.x, xSeen) || !psdIncrease()) {
            cut();
            return;
        }
        folded++;
        remember();
    }

    /** True when P - (P as last seen) is positive semi-definite (to rounding). */
    private boolean psdIncrease() {
        if (change == null) {
            change = new DMatrixRMaj(SIZE, SIZE);
            eigen = DecompositionFactory_DDRM.eig(SIZE, false, true);
        }
        double scale = 0.0;
        for (int i = 0; i < NN; i++) {
            double d = s.p[i] - pSeen[i];
            change.data[i] = d;
            scale = Math.max(scale, Math.abs(s.p[i]));
        }
        // Exact symmetry for the symmetric algorithm; the filter's P is symmetric by construction.
        for (int i = 0; i < SIZE; i++) {
            for (int j = i + 1; j < SIZE; j++) {
                double avg = 0.5 * (change.data[i * SIZE + j] + change.data[j * SIZE + i]);
                change.data[i * SIZE + j] = avg;
                change.data[j * SIZE + i] = avg;
            }
        }
        if (!eigen.decompose(change)) {
            return false;
        }
        for (int i = 0; i < SIZE; i++) {
            if (eigen.getEigenvalue(i).getReal() < -PSD_TOLERANCE * scale) {
                return false;
            }
        }
        return true;
    }

    /** Ends the segment at the open node. */
    private void cut() {
        if (open) {
            closeLink(END);
            cuts++;
        }
    }

    /**
     * The filter steps past the fresh node's time: its state is final. The open link (from the node
     * before) ends at it; a new link starts from it, or a new segment when none was open.
     */
    private void settle() {
        int k = fresh;
        fresh = -1;
        double[] rec = slot(k);
        int at = offset(k);
        System.arraycopy(s.x, 0, rec, at + X, SIZE);
        packUpper(s.p, rec, at + P);
        if (open) {
            closeLink(LINKED);
        } else {
            segments++;
        }
        kinds[k] = OPEN;
        current = k;
        System.arraycopy(s.x, 0, xLink, 0, SIZE);
        System.arraycopy(s.p, 0, pLink.data, 0, NN);
        System.arraycopy(s.p, 0, c.data, 0, NN);
        open = true;
        remember();
    }

    private void closeLink(byte kind) {
        double[] rec = slot(current);
        int at = offset(current);
        System.arraycopy(xLink, 0, rec, at + X_LINK, SIZE);
        packUpper(pLink.data, rec, at + P_LINK);
        if (kind == LINKED) {
            System.arraycopy(c.data, 0, rec, at + C, NN);
        }
        kinds[current] = kind;
        open = false;
    }

    private void remember() {
        System.arraycopy(s.x, 0, xSeen, 0, SIZE);
        System.arraycopy(s.p, 0, pSeen, 0, NN);
    }

    private double[] slot(int k) {
        int chunk = k / CHUNK_NODES;
        while (chunks.size() <= chunk) {
            chunks.add(new double[CHUNK_NODES * RECORD]);
        }
        if (k >= kinds.length) {
            kinds = Arrays.copyOf(kinds, kinds.length * 2);
        }
        return chunks.get(chunk);
    }

    private static int offset(int k) {
        return (k % CHUNK_NODES) * RECORD;
    }

    private void checkIndex(int k) {
        if (k < 0 || k >= nodes) {
            throw new IndexOutOfBoundsException("node: " + k + " is not among the " + nodes + " nodes taken");
        }
    }

    private void requireState(int k) {
        checkIndex(k);
        if (kinds[k] == NO_STATE) {
            throw new IllegalArgumentException("node: " + k + " was taken before the filter had a state");
        }
    }

    static void packUpper(double[] full, double[] out, int at) {
        int q = at;
        for (int i = 0; i < SIZE; i++) {
            for (int j = i; j < SIZE; j++) {
                out[q++] = full[i * SIZE + j];
            }
        }
    }

    static void unpackUpper(double[] packed, int at, double[] full) {
        int q = at;
        for (int i = 0; i < SIZE; i++) {
            for (int j = i; j < SIZE; j++) {
                double v = packed[q++];
                full[i * SIZE + j] = v;
                full[j * SIZE + i] = v;
            }
        }
    }

    static void symmetrise(double[] m) {
        for (int i = 0; i < SIZE; i++) {
            for (int j = i + 1; j < SIZE; j++) {
                double avg = 0.5 * (m[i * SIZE + j] + m[j * SIZE + i]);
                m[i * SIZE + j] = avg;
                m[j * SIZE + i] = avg;
            }
        }
    }
}
