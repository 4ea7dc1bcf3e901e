package org.wayhold.filter;

import static org.wayhold.filter.StateIndex.EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_NORTH;
import static org.wayhold.filter.StateIndex.GYRO_BIAS;
import static org.wayhold.filter.StateIndex.GYRO_SCALE;
import static org.wayhold.filter.StateIndex.NORTH;
import static org.wayhold.filter.StateIndex.SIZE;
import static org.wayhold.filter.StateIndex.SPEED_SCALE;
import static org.wayhold.filter.StateIndex.YAW;

/**
 * The vehicle's motion over one step with wheel speed and yaw rate held constant: a planar
 * constant-turn-rate, constant-speed model integrated exactly (not a first-order Euler step).
 *
 * <p>With omega = gyro scale * (yaw-rate reading - bias) and v = speed scale * wheel speed held over
 * dt, and theta = omega dt:
 * <pre>
 *   east'  = east  + v dt (cos(yaw) f1(theta) - sin(yaw) f2(theta))
 *   north' = north + v dt (sin(yaw) f1(theta) + cos(yaw) f2(theta))
 *   yaw'   = yaw + theta
 * </pre>
 * where f1 = sin(theta)/theta and f2 = (1 - cos(theta))/theta, the closed-form integral of
 * v (cos, sin)(yaw + omega s) over s in [0, dt]. Their Taylor series serve near theta = 0 so straight
 * driving loses no precision. The GNSS error states decay as a first-order Gauss-Markov process,
 * x' = exp(-dt/tau) x (Brown and Hwang, <i>Introduction to Random Signals and Applied Kalman
 * Filtering</i>, 4th ed., sec. 4.2). Bias and scale factors are random walks, the lever arm and the
 * latency constants: the mean motion leaves them unchanged.
 *
 * <p>At a standstill the yaw is held (omega = 0) so the bias, observed by the zero-rate update, does not
 * leak into the heading.
 */
public final class MotionModel {

    /** Below this |theta| (rad) the Taylor series of f1, f2 and their derivatives are used. */
    private static final double SMALL_ANGLE_RAD = 1e-4;

    /**
     * The off-diagonal entries of F that can be nonzero, as {row, column}: the pattern
     * {@link CovariancePrediction} exploits. Every other off-diagonal entry is zero, and the diagonal is
     * one except for {@link #DECAYING}.
     */
    static final int[][] COUPLINGS = {
        {EAST, YAW}, {EAST, GYRO_BIAS}, {EAST, SPEED_SCALE}, {EAST, GYRO_SCALE},
        {NORTH, YAW}, {NORTH, GYRO_BIAS}, {NORTH, SPEED_SCALE}, {NORTH, GYRO_SCALE},
        {YAW, GYRO_BIAS}, {YAW, GYRO_SCALE},
    };

    /** States whose diagonal entry of F is the Gauss-Markov decay exp(-dt/tau) rather than one. */
    static final int[] DECAYING = {GNSS_ERR_EAST, GNSS_ERR_NORTH};

    private MotionModel() {
    }

    /**
     * Propagates a state over one step and fills the transition Jacobian.
     *
     * @param x              state at the start (not modified), layout {@link StateIndex}
     * @param wheelSpeedMps  held wheel speed (m/s, signed)
     * @param yawRateRadPerS held yaw-rate reading (rad/s, counter-clockwise positive)
     * @param dtS            step length (s, > 0)
     * @param standstill     true when the vehicle is known to stand still: yaw is held
     * @param gnssDecay      exp(-dt / tau) of the GNSS error states (unitless)
     * @param xOut           receives the propagated state (may not alias {@code x})
     * @param fOut           receives F, row-major SIZE x SIZE, or null when not wanted
     * @param inputOut       receives d(east, north, yaw)/d(wheel speed) in [0..2] and
     *                       d(east, north, yaw)/d(yaw-rate reading) in [3..5], or null when not wanted
     */
    public static void step(double[] x, double wheelSpeedMps, double yawRateRadPerS, double dtS,
                            boolean standstill, double gnssDecay, double[] xOut, double[] fOut,
                            double[] inputOut) {
        double yaw = x[YAW];
        double scale = x[SPEED_SCALE];
        double gyroScale = x[GYRO_SCALE];
        double unbiased = yawRateRadPerS - x[GYRO_BIAS];
        double omega = standstill ? 0.0 : gyroScale * unbiased;
        double theta = omega * dtS;
        double f1;
        double f2;
        double df1;
        double df2;
        if (Math.abs(theta) < SMALL_ANGLE_RAD) {
            double t2 = theta * theta;
            f1 = 1.0 - t2 / 6.0 + t2 * t2 / 120.0;
            f2 = theta * (0.5 - t2 / 24.0 + t2 * t2 / 720.0);
            df1 = theta * (-1.0 / 3.0 + t2 / 30.0);
            df2 = 0.5 - t2 / 8.0 + t2 * t2 / 144.0;
        } else {
            double sinT = Math.sin(theta);
            double cosT = Math.cos(theta);
            f1 = sinT / theta;
            f2 = (1.0 - cosT) / theta;
            df1 = (theta * cosT - sinT) / (theta * theta);
            df2 = (theta * sinT - (1.0 - cosT)) / (theta * theta);
        }
        double c = Math.cos(yaw);
        double s = Math.sin(yaw);
        double ce = c * f1 - s * f2;
        double cn = s * f1 + c * f2;
        double dist = scale * wheelSpeedMps * dtS;
        double dEast = dist * ce;
        double dNorth = dist * cn;

        System.arraycopy(x, 0, xOut, 0, SIZE);
        xOut[EAST] = x[EAST] + dEast;
        xOut[NORTH] = x[NORTH] + dNorth;
        xOut[YAW] = x[YAW] + theta;
        xOut[GNSS_ERR_EAST] = gnssDecay * x[GNSS_ERR_EAST];
        xOut[GNSS_ERR_NORTH] = gnssDecay * x[GNSS_ERR_NORTH];

        // d(dEast, dNorth)/d(theta): needed for the bias and gyro-scale columns and the yaw-rate input.
        double dEastDTheta = dist * (c * df1 - s * df2);
        double dNorthDTheta = dist * (s * df1 + c * df2);
        // theta = g (r - b) dt: its derivatives by the bias, the gyro scale and the reading.
        double dThetaDBias = standstill ? 0.0 : -gyroScale * dtS;
        double dThetaDScale = standstill ? 0.0 : unbiased * dtS;
        double dThetaDRate = standstill ? 0.0 : gyroScale * dtS;

        if (fOut != null) {
            java.util.Arrays.fill(fOut, 0.0);
            for (int i = 0; i < SIZE; i++) {
                fOut[i * SIZE + i] = 1.0;
            }
            fOut[EAST * SIZE + YAW] = -dNorth;
            fOut[NORTH * SIZE + YAW] = dEast;
            fOut[EAST * SIZE + GYRO_BIAS] = dThetaDBias * dEastDTheta;
            fOut[NORTH * SIZE + GYRO_BIAS] = dThetaDBias * dNorthDTheta;
            fOut[YAW * SIZE + GYRO_BIAS] = dThetaDBias;
            fOut[EAST * SIZE + GYRO_SCALE] = dThetaDScale * dEastDTheta;
            fOut[NORTH * SIZE + GYRO_SCALE] = dThetaDScale * dNorthDTheta;
            fOut[YAW * SIZE + GYRO_SCALE] = dThetaDScale;
            fOut[EAST * SIZE + SPEED_SCALE] = wheelSpeedMps * dtS * ce;
            fOut[NORTH * SIZE + SPEED_SCALE] = wheelSpeedMps * dtS * cn;
            fOut[GNSS_ERR_EAST * SIZE + GNSS_ERR_EAST] = gnssDecay;
            fOut[GNSS_ERR_NORTH * SIZE + GNSS_ERR_NORTH] = gnssDecay;
        }
        if (inputOut != null) {
            inputOut[0] = scale * dtS * ce;
            inputOut[1] = scale * dtS * cn;
            inputOut[2] = 0.0;
            inputOut[3] = dThetaDRate * dEastDTheta;
            inputOut[4] = dThetaDRate * dNorthDTheta;
            inputOut[5] = dThetaDRate;
        }
    }
}
