package org.wayhold.filter;

import static org.wayhold.filter.StateIndex.EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_NORTH;
import static org.wayhold.filter.StateIndex.GYRO_BIAS;
import static org.wayhold.filter.StateIndex.NORTH;
import static org.wayhold.filter.StateIndex.SIZE;
import static org.wayhold.filter.StateIndex.SPEED_SCALE;
import static org.wayhold.filter.StateIndex.YAW;

/**
 * The covariance half of the prediction, P = F P F', for a transition with {@link MotionModel}'s
 * pattern. Process noise is added afterwards by {@link MotionModel#addProcessNoise}.
 */
final class CovariancePrediction {

    private CovariancePrediction() {
    }

    /**
     * P = F P F' for a transition F with {@link MotionModel}'s pattern: the identity except
     * F[east|north][yaw|bias|scale], F[yaw][bias] and the Gauss-Markov decay on the diagonal of the
     * GNSS error states. The product skips the structural zeros (about 200 multiplications instead of
     * 686) but adds the remaining terms in the same order as the dense product, starting from +0.0, and
     * multiplies by the unit diagonal exactly, so the result is the dense one bit for bit.
     *
     * @param f   F, row-major SIZE x SIZE (not modified)
     * @param p   P, row-major SIZE x SIZE (replaced by F P F')
     * @param tmp work array of SIZE x SIZE (overwritten)
     */
    static void predict(double[] f, double[] p, double[] tmp) {
        double fEY = f[EAST * SIZE + YAW];
        double fEB = f[EAST * SIZE + GYRO_BIAS];
        double fES = f[EAST * SIZE + SPEED_SCALE];
        double fNY = f[NORTH * SIZE + YAW];
        double fNB = f[NORTH * SIZE + GYRO_BIAS];
        double fNS = f[NORTH * SIZE + SPEED_SCALE];
        double fYB = f[YAW * SIZE + GYRO_BIAS];
        double dE = f[GNSS_ERR_EAST * SIZE + GNSS_ERR_EAST];
        double dN = f[GNSS_ERR_NORTH * SIZE + GNSS_ERR_NORTH];
        // tmp = F P, row by row; terms in ascending column order of F (east, north < yaw < bias < scale).
        for (int j = 0; j < SIZE; j++) {
            double pY = p[YAW * SIZE + j];
            double pB = p[GYRO_BIAS * SIZE + j];
            double pS = p[SPEED_SCALE * SIZE + j];
            tmp[EAST * SIZE + j] = 0.0 + p[EAST * SIZE + j] + fEY * pY + fEB * pB + fES * pS;
            tmp[NORTH * SIZE + j] = 0.0 + p[NORTH * SIZE + j] + fNY * pY + fNB * pB + fNS * pS;
            tmp[YAW * SIZE + j] = 0.0 + pY + fYB * pB;
            tmp[GYRO_BIAS * SIZE + j] = 0.0 + pB;
            tmp[SPEED_SCALE * SIZE + j] = 0.0 + pS;
            tmp[GNSS_ERR_EAST * SIZE + j] = 0.0 + dE * p[GNSS_ERR_EAST * SIZE + j];
            tmp[GNSS_ERR_NORTH * SIZE + j] = 0.0 + dN * p[GNSS_ERR_NORTH * SIZE + j];
        }
        // P = tmp F', column by column of the result.
        for (int i = 0; i < SIZE; i++) {
            int row = i * SIZE;
            double tY = tmp[row + YAW];
            double tB = tmp[row + GYRO_BIAS];
            double tS = tmp[row + SPEED_SCALE];
            p[row + EAST] = 0.0 + tmp[row + EAST] + tY * fEY + tB * fEB + tS * fES;
            p[row + NORTH] = 0.0 + tmp[row + NORTH] + tY * fNY + tB * fNB + tS * fNS;
            p[row + YAW] = 0.0 + tY + tB * fYB;
            p[row + GYRO_BIAS] = 0.0 + tB;
            p[row + SPEED_SCALE] = 0.0 + tS;
            p[row + GNSS_ERR_EAST] = 0.0 + tmp[row + GNSS_ERR_EAST] * dE;
            p[row + GNSS_ERR_NORTH] = 0.0 + tmp[row + GNSS_ERR_NORTH] * dN;
        }
    }
}
