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
 * sin(theta)/theta and (1 - cos(theta))/theta; the Jacobians are differentiated from that form, with
 * theta = g (r - b) dt for gyro scale g, reading r and bias b. The noise follows the formulas the
 * filter documents:
 * <ul>
 *   <li>wheel speed: per-reading variance times the observed reading interval, as a density; a step of
 *       dt adds G G' density / dt with G the input sensitivity over the step;</li>
 *   <li>yaw rate: (per-reading variance + (half the change of the last two readings)^2) times the
 *       observed interval, plus (proportional share x latest reading)^2 x 1 s of correlation;</li>
 *   <li>sideslip: (sideslip x |v omega| x v)^2 x 1 s x dt across the direction of travel after the step;</li>
 *   <li>random walks of bias, speed scale and gyro scale: w^2 dt; the Gauss-Markov GNSS error (Brown and
 *       Hwang, 4th ed., sec. 4.2): sigma_c^2 (1 - exp(-2 dt / tau)), with sigma_c^2 the correlated share
 *       of the last fix's variance.</li>
 * </ul>
 * A fix measures the antenna where it was the latency L earlier: position + R(yaw) (forward, left)
 * - v L (cos yaw, sin yaw) + GNSS error, v = speed scale x the latest wheel reading.
 *
 * <p>State layout {@link StateIndex}; positions in the session's ENU frame, yaw counter-clockwise from
 * east. Not modelled (the callers keep them inert): the tyre-growth floor on the speed scale's variance
 * (set {@code rolling_radius_growth_at_30_mps} to 0) and consider states (give the lever arm zero
 * variance, or keep the turn rate above the threshold that makes it observable).
 */
public final class HipparchusVehicleModel {

    private static final int N = StateIndex.SIZE;
    private static final int E = StateIndex.EAST;
    private static final int NO = StateIndex.NORTH;
    private static final int Y = StateIndex.YAW;
    private static final int B = StateIndex.GYRO_BIAS;
    private static final int S = StateIndex.SPEED_SCALE;
    private static final int G = StateIndex.GYRO_SCALE;
    private static final int GE = StateIndex.GNSS_ERR_EAST;
    private static final int GN = StateIndex.GNSS_ERR_NORTH;
    private static final int LF = StateIndex.LEVER_FORWARD;
    private static final int LL = StateIndex.LEVER_LEFT;
    private static final int LAT = StateIndex.GNSS_LATENCY;

    private final double correlatedShare;
    private final double wheelVar;
    private final double gyroVar;
    private final double proportional;
    private final double sideslip;
    private final double walkBiasRadPerSPerSqrtS;
    private final double walkScalePerSqrtS;
    private final double walkGyroScalePerSqrtS;
    private final double tauS;

    public HipparchusVehicleModel(FilterSettings fs) {
        this.correlatedShare = fs.gnssCorrelatedShare();
        this.wheelVar = fs.wheelSpeedNoiseMps() * fs.wheelSpeedNoiseMps();
        this.gyroVar = fs.gyroNoiseRadPerS() * fs.gyroNoiseRadPerS();
        this.proportional = fs.gyroRateProportionalNoise();
        this.sideslip = fs.sideslipRadPerMps2();
        this.walkBiasRadPerSPerSqrtS = fs.gyroBiasRandomWalkRadPerSPerSqrtS();
        this.walkScalePerSqrtS = fs.speedScaleRandomWalkPerSqrtS();
        this.walkGyroScalePerSqrtS = fs.gyroScaleRandomWalkPerSqrtS();
        this.tauS = fs.gnssCorrelationTimeS();
    }

    /** The same settings without the tyre-growth floor on the speed scale's variance, which this model leaves out. */
    public static FilterSettings modelledSettings(FilterSettings d) {
        return new FilterSettings(d.wheelSpeedNoiseMps(), d.wheelSpeedRateHz(), d.gyroNoiseRadPerS(), d.gyroRateHz(),
                d.gyroBiasRandomWalkRadPerSPerSqrtS(), d.speedScaleRandomWalkPerSqrtS(), d.initialYawSigmaRad(),
                d.initialGyroBiasSigmaRadPerS(), d.initialSpeedScaleSigma(), d.gnssFloorM(), d.gnssRangeErrorM(),
                d.gnssDefaultSigmaM(), d.gnssFixScale(), d.gnssCorrelatedShare(), d.gnssCorrelationTimeS(),
                d.gnssVelocityMinSpeedMps(), d.gnssSpeedSigmaMps(), d.gnssCourseSigmaDeg(), d.standstillAfterS(),
                d.headingInitMinDistanceM(), d.initialGyroScaleSigma(), d.gyroScaleRandomWalkPerSqrtS(),
                d.gyroRateProportionalNoise(), d.sideslipRadPerMps2(), d.wheelSpeedZeroBelowMps(), d.minTurnRadiusM(),
                d.gnssHdopFloorM(), 0.0);
    }

    /** The transition F = df/dx and the process noise Q (N x N) of one step. */
    public record Step(RealMatrix f, RealMatrix q) {
    }

    /**
     * What one step is driven by.
     *
     * @param wheelMps          wheel speed over the step (m/s)
     * @param rateRadPerS       yaw-rate reading over the step (rad/s)
     * @param latestRateRadPerS the latest yaw-rate reading (rad/s)
     * @param previousRateRadPerS the one before it (rad/s)
     * @param wheelIntervalS    interval between the last two wheel readings (s)
     * @param rateIntervalS     interval between the last two yaw-rate readings (s)
     * @param corrVarM2         variance of the correlated GNSS error (m^2) the Gauss-Markov noise restores
     */
    public record Inputs(double wheelMps, double rateRadPerS, double latestRateRadPerS, double previousRateRadPerS,
                         double wheelIntervalS, double rateIntervalS, double corrVarM2) {
    }

    /**
     * One step of dt (s).
     *
     * @param x the state before the step; modified in place to the state after it
     */
    public Step step(double[] x, double dt, Inputs in) {
        double wheelMps = in.wheelMps();
        double unbiased = in.rateRadPerS() - x[B];
        double omega = x[G] * unbiased;
        double theta = omega * dt;
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
        // d(theta)/d(bias) = -g dt, d(theta)/d(g) = (r - b) dt
        f.setEntry(E, B, -x[G] * dt * deDTheta);
        f.setEntry(NO, B, -x[G] * dt * dnDTheta);
        f.setEntry(Y, B, -x[G] * dt);
        f.setEntry(E, G, unbiased * dt * deDTheta);
        f.setEntry(NO, G, unbiased * dt * dnDTheta);
        f.setEntry(Y, G, unbiased * dt);
        f.setEntry(GE, GE, decay);
        f.setEntry(GN, GN, decay);

        x[E] += de;
        x[NO] += dn;
        x[Y] += theta;
        x[GE] *= decay;
        x[GN] *= decay;

        // Input noise G G' density / dt, with the sensitivities G over the step in rows (east, north, yaw).
        double wheelDensity = wheelVar * in.wheelIntervalS();
        double change = 0.5 * (in.latestRateRadPerS() - in.previousRateRadPerS());
        double rateDensity = (gyroVar + change * change) * in.rateIntervalS()
                + Math.pow(proportional * in.latestRateRadPerS(), 2) * 1.0;
        double[] gWheel = {x[S] * dt * sc * cu, x[S] * dt * sc * su, 0.0};
        double[] gRate = {x[G] * dt * deDTheta, x[G] * dt * dnDTheta, x[G] * dt};
        RealMatrix q = new Array2DRowRealMatrix(N, N);
        for (int i = 0; i < 3; i++) {
            for (int j = 0; j < 3; j++) {
                q.setEntry(i, j, gWheel[i] * gWheel[j] * wheelDensity / dt + gRate[i] * gRate[j] * rateDensity / dt);
            }
        }
        double lateral = sideslip * Math.abs(v * omega) * v;
        double qSlip = lateral * lateral * 1.0 * dt;
        double[] normal = {-Math.sin(x[Y]), Math.cos(x[Y])};
        for (int i = 0; i < 2; i++) {
            for (int j = 0; j < 2; j++) {
                q.addToEntry(i, j, qSlip * normal[i] * normal[j]);
            }
        }
        q.setEntry(B, B, walkBiasRadPerSPerSqrtS * walkBiasRadPerSPerSqrtS * dt);
        q.setEntry(S, S, walkScalePerSqrtS * walkScalePerSqrtS * dt);
        q.setEntry(G, G, walkGyroScalePerSqrtS * walkGyroScalePerSqrtS * dt);
        q.setEntry(GE, GE, in.corrVarM2() * (1.0 - decay * decay));
        q.setEntry(GN, GN, in.corrVarM2() * (1.0 - decay * decay));
        return new Step(f, q);
    }

    /** The antenna position (east, north) a fix measures at state x with the latest wheel reading. */
    private static double[] antenna(double[] x, double wheelMps) {
        double c = Math.cos(x[Y]);
        double s = Math.sin(x[Y]);
        double back = x[S] * wheelMps * x[LAT];
        return new double[] {
            x[E] + x[LF] * c - x[LL] * s - back * c + x[GE],
            x[NO] + x[LF] * s + x[LL] * c - back * s + x[GN]};
    }

    /** H = dh/dx (2 x N) of {@link #antenna} at x. */
    public RealMatrix positionJacobian(double[] x, double wheelMps) {
        double c = Math.cos(x[Y]);
        double s = Math.sin(x[Y]);
        double v = x[S] * wheelMps;
        double back = v * x[LAT];
        RealMatrix h = new Array2DRowRealMatrix(2, N);
        h.setEntry(0, E, 1.0);
        h.setEntry(0, Y, -x[LF] * s - x[LL] * c + back * s);
        h.setEntry(0, S, -wheelMps * x[LAT] * c);
        h.setEntry(0, GE, 1.0);
        h.setEntry(0, LF, c);
        h.setEntry(0, LL, -s);
        h.setEntry(0, LAT, -v * c);
        h.setEntry(1, NO, 1.0);
        h.setEntry(1, Y, x[LF] * c - x[LL] * s - back * c);
        h.setEntry(1, S, -wheelMps * x[LAT] * s);
        h.setEntry(1, GN, 1.0);
        h.setEntry(1, LF, s);
        h.setEntry(1, LL, c);
        h.setEntry(1, LAT, -v * s);
        return h;
    }

    /** The innovation z - h(x) (m, east and north) of a fix at the predicted state x. */
    public RealVector innovation(Position fix, RealVector x, double wheelMps) {
        double[] ant = antenna(x.toArray(), wheelMps);
        return new ArrayRealVector(new double[] {fix.getValue().getEntry(0) - ant[0],
            fix.getValue().getEntry(1) - ant[1]}, false);
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
     * The model from the previous estimate to each fix in a single step with the given inputs held
     * (the latest reading also the one before it).
     */
    public NonLinearProcess<Position> heldInputs(Inputs in) {
        return new NonLinearProcess<>() {
            @Override
            public NonLinearEvolution getEvolution(double previousTime, RealVector previousState, Position fix) {
                double[] x = previousState.toArray();
                Step step = step(x, fix.getTime() - previousTime, in);
                return new NonLinearEvolution(fix.getTime(), new ArrayRealVector(x, false), step.f(), step.q(),
                        positionJacobian(x, in.wheelMps()));
            }

            @Override
            public RealVector getInnovation(Position fix, NonLinearEvolution evolution, RealMatrix innovationCovariance) {
                return innovation(fix, evolution.getCurrentState(), in.wheelMps());
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
