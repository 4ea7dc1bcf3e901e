package org.wayhold.bench;

import java.util.SplittableRandom;
import java.util.concurrent.TimeUnit;
import org.hipparchus.filtering.kalman.ProcessEstimate;
import org.hipparchus.filtering.kalman.extended.ExtendedKalmanFilter;
import org.hipparchus.filtering.kalman.extended.NonLinearEvolution;
import org.hipparchus.filtering.kalman.extended.NonLinearProcess;
import org.hipparchus.linear.Array2DRowRealMatrix;
import org.hipparchus.linear.ArrayRealVector;
import org.hipparchus.linear.CholeskyDecomposer;
import org.hipparchus.linear.MatrixDecomposer;
import org.hipparchus.linear.MatrixUtils;
import org.hipparchus.linear.RealMatrix;
import org.hipparchus.linear.RealVector;
import org.openjdk.jmh.annotations.Benchmark;
import org.openjdk.jmh.annotations.BenchmarkMode;
import org.openjdk.jmh.annotations.Fork;
import org.openjdk.jmh.annotations.Level;
import org.openjdk.jmh.annotations.Measurement;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.annotations.OutputTimeUnit;
import org.openjdk.jmh.annotations.Scope;
import org.openjdk.jmh.annotations.Setup;
import org.openjdk.jmh.annotations.State;
import org.openjdk.jmh.annotations.Warmup;
import org.openjdk.jmh.infra.Blackhole;
import org.wayhold.filter.GnssOutcome;
import org.wayhold.filter.NavigationFilter;
import org.wayhold.filter.StateIndex;
import org.wayhold.sample.GnssFix;
import org.wayhold.settings.FilterSettings;
import org.wayhold.settings.GatingSettings;
import org.wayhold.settings.OutageSettings;
import org.wayhold.settings.VehicleProfile;

/**
 * wayhold's filter step against the same vehicle model run through Hipparchus 4.0.2's general-purpose
 * {@code ExtendedKalmanFilter}, on the same inputs in the same run.
 *
 * <p>Both start from the state and covariance wayhold reached after 10 s of aided driving on a curve
 * (yaw rate at 100 Hz, wheel speed, fixes at 5 Hz, GNSS antenna 1.4 m forward and 0.35 m right of the
 * reference point). The timed pair is what one GNSS epoch costs on top of the 100 Hz stream: one 10 ms
 * predict and one position update. Hipparchus does exactly that in one {@code estimationStep}: its
 * process model returns the 10 ms transition F, the process noise Q and the measurement Jacobian H,
 * and the library predicts, then corrects in Joseph form with a Cholesky-solved gain.
 *
 * <p>The Hipparchus model is written here on its own, not by calling wayhold's code: the constant-turn
 * step in chord form (displacement v dt sinc(theta/2) along yaw + theta/2) where wayhold uses
 * sin(theta)/theta and (1 - cos(theta))/theta, and the noise from the formulas the filter documents
 * (see {@code NonlinearModelVsHipparchusTest}, which checks the same model over a 210 s drive).
 * {@link #setUp()} runs both once and throws unless every state and covariance entry agrees to 1e-9
 * (states relative to max(1, |x|), covariances relative to sqrt(P_ii P_jj)), so a fast wrong answer
 * cannot be timed.
 *
 * <p>Each pair starts from the same checkpoint: wayhold restores it ({@link #restoreOnly} times that
 * copy), Hipparchus gets a new filter over the same immutable estimate. With {@code -prof gc} JMH
 * reports bytes allocated per operation: wayhold's steps must allocate nothing.
 */
@State(Scope.Thread)
@BenchmarkMode(Mode.AverageTime)
@OutputTimeUnit(TimeUnit.NANOSECONDS)
@Warmup(iterations = 3, time = 1)
@Measurement(iterations = 4, time = 1)
@Fork(1)
public class FilterStepBenchmark {

    private static final int N = StateIndex.SIZE;
    private static final double TOL = 1e-9;
    private static final double LEVER_FWD_M = 1.4;
    private static final double LEVER_LEFT_M = -0.35;
    private static final double SPEED_MPS = 15.0;
    private static final double RATE_RAD_PER_S = 0.05;
    private static final double SIGMA_H_M = 1.0;
    /** Start of the timed step: after 1000 ticks of 10 ms. */
    private static final double T0_S = 1000 / 100.0;
    /** End of the timed step, and time of its fix. */
    private static final double T1_S = 1001 / 100.0;

    private final FilterSettings settings = FilterSettings.defaults();
    /** Every fix is used: the timed update is the Kalman update, not a held or gated fix. */
    private final GatingSettings gating = new GatingSettings(1.0 - 1e-12, 1);
    private final VehicleProfile profile = new VehicleProfile(LEVER_FWD_M, LEVER_LEFT_M, 0.0);

    private NavigationFilter start;
    private NavigationFilter predicted;
    private NavigationFilter work;
    private NavigationFilter running;
    private double runningT;
    private GnssFix fix;
    private double fixEastM;
    private double fixNorthM;

    private MatrixDecomposer decomposer;
    private ProcessEstimate startEstimate;
    private PositionFix hipparchusFix;
    private OneStepProcess process;

    @Setup(Level.Trial)
    public void setUp() {
        start = new NavigationFilter(settings, gating, OutageSettings.defaults(), profile);
        double[] x0 = {0.8, -0.6, 0.3 + Math.toRadians(1.0), 0.0, 1.0, 0.0, 0.0};
        double corr0 = settings.gnssCorrelatedShare() * settings.gnssDefaultSigmaM() * settings.gnssDefaultSigmaM();
        double[] p0 = new double[N * N];
        double[] var0 = {2.0, 2.0, Math.pow(Math.toRadians(2.0), 2), Math.pow(settings.initialGyroBiasSigmaRadPerS(), 2),
            Math.pow(settings.initialSpeedScaleSigma(), 2), corr0, corr0};
        for (int i = 0; i < N; i++) {
            p0[i * N + i] = var0[i];
        }
        start.initialize(0.0, x0, p0);
        // 10 s on a circle (true yaw starts at 0.3 rad), fixes every 200 ms with seeded 0.5 m noise.
        SplittableRandom rnd = new SplittableRandom(8L);
        for (int tick = 1; tick <= 1000; tick++) {
            double t = tick / 100.0;
            start.predictTo(t);
            start.setWheelSpeed(SPEED_MPS);
            start.setYawRate(RATE_RAD_PER_S);
            if (tick % 20 == 0) {
                double[] ant = antenna(t);
                GnssOutcome.Kind kind = start.correct(GnssFix.position(t, 0.0, 0.0, SIGMA_H_M),
                        ant[0] + 0.5 * gaussian(rnd), ant[1] + 0.5 * gaussian(rnd), Double.NaN);
                require(kind == GnssOutcome.Kind.ACCEPTED, "warm-up fix at " + t + " s was " + kind);
            }
        }
        double[] ant = antenna(T1_S);
        fix = GnssFix.position(T1_S, 0.0, 0.0, SIGMA_H_M);
        fixEastM = ant[0] + 0.3;
        fixNorthM = ant[1] - 0.2;

        work = start.copy();
        predicted = start.copy();
        predicted.predictTo(T1_S);
        running = start.copy();
        runningT = T0_S;

        decomposer = new CholeskyDecomposer(1e-12, 1e-14);
        startEstimate = new ProcessEstimate(T0_S, new ArrayRealVector(start.state()), square(start.covariance()));
        double sigma = start.horizontalSigmaM(fix);
        double white = (1.0 - settings.gnssCorrelatedShare()) * sigma * sigma;
        hipparchusFix = new PositionFix(T1_S, new ArrayRealVector(new double[] {fixEastM, fixNorthM}),
                MatrixUtils.createRealDiagonalMatrix(new double[] {white, white}));
        process = new OneStepProcess(settings, SPEED_MPS, RATE_RAD_PER_S, settings.gnssCorrelatedShare() * sigma * sigma);

        checkBothAgree();
    }

    /** Runs the pair once on each side and throws unless the results agree to {@link #TOL}. */
    private void checkBothAgree() {
        GnssOutcome.Kind kind = wayholdPairOnce();
        require(kind == GnssOutcome.Kind.ACCEPTED, "the timed fix must be applied, was " + kind);
        ProcessEstimate est = hipparchusPairOnce();
        double[] x = work.state();
        double[] p = work.covariance();
        double[] xh = est.getState().toArray();
        double[][] ph = est.getCovariance().getData();
        for (int i = 0; i < N; i++) {
            double d = i == StateIndex.YAW ? Math.IEEEremainder(x[i] - xh[i], 2 * Math.PI) : x[i] - xh[i];
            double rel = Math.abs(d) / Math.max(1.0, Math.abs(i == StateIndex.YAW ? 0.0 : xh[i]));
            require(rel < TOL, "state " + i + ": wayhold " + x[i] + ", Hipparchus " + xh[i]);
            for (int j = 0; j < N; j++) {
                double relP = Math.abs(p[i * N + j] - ph[i][j]) / Math.sqrt(ph[i][i] * ph[j][j]);
                require(relP < TOL, "P[" + i + "][" + j + "]: wayhold " + p[i * N + j] + ", Hipparchus " + ph[i][j]);
            }
        }
        // The update must have moved the state: a no-op on both sides would also agree.
        require(Math.abs(xh[StateIndex.EAST] - predicted.state()[StateIndex.EAST]) > 1e-6,
                "the fix did not move the estimate");
    }

    private GnssOutcome.Kind wayholdPairOnce() {
        work.restore(start);
        work.predictTo(T1_S);
        return work.correct(fix, fixEastM, fixNorthM, Double.NaN);
    }

    private ProcessEstimate hipparchusPairOnce() {
        ExtendedKalmanFilter<PositionFix> ekf = new ExtendedKalmanFilter<>(decomposer, process, startEstimate);
        return ekf.estimationStep(hipparchusFix);
    }

    /** One 10 ms predict and one GNSS position update of wayhold's filter, from the checkpoint. */
    @Benchmark
    public void wayholdPredictAndGnss(Blackhole bh) {
        bh.consume(wayholdPairOnce());
        bh.consume(work.lastNis());
    }

    /** The same pair, the same model, through Hipparchus's ExtendedKalmanFilter. */
    @Benchmark
    public void hipparchusPredictAndGnss(Blackhole bh) {
        bh.consume(hipparchusPairOnce());
    }

    /** One GNSS position update from the predicted checkpoint (includes a restore). */
    @Benchmark
    public void wayholdGnssUpdate(Blackhole bh) {
        work.restore(predicted);
        bh.consume(work.correct(fix, fixEastM, fixNorthM, Double.NaN));
        bh.consume(work.lastNis());
    }

    /** One 100 Hz step of a filter that keeps driving: predict 10 ms, then hold the new yaw rate. */
    @Benchmark
    public void wayholdPredict100Hz(Blackhole bh) {
        runningT += 0.01;
        running.predictTo(runningT);
        running.setYawRate(RATE_RAD_PER_S);
        bh.consume(running.tRel());
    }

    /** The restore the update benchmarks include, to subtract it. */
    @Benchmark
    public void restoreOnly(Blackhole bh) {
        work.restore(start);
        bh.consume(work.tRel());
    }

    /** Antenna east and north (m) on the true circle at time t: speed 15 m/s, yaw rate 0.05 rad/s. */
    private static double[] antenna(double t) {
        double yaw0 = 0.3;
        double radius = SPEED_MPS / RATE_RAD_PER_S;
        double yaw = yaw0 + RATE_RAD_PER_S * t;
        double e = radius * (Math.sin(yaw) - Math.sin(yaw0));
        double n = radius * (Math.cos(yaw0) - Math.cos(yaw));
        double c = Math.cos(yaw);
        double s = Math.sin(yaw);
        return new double[] {e + LEVER_FWD_M * c - LEVER_LEFT_M * s, n + LEVER_FWD_M * s + LEVER_LEFT_M * c};
    }

    private static double gaussian(SplittableRandom rnd) {
        double u1 = 1.0 - rnd.nextDouble();
        double u2 = rnd.nextDouble();
        return Math.sqrt(-2.0 * Math.log(u1)) * Math.cos(2.0 * Math.PI * u2);
    }

    private static void require(boolean ok, String message) {
        if (!ok) {
            throw new IllegalStateException("benchmark self-check failed: " + message);
        }
    }

    private static RealMatrix square(double[] rowMajor) {
        double[][] m = new double[N][N];
        for (int i = 0; i < N; i++) {
            System.arraycopy(rowMajor, i * N, m[i], 0, N);
        }
        return new Array2DRowRealMatrix(m, false);
    }

    /** sin(x) / x, with its Taylor series near 0 (truncation below 1e-21 for |x| < 1e-2). */
    private static double sinc(double x) {
        if (Math.abs(x) < 1e-2) {
            double x2 = x * x;
            return 1.0 - x2 / 6.0 + x2 * x2 / 120.0 - x2 * x2 * x2 / 5040.0;
        }
        return Math.sin(x) / x;
    }

    /** d/dx of sin(x) / x, with its Taylor series near 0. */
    private static double sincPrime(double x) {
        if (Math.abs(x) < 1e-2) {
            double x2 = x * x;
            return x * (-1.0 / 3.0 + x2 / 30.0 - x2 * x2 / 840.0);
        }
        return (x * Math.cos(x) - Math.sin(x)) / (x * x);
    }

    /** A position fix of the antenna (m, ENU) with its white-noise covariance (m^2). */
    private record PositionFix(double time, RealVector value, RealMatrix covariance) implements org.hipparchus.filtering.kalman.Measurement {
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

    /**
     * The vehicle model over one step with held wheel speed and yaw rate, written for Hipparchus: the
     * predicted state, F = df/dx, Q, and H = dh/dx of the antenna position.
     */
    private static final class OneStepProcess implements NonLinearProcess<PositionFix> {
        private final double heldWheelMps;
        private final double heldRateRadPerS;
        private final double corrVarM2;
        private final double densWheel;
        private final double densGyro;
        private final double walkBias;
        private final double walkScale;
        private final double tauS;

        OneStepProcess(FilterSettings fs, double heldWheelMps, double heldRateRadPerS, double corrVarM2) {
            this.heldWheelMps = heldWheelMps;
            this.heldRateRadPerS = heldRateRadPerS;
            this.corrVarM2 = corrVarM2;
            this.densWheel = fs.wheelSpeedNoiseMps() * fs.wheelSpeedNoiseMps() / fs.wheelSpeedRateHz();
            this.densGyro = fs.gyroNoiseRadPerS() * fs.gyroNoiseRadPerS() / fs.gyroRateHz();
            this.walkBias = fs.gyroBiasRandomWalkRadPerSPerSqrtS();
            this.walkScale = fs.speedScaleRandomWalkPerSqrtS();
            this.tauS = fs.gnssCorrelationTimeS();
        }

        @Override
        public NonLinearEvolution getEvolution(double previousTime, RealVector previousState, PositionFix m) {
            double[] x = previousState.toArray();
            double dt = m.getTime() - previousTime;
            double theta = (heldRateRadPerS - x[StateIndex.GYRO_BIAS]) * dt;
            double v = x[StateIndex.SPEED_SCALE] * heldWheelMps;
            double half = 0.5 * theta;
            double sc = sinc(half);
            double u = x[StateIndex.YAW] + half;
            double cu = Math.cos(u);
            double su = Math.sin(u);
            double de = v * dt * sc * cu;
            double dn = v * dt * sc * su;
            double scPrime = 0.5 * sincPrime(half);
            double deDTheta = v * dt * (scPrime * cu - 0.5 * sc * su);
            double dnDTheta = v * dt * (scPrime * su + 0.5 * sc * cu);
            double decay = Math.exp(-dt / tauS);

            RealMatrix f = MatrixUtils.createRealIdentityMatrix(N);
            f.setEntry(StateIndex.EAST, StateIndex.YAW, -dn);
            f.setEntry(StateIndex.NORTH, StateIndex.YAW, de);
            f.setEntry(StateIndex.EAST, StateIndex.SPEED_SCALE, heldWheelMps * dt * sc * cu);
            f.setEntry(StateIndex.NORTH, StateIndex.SPEED_SCALE, heldWheelMps * dt * sc * su);
            f.setEntry(StateIndex.EAST, StateIndex.GYRO_BIAS, -dt * deDTheta);
            f.setEntry(StateIndex.NORTH, StateIndex.GYRO_BIAS, -dt * dnDTheta);
            f.setEntry(StateIndex.YAW, StateIndex.GYRO_BIAS, -dt);
            f.setEntry(StateIndex.GNSS_ERR_EAST, StateIndex.GNSS_ERR_EAST, decay);
            f.setEntry(StateIndex.GNSS_ERR_NORTH, StateIndex.GNSS_ERR_NORTH, decay);

            // Q = G_wheel G_wheel' q_wheel / dt + G_rate G_rate' q_gyro / dt + random walks + Gauss-Markov.
            double[] gWheel = {x[StateIndex.SPEED_SCALE] * dt * sc * cu, x[StateIndex.SPEED_SCALE] * dt * sc * su, 0.0};
            double[] gRate = {dt * deDTheta, dt * dnDTheta, dt};
            RealMatrix q = new Array2DRowRealMatrix(N, N);
            for (int i = 0; i < 3; i++) {
                for (int j = 0; j < 3; j++) {
                    q.setEntry(i, j, gWheel[i] * gWheel[j] * densWheel / dt + gRate[i] * gRate[j] * densGyro / dt);
                }
            }
            q.setEntry(StateIndex.GYRO_BIAS, StateIndex.GYRO_BIAS, walkBias * walkBias * dt);
            q.setEntry(StateIndex.SPEED_SCALE, StateIndex.SPEED_SCALE, walkScale * walkScale * dt);
            q.setEntry(StateIndex.GNSS_ERR_EAST, StateIndex.GNSS_ERR_EAST, corrVarM2 * (1.0 - decay * decay));
            q.setEntry(StateIndex.GNSS_ERR_NORTH, StateIndex.GNSS_ERR_NORTH, corrVarM2 * (1.0 - decay * decay));

            x[StateIndex.EAST] += de;
            x[StateIndex.NORTH] += dn;
            x[StateIndex.YAW] += theta;
            x[StateIndex.GNSS_ERR_EAST] *= decay;
            x[StateIndex.GNSS_ERR_NORTH] *= decay;

            // h(x) = position + R(yaw) (forward, left) + GNSS error, at the predicted state.
            double c = Math.cos(x[StateIndex.YAW]);
            double s = Math.sin(x[StateIndex.YAW]);
            RealMatrix h = new Array2DRowRealMatrix(2, N);
            h.setEntry(0, StateIndex.EAST, 1.0);
            h.setEntry(0, StateIndex.YAW, -LEVER_FWD_M * s - LEVER_LEFT_M * c);
            h.setEntry(0, StateIndex.GNSS_ERR_EAST, 1.0);
            h.setEntry(1, StateIndex.NORTH, 1.0);
            h.setEntry(1, StateIndex.YAW, LEVER_FWD_M * c - LEVER_LEFT_M * s);
            h.setEntry(1, StateIndex.GNSS_ERR_NORTH, 1.0);
            return new NonLinearEvolution(m.getTime(), new ArrayRealVector(x, false), f, q, h);
        }

        @Override
        public RealVector getInnovation(PositionFix m, NonLinearEvolution evolution, RealMatrix innovationCovariance) {
            RealVector x = evolution.getCurrentState();
            double yaw = x.getEntry(StateIndex.YAW);
            double c = Math.cos(yaw);
            double s = Math.sin(yaw);
            double ae = x.getEntry(StateIndex.EAST) + LEVER_FWD_M * c - LEVER_LEFT_M * s + x.getEntry(StateIndex.GNSS_ERR_EAST);
            double an = x.getEntry(StateIndex.NORTH) + LEVER_FWD_M * s + LEVER_LEFT_M * c + x.getEntry(StateIndex.GNSS_ERR_NORTH);
            return new ArrayRealVector(new double[] {m.getValue().getEntry(0) - ae, m.getValue().getEntry(1) - an}, false);
        }
    }
}
