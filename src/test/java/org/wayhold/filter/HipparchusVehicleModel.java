package org.wayhold.filter;

import org.hipparchus.filtering.kalman.Measurement;
import org.hipparchus.filtering.kalman.ProcessEstimate;
import org.hipparchus.filtering.kalman.extended.NonLinearEvolution;
import org.hipparchus.filtering.kalman.extended.NonLinearProcess;
import org.hipparchus.linear.Array2DRowRealMatrix;
import org.hipparchus.linear.ArrayRealVector;
import org.hipparchus.linear.MatrixUtils;
import org.hipparchus.linear.RealMatrix;
import org.hipparchus.linear.RealVector;
import org.wayhold.settings.FilterSettings;

/**
 * wayhold's vehicle model written independently against Hipparchus 4.0.2's filtering interfaces, so
 * that the same model run through Hipparchus's {@code ExtendedKalmanFilter} (Joseph-form update,
 * Cholesky-solved gain) can check wayhold's filter. Used by {@code NonlinearModelVsHipparchusTest}
 * and by the benchmark {@code FilterStepBenchmark}.
 *
 * <p>The model is derived on its own rather than copied: the exact constant-turn step is written in
 * chord form (the displacement over an arc of angle theta is the chord v dt sinc(theta/2) along
 * yaw + theta/2, a standard identity of circular motion), where wayhold writes it with
 * sin(theta)/theta and (1 - cos(theta))/theta; the Jacobians are differentiated from that form. The
 * noise follows the formulas the filter documents: a white input of per-reading sigma at rate f has
 * the density sigma^2 / f, so a step of dt adds G G' sigma^2 / (f dt) with G the input sensitivity over
 * the step; the bias and scale random walks add w^2 dt; the Gauss-Markov GNSS error (Brown and Hwang,
 * 4th ed., sec. 4.2) adds sigma_c^2 (1 - exp(-2 dt / tau)), with sigma_c^2 the correlated share of the
 * last fix's variance.
 *
 * <p>State layout {@link StateIndex} (m, m, rad, rad/s, unitless, m, m); positions in the session's
 * ENU frame, yaw counter-clockwise from east. The antenna sits {@code leverFwdM} forward and
 * {@code leverLeftM} left of the reference point.
 */
public final class HipparchusVehicleModel {

    private static final int N = StateIndex.SIZE;
    private static final int E = StateIndex.EAST;
    private static final int NO = StateIndex.NORTH;
    private static final int Y = StateIndex.YAW;
    private static final int B = StateIndex.GYRO_BIAS;
    private static final int S = StateIndex.SPEED_SCALE;
    private static final int GE = StateIndex.GNSS_ERR_EAST;
    private static final int GN = StateIndex.GNSS_ERR_NORTH;

    private final double leverFwdM;
    private final double leverLeftM;
    private final double correlatedShare;
    /** Wheel-speed noise density (m^2/s^2 per Hz). */
    private final double densWheel;
    /** Gyro noise density (rad^2/s^2 per Hz). */
    private final double densGyro;
    private final double walkBiasRadPerSPerSqrtS;
    private final double walkScalePerSqrtS;
    private final double tauS;

    public HipparchusVehicleModel(FilterSettings fs, double leverFwdM, double leverLeftM) {
        this.leverFwdM = leverFwdM;
        this.leverLeftM = leverLeftM;
        this.correlatedShare = fs.gnssCorrelatedShare();
        this.densWheel = fs.wheelSpeedNoiseMps() * fs.wheelSpeedNoiseMps() / fs.wheelSpeedRateHz();
        this.densGyro = fs.gyroNoiseRadPerS() * fs.gyroNoiseRadPerS() / fs.gyroRateHz();
        this.walkBiasRadPerSPerSqrtS = fs.gyroBiasRandomWalkRadPerSPerSqrtS();
        this.walkScalePerSqrtS = fs.speedScaleRandomWalkPerSqrtS();
        this.tauS = fs.gnssCorrelationTimeS();
    }

    /** The transition F = df/dx and the process noise Q (N x N) of one step. */
    public record Step(RealMatrix f, RealMatrix q) {
    }

    /**
     * One step of dt (s) with the given wheel speed (m/s) and yaw rate (rad/s) held over it.
     *
     * @param x the state before the step; modified in place to the state after it
     * @param corrVarM2 variance of the correlated GNSS error (m^2) that the Gauss-Markov noise restores
     */
    public Step step(double[] x, double dt, double wheelMps, double rateRadPerS, double corrVarM2) {
        double theta = (rateRadPerS - x[B]) * dt;
        double v = x[S] * wheelMps;
        double half = 0.5 * theta;
        double sc = sinc(half);
        double u = x[Y] + half;
        double cu = Math.cos(u);
        double su = Math.sin(u);
        double de = v * dt * sc * cu;
        double dn = v * dt * sc * su;
        // d(sinc(theta/2))/d(theta) = sinc'(theta/2) / 2
        double scPrime = 0.5 * sincPrime(half);
        double deDTheta = v * dt * (scPrime * cu - 0.5 * sc * su);
        double dnDTheta = v * dt * (scPrime * su + 0.5 * sc * cu);
        double decay = Math.exp(-dt / tauS);

        RealMatrix f = MatrixUtils.createRealIdentityMatrix(N);
        f.setEntry(E, Y, -dn);
        f.setEntry(NO, Y, de);
        f.setEntry(E, S, wheelMps * dt * sc * cu);
        f.setEntry(NO, S, wheelMps * dt * sc * su);
        // theta = (rate - bias) dt: d/d(bias) = -dt d/d(theta)
        f.setEntry(E, B, -dt * deDTheta);
        f.setEntry(NO, B, -dt * dnDTheta);
        f.setEntry(Y, B, -dt);
        f.setEntry(GE, GE, decay);
        f.setEntry(GN, GN, decay);

        // Q = G_wheel G_wheel' q_wheel / dt + G_rate G_rate' q_gyro / dt + random walks + Gauss-Markov,
        // with the input sensitivities G over the step in rows (east, north, yaw).
        double[] gWheel = {x[S] * dt * sc * cu, x[S] * dt * sc * su, 0.0};
        double[] gRate = {dt * deDTheta, dt * dnDTheta, dt};
        RealMatrix q = new Array2DRowRealMatrix(N, N);
        for (int i = 0; i < 3; i++) {
            for (int j = 0; j < 3; j++) {
                q.setEntry(i, j, gWheel[i] * gWheel[j] * densWheel / dt + gRate[i] * gRate[j] * densGyro / dt);
            }
        }
        q.setEntry(B, B, walkBiasRadPerSPerSqrtS * walkBiasRadPerSPerSqrtS * dt);
        q.setEntry(S, S, walkScalePerSqrtS * walkScalePerSqrtS * dt);
        q.setEntry(GE, GE, corrVarM2 * (1.0 - decay * decay));
        q.setEntry(GN, GN, corrVarM2 * (1.0 - decay * decay));

        x[E] += de;
        x[NO] += dn;
        x[Y] += theta;
        x[GE] *= decay;
        x[GN] *= decay;
        return new Step(f, q);
    }

    /** H = dh/dx (2 x N) of h(x) = position + R(yaw) (forward, left) + GNSS error, at x. */
    public RealMatrix positionJacobian(double[] x) {
        double c = Math.cos(x[Y]);
        double s = Math.sin(x[Y]);
        RealMatrix h = new Array2DRowRealMatrix(2, N);
        h.setEntry(0, E, 1.0);
        h.setEntry(0, Y, -leverFwdM * s - leverLeftM * c);
        h.setEntry(0, GE, 1.0);
        h.setEntry(1, NO, 1.0);
        h.setEntry(1, Y, leverFwdM * c - leverLeftM * s);
        h.setEntry(1, GN, 1.0);
        return h;
    }

    /** The innovation z - h(x) (m, east and north) of a fix at the predicted state x. */
    public RealVector innovation(Position fix, RealVector x) {
        double yaw = x.getEntry(Y);
        double c = Math.cos(yaw);
        double s = Math.sin(yaw);
        double ae = x.getEntry(E) + leverFwdM * c - leverLeftM * s + x.getEntry(GE);
        double an = x.getEntry(NO) + leverFwdM * s + leverLeftM * c + x.getEntry(GN);
        return new ArrayRealVector(new double[] {fix.getValue().getEntry(0) - ae, fix.getValue().getEntry(1) - an}, false);
    }

    /** The correlated share (m^2) of a fix's horizontal variance, which the GNSS error states carry. */
    public double correlatedVarianceM2(double sigmaM) {
        return correlatedShare * sigmaM * sigmaM;
    }

    /** A fix of the antenna at (eastM, northM) whose measurement noise is the white share of sigmaM^2. */
    public Position position(double t, double eastM, double northM, double sigmaM) {
        double white = (1.0 - correlatedShare) * sigmaM * sigmaM;
        return new Position(t, new ArrayRealVector(new double[] {eastM, northM}, false),
                MatrixUtils.createRealDiagonalMatrix(new double[] {white, white}), sigmaM);
    }

    /**
     * The model from the previous estimate to each fix in a single step with the given wheel speed
     * (m/s) and yaw rate (rad/s) held, and the correlated GNSS variance (m^2) fixed.
     */
    public NonLinearProcess<Position> heldInputs(double wheelMps, double rateRadPerS, double corrVarM2) {
        return new NonLinearProcess<>() {
            @Override
            public NonLinearEvolution getEvolution(double previousTime, RealVector previousState, Position fix) {
                double[] x = previousState.toArray();
                Step step = step(x, fix.getTime() - previousTime, wheelMps, rateRadPerS, corrVarM2);
                return new NonLinearEvolution(fix.getTime(), new ArrayRealVector(x, false), step.f(), step.q(),
                        positionJacobian(x));
            }

            @Override
            public RealVector getInnovation(Position fix, NonLinearEvolution evolution, RealMatrix innovationCovariance) {
                return innovation(fix, evolution.getCurrentState());
            }
        };
    }

    /**
     * The largest relative state and covariance differences found by {@link #mismatch}.
     *
     * @param where the worst state and covariance entries with both values, for failure messages
     */
    public record Mismatch(double stateRel, double covRel, String where) {
    }

    /**
     * The largest differences between wayhold's state x and covariance p (N x N, row-major) and a
     * Hipparchus estimate: states relative to max(1 m or 1 rad, |x|), yaw compared modulo 2 pi;
     * covariances relative to sqrt(P_ii P_jj), i.e. on the correlation scale, so tiny bias variances are
     * held to the same relative standard as metre-sized position variances. A NaN anywhere is kept, so
     * it fails any tolerance.
     */
    public static Mismatch mismatch(double[] x, double[] p, ProcessEstimate est) {
        double[] xh = est.getState().toArray();
        double[][] ph = est.getCovariance().getData();
        double stateRel = 0.0;
        String stateWhere = "";
        double covRel = 0.0;
        String covWhere = "";
        for (int i = 0; i < N; i++) {
            double d = i == Y ? Math.IEEEremainder(x[i] - xh[i], 2 * Math.PI) : x[i] - xh[i];
            double rel = Math.abs(d) / Math.max(1.0, Math.abs(i == Y ? 0.0 : xh[i]));
            if (!(rel <= stateRel)) {
                stateRel = rel;
                stateWhere = "state " + i + ": wayhold " + x[i] + ", Hipparchus " + xh[i];
            }
            for (int j = 0; j < N; j++) {
                double relP = Math.abs(p[i * N + j] - ph[i][j]) / Math.sqrt(ph[i][i] * ph[j][j]);
                if (!(relP <= covRel)) {
                    covRel = relP;
                    covWhere = "P[" + i + "][" + j + "]: wayhold " + p[i * N + j] + ", Hipparchus " + ph[i][j];
                }
            }
        }
        return new Mismatch(stateRel, covRel, stateWhere + "; " + covWhere);
    }

    /** An N x N matrix from its row-major entries. */
    public static RealMatrix square(double[] rowMajor) {
        double[][] m = new double[N][N];
        for (int i = 0; i < N; i++) {
            System.arraycopy(rowMajor, i * N, m[i], 0, N);
        }
        return new Array2DRowRealMatrix(m, false);
    }

    /** sin(x) / x, with its Taylor series near 0 (truncation below 1e-21 for |x| < 1e-2). */
    public static double sinc(double x) {
        if (Math.abs(x) < 1e-2) {
            double x2 = x * x;
            return 1.0 - x2 / 6.0 + x2 * x2 / 120.0 - x2 * x2 * x2 / 5040.0;
        }
        return Math.sin(x) / x;
    }

    /** d/dx of sin(x) / x, with its Taylor series near 0. */
    public static double sincPrime(double x) {
        if (Math.abs(x) < 1e-2) {
            double x2 = x * x;
            return x * (-1.0 / 3.0 + x2 / 30.0 - x2 * x2 / 840.0);
        }
        return (x * Math.cos(x) - Math.sin(x)) / (x * x);
    }

    /** A position fix of the antenna (m, ENU) with its white-noise covariance (m^2) and its sigma (m). */
    public record Position(double time, RealVector value, RealMatrix covariance, double sigmaM) implements Measurement {
        @Override
        public double getTime() {
            return time;
        }

        @Override
        public RealVector getValue() {
            return value;
        }

        @Override
        public RealMatrix getCovariance() {
            return covariance;
        }
    }
}
