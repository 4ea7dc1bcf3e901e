package org.wayhold.filter;

import static org.wayhold.filter.StateIndex.SIZE;
import static org.wayhold.filter.StateIndex.YAW;

import java.util.Arrays;
import org.wayhold.geo.Angles;

/**
 * The correction mechanics of the filter: gain and Joseph-form covariance update for a measurement of
 * one or two rows. A measurement model fills {@link #h}, {@link #r} and {@link #nu}, calls
 * {@link #prepare}, reads {@link #nis} to decide,
 * and calls {@link #apply} to correct the state.
 *
 * <p>The covariance update is P = (I - K H) P (I - K H)' + K R K', which keeps P symmetric and positive
 * semi-definite for any gain (Bucy and Joseph, <i>Filtering for Stochastic Processes with Applications
 * to Guidance</i>, 1968; Brown and Hwang, <i>Introduction to Random Signals and Applied Kalman
 * Filtering</i>, 4th ed., sec. 4.2). It is applied in factored form with the structural zeros of H
 * skipped (the columns where H is zero are found once per measurement), and allocates nothing. Not
 * thread-safe: one per filter.
 */
final class JosephUpdate {

    /** H, row-major, the first m rows of SIZE entries used; filled by the measurement model. */
    final double[] h = new double[2 * SIZE];
    /** R, row-major m x m (m = 1 uses r[0]); filled by the measurement model. */
    final double[] r = new double[4];
    /** The innovation z - h(x), m entries; filled by the measurement model. */
    final double[] nu = new double[2];
    /**
     * States the next {@link #apply} leaves unchanged ("consider" states of the Schmidt-Kalman filter:
     * their gain rows are zero). Their uncertainty still counts in S, so the update stays honest; they
     * are only not learnt from a measurement that cannot tell them apart. Cleared by {@link #apply}.
     */
    final boolean[] frozen = new boolean[SIZE];
    /** Hears of every update when the filter records for smoothing, else null. */
    SmootherLog smoothing;

    private final double[] ph = new double[SIZE * 2];
    private final double[] k = new double[SIZE * 2];
    private final double[] sInv = new double[4];
    /** det S of the last prepared measurement (m^2 units of its rows, multiplied). */
    private double detS = Double.NaN;
    private final double[] hp = new double[2 * SIZE];
    private final double[] tmp = new double[SIZE * SIZE];
    private final double[] pNew = new double[SIZE * SIZE];
    private final double[] xNew = new double[SIZE];
    /** Columns where H has a nonzero entry, ascending; filled with S. */
    private final int[] hCols = new int[SIZE];
    private int hColCount;

    /**
     * S = H P H' + R for the first m rows of H; keeps PH', S^-1 and the columns where H has a nonzero
     * entry. Zero entries of H are skipped: the filter's H rows are sparse.
     *
     * @param p P, row-major SIZE x SIZE (not modified)
     * @param m rows of H (1 or 2)
     */
    void prepare(double[] p, int m) {
        hColCount = 0;
        for (int l = 0; l < SIZE; l++) {
            if (h[l] != 0.0 || (m == 2 && h[SIZE + l] != 0.0)) {
                hCols[hColCount++] = l;
            }
        }
        // PH' (SIZE x m)
        for (int i = 0; i < SIZE; i++) {
            int row = i * SIZE;
            double a0 = 0.0;
            double a1 = 0.0;
            for (int c = 0; c < hColCount; c++) {
                int l = hCols[c];
                double pil = p[row + l];
                a0 += pil * h[l];
                a1 += pil * h[SIZE + l];
            }
            ph[i * 2] = a0;
            ph[i * 2 + 1] = m == 2 ? a1 : 0.0;
        }
        if (m == 1) {
            double s00 = r[0];
            for (int c = 0; c < hColCount; c++) {
                int l = hCols[c];
                s00 += h[l] * ph[l * 2];
            }
            sInv[0] = 1.0 / s00;
            detS = s00;
            return;
        }
        // S = H PH' + R (2 x 2), inverted in closed form.
        double s00 = r[0];
        double s01 = r[1];
        double s10 = r[2];
        double s11 = r[3];
        for (int c = 0; c < hColCount; c++) {
            int l = hCols[c];
            s00 += h[l] * ph[l * 2];
            s01 += h[l] * ph[l * 2 + 1];
            s10 += h[SIZE + l] * ph[l * 2];
            s11 += h[SIZE + l] * ph[l * 2 + 1];
        }
        invert(s00, s01, s10, s11);
    }

    private void invert(double s00, double s01, double s10, double s11) {
        double det = s00 * s11 - s01 * s10;
        detS = det;
        sInv[0] = s11 / det;
        sInv[1] = -s01 / det;
        sInv[2] = -s10 / det;
        sInv[3] = s00 / det;
    }

    /** Normalised innovation squared nu' S^-1 nu of a prepared two-row measurement (unitless). */
    double nis() {
        return nu[0] * (sInv[0] * nu[0] + sInv[1] * nu[1]) + nu[1] * (sInv[2] * nu[0] + sInv[3] * nu[1]);
    }

    /**
     * ln det S of the prepared measurement: with the normalised innovation squared it is the
     * measurement's term of the Gaussian log-likelihood (Schweppe 1965).
     */
    double logDetS() {
        return Math.log(detS);
    }

    /** Normalised innovation squared of a prepared one-row measurement (unitless). */
    double nis1() {
        return nu[0] * nu[0] * sInv[0];
    }

    /**
     * Applies a prepared update to the state, with the gain K = P H' S^-1 and the Joseph-form covariance
     * update; a variance that rounding leaves non-positive is repaired and counted. An update that would
     * leave a state or covariance entry that is not finite is refused: the state stays as it was, and the
     * refusal is counted.
     *
     * @param s the state (x and P modified)
     * @param m rows of H, as prepared
     * @return false when the update was refused
     */
    boolean apply(FilterState s, int m) {
        if (smoothing != null) {
            smoothing.beforeUpdate(this, m);
        }
        boolean applied = correct(s, m);
        if (smoothing != null) {
            smoothing.afterUpdate(applied);
        }
        return applied;
    }

    private boolean correct(FilterState s, int m) {
        double[] x = s.x;
        // K = P H' S^-1 (SIZE x m)
        for (int i = 0; i < SIZE; i++) {
            if (m == 1) {
                k[i * 2] = ph[i * 2] * sInv[0];
                k[i * 2 + 1] = 0.0;
            } else {
                k[i * 2] = ph[i * 2] * sInv[0] + ph[i * 2 + 1] * sInv[2];
                k[i * 2 + 1] = ph[i * 2] * sInv[1] + ph[i * 2 + 1] * sInv[3];
            }
        }
        for (int i = 0; i < SIZE; i++) {
            if (frozen[i]) {
                // Schmidt (1966): a zero gain row; the Joseph form below is right for any gain.
                k[i * 2] = 0.0;
                k[i * 2 + 1] = 0.0;
                frozen[i] = false;
            }
        }
        // x = x + K nu
        boolean finite = true;
        for (int i = 0; i < SIZE; i++) {
            double dx = k[i * 2] * nu[0];
            if (m == 2) {
                dx += k[i * 2 + 1] * nu[1];
            }
            xNew[i] = x[i] + dx;
            finite &= Double.isFinite(xNew[i]);
        }
        xNew[YAW] = Angles.wrapPi(xNew[YAW]);
        joseph(s.p, m);
        for (int i = 0; i < SIZE * SIZE && finite; i++) {
            finite = Double.isFinite(pNew[i]);
        }
        if (!finite) {
            s.increment(FilterCounter.UPDATES_REFUSED);
            return false;
        }
        System.arraycopy(xNew, 0, x, 0, SIZE);
        System.arraycopy(pNew, 0, s.p, 0, SIZE * SIZE);
        if (repairDiagonal(s.p)) {
            s.increment(FilterCounter.COVARIANCE_REPAIRS);
        }
        return true;
    }

    /**
     * P' = A P A' + K R K' into {@link #pNew}, with A = I - K H, applied in factored form rather than formed: A P = P - K (H P)
     * and (A P) A' = A P - ((A P) H') K'. It keeps the
     * Joseph form's structure (a congruence of P plus K R K'), which holds P symmetric and positive
     * semi-definite for any gain. Only the upper triangle is computed and mirrored: the result is
     * symmetric by construction. With H's zero columns skipped it costs O(n^2 (m + k)) for k nonzero
     * columns where the dense products cost O(n^3).
     */
    private void joseph(double[] p, int m) {
        // HP (m x SIZE) into hp, row by row of P so the inner loop runs along contiguous memory.
        Arrays.fill(hp, 0.0);
        for (int rIdx = 0; rIdx < m; rIdx++) {
            int out = rIdx * SIZE;
            for (int c = 0; c < hColCount; c++) {
                int l = hCols[c];
                double hrl = h[out + l];
                int row = l * SIZE;
                for (int j = 0; j < SIZE; j++) {
                    hp[out + j] += hrl * p[row + j];
                }
            }
        }
        // tmp = A P = P - K (HP)
        for (int i = 0; i < SIZE; i++) {
            double k0 = k[i * 2];
            double k1 = k[i * 2 + 1];
            for (int j = 0; j < SIZE; j++) {
                tmp[i * SIZE + j] = p[i * SIZE + j] - (k0 * hp[j] + k1 * hp[SIZE + j]);
            }
        }
        // tmp H' (SIZE x 2) into ph: PH' is not needed any more.
        for (int i = 0; i < SIZE; i++) {
            double a0 = 0.0;
            double a1 = 0.0;
            for (int c = 0; c < hColCount; c++) {
                int l = hCols[c];
                a0 += tmp[i * SIZE + l] * h[l];
                a1 += tmp[i * SIZE + l] * h[SIZE + l];
            }
            ph[i * 2] = a0;
            ph[i * 2 + 1] = m == 2 ? a1 : 0.0;
        }
        // P = tmp - (tmp H') K' + K R K', upper triangle, mirrored.
        double r00 = r[0];
        double r01 = m == 2 ? r[1] : 0.0;
        double r10 = m == 2 ? r[2] : 0.0;
        double r11 = m == 2 ? r[3] : 0.0;
        for (int i = 0; i < SIZE; i++) {
            double ki0 = k[i * 2];
            double ki1 = k[i * 2 + 1];
            double u0 = ph[i * 2];
            double u1 = ph[i * 2 + 1];
            // Row i of K R
            double kr0 = ki0 * r00 + ki1 * r10;
            double kr1 = ki0 * r01 + ki1 * r11;
            for (int j = i; j < SIZE; j++) {
                double kj0 = k[j * 2];
                double kj1 = k[j * 2 + 1];
                double v = tmp[i * SIZE + j] - (u0 * kj0 + u1 * kj1) + (kr0 * kj0 + kr1 * kj1);
                pNew[i * SIZE + j] = v;
                pNew[j * SIZE + i] = v;
            }
        }
    }

    /** Sets a variance that rounding left non-positive (or NaN) to a tiny positive value; true if any. */
    private static boolean repairDiagonal(double[] p) {
        boolean repaired = false;
        for (int i = 0; i < SIZE; i++) {
            if (!(p[i * SIZE + i] >= 0.0)) {
                p[i * SIZE + i] = 1e-12;
                repaired = true;
            }
        }
        return repaired;
    }
}
