package org.wayhold.filter;

import static org.wayhold.filter.StateIndex.SIZE;

/**
 * The covariance half of the prediction, P = F P F', for a transition with {@link MotionModel}'s
 * pattern: the identity, plus the couplings {@link MotionModel#COUPLINGS}, with the decay on the
 * diagonal of {@link MotionModel#DECAYING}. Process noise is added afterwards by {@link ProcessNoise}.
 *
 * <p>The product skips the structural zeros: with eleven states and ten couplings it takes about 450
 * multiplications where the dense product takes 2,662. It adds each entry's terms in ascending column
 * order of F, starting from the diagonal term, so it equals the dense product in exact arithmetic and
 * differs from it only by rounding.
 */
final class CovariancePrediction {

    /** Per row i of F, the columns j != i where F[i][j] may be nonzero, ascending. */
    private static final int[][] ROW_COUPLINGS = rowCouplings();
    /** Per state, true when its diagonal entry of F is not one. */
    private static final boolean[] DECAYS = decays();

    private CovariancePrediction() {
    }

    private static int[][] rowCouplings() {
        int[][] rows = new int[SIZE][];
        for (int i = 0; i < SIZE; i++) {
            int n = 0;
            for (int[] c : MotionModel.COUPLINGS) {
                if (c[0] == i) {
                    n++;
                }
            }
            rows[i] = new int[n];
            int k = 0;
            for (int j = 0; j < SIZE; j++) {
                for (int[] c : MotionModel.COUPLINGS) {
                    if (c[0] == i && c[1] == j) {
                        rows[i][k++] = j;
                    }
                }
            }
        }
        return rows;
    }

    private static boolean[] decays() {
        boolean[] d = new boolean[SIZE];
        for (int i : MotionModel.DECAYING) {
            d[i] = true;
        }
        return d;
    }

    /**
     * P = F P F'.
     *
     * @param f   F, row-major SIZE x SIZE (not modified)
     * @param p   P, row-major SIZE x SIZE (replaced by F P F')
     * @param tmp work array of SIZE x SIZE (overwritten)
     */
    static void predict(double[] f, double[] p, double[] tmp) {
        // tmp = F P, row by row.
        for (int i = 0; i < SIZE; i++) {
            int row = i * SIZE;
            int[] cols = ROW_COUPLINGS[i];
            double d = f[row + i];
            for (int j = 0; j < SIZE; j++) {
                double v = DECAYS[i] ? d * p[row + j] : p[row + j];
                for (int c : cols) {
                    v += f[row + c] * p[c * SIZE + j];
                }
                tmp[row + j] = v;
            }
        }
        // P = tmp F', entry (a, b) = sum over j of tmp[a][j] F[b][j].
        for (int b = 0; b < SIZE; b++) {
            int fRow = b * SIZE;
            int[] cols = ROW_COUPLINGS[b];
            double d = f[fRow + b];
            boolean decays = DECAYS[b];
            for (int a = 0; a < SIZE; a++) {
                int row = a * SIZE;
                double v = decays ? tmp[row + b] * d : tmp[row + b];
                for (int c : cols) {
                    v += tmp[row + c] * f[fRow + c];
                }
                p[row + b] = v;
            }
        }
    }
}
