package org.wayhold.filter;

import static org.wayhold.filter.StateIndex.GNSS_ERR_EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_NORTH;
import static org.wayhold.filter.StateIndex.GYRO_BIAS;
import static org.wayhold.filter.StateIndex.SIZE;
import static org.wayhold.filter.StateIndex.SPEED_SCALE;

import org.wayhold.settings.FilterSettings;

/**
 * The vehicle model's process noise Q over one step, added to P after {@link CovariancePrediction}:
 * the white noise of the wheel-speed and yaw-rate inputs mapped through the input Jacobian of
 * {@link MotionModel#step}, the random walks of gyro bias and wheel-speed scale, and the driving noise
 * of the Gauss-Markov GNSS error.
 */
final class ProcessNoise {

    /** Density of the wheel-speed noise: per-reading variance over the reading rate (m^2/s). */
    private final double wheelDensity;
    /** Density of the yaw-rate noise: per-reading variance over the reading rate (rad^2/s). */
    private final double gyroDensity;
    /** Variance growth of the gyro bias ((rad/s)^2 per s). */
    private final double biasWalk2;
    /** Variance growth of the wheel-speed scale (1 per s). */
    private final double scaleWalk2;

    ProcessNoise(FilterSettings settings) {
        this.wheelDensity = settings.wheelSpeedNoiseMps() * settings.wheelSpeedNoiseMps() / settings.wheelSpeedRateHz();
        this.gyroDensity = settings.gyroNoiseRadPerS() * settings.gyroNoiseRadPerS() / settings.gyroRateHz();
        double rwBias = settings.gyroBiasRandomWalkRadPerSPerSqrtS();
        this.biasWalk2 = rwBias * rwBias;
        double rwScale = settings.speedScaleRandomWalkPerSqrtS();
        this.scaleWalk2 = rwScale * rwScale;
    }

    /**
     * P += Q for one step.
     *
     * @param p               P, row-major SIZE x SIZE (modified)
     * @param inputJac        the step's input Jacobian from {@link MotionModel#step} (not modified)
     * @param dtS             step length (s)
     * @param standstill      true when the vehicle stands: the inputs then move nothing
     * @param gnssDecay       exp(-dt / tau) of the GNSS error states
     * @param correlatedVarM2 steady-state variance of the GNSS error process (m^2)
     */
    void add(double[] p, double[] inputJac, double dtS, boolean standstill, double gnssDecay,
             double correlatedVarM2) {
        // A white input of density q held over dt has variance q / dt, so Q += G G' q / dt (G already
        // carries the factor dt).
        if (!standstill) {
            addOuter(p, inputJac, 0, wheelDensity / dtS);
            addOuter(p, inputJac, 3, gyroDensity / dtS);
        }
        p[GYRO_BIAS * SIZE + GYRO_BIAS] += biasWalk2 * dtS;
        p[SPEED_SCALE * SIZE + SPEED_SCALE] += scaleWalk2 * dtS;
        // Gauss-Markov driving noise keeps the steady-state variance: sigma^2 (1 - exp(-2 dt / tau))
        // (Brown and Hwang, 4th ed., sec. 4.2).
        double qGm = correlatedVarM2 * (1.0 - gnssDecay * gnssDecay);
        p[GNSS_ERR_EAST * SIZE + GNSS_ERR_EAST] += qGm;
        p[GNSS_ERR_NORTH * SIZE + GNSS_ERR_NORTH] += qGm;
    }

    /** Adds v v' * scale to the (east, north, yaw) block of P, v = three entries of g from offset. */
    private static void addOuter(double[] p, double[] g, int offset, double scale) {
        for (int i = 0; i < 3; i++) {
            double gi = g[offset + i] * scale;
            if (gi == 0.0) {
                continue;
            }
            for (int j = 0; j < 3; j++) {
                p[i * SIZE + j] += gi * g[offset + j];
            }
        }
    }
}
