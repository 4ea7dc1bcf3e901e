package org.wayhold.bench;

import java.util.SplittableRandom;
import java.util.concurrent.TimeUnit;
import org.hipparchus.filtering.kalman.ProcessEstimate;
import org.hipparchus.filtering.kalman.extended.ExtendedKalmanFilter;
import org.hipparchus.filtering.kalman.extended.NonLinearProcess;
import org.hipparchus.linear.ArrayRealVector;
import org.hipparchus.linear.CholeskyDecomposer;
import org.hipparchus.linear.MatrixDecomposer;
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
import org.wayhold.filter.HipparchusVehicleModel;
import org.wayhold.filter.HipparchusVehicleModel.Mismatch;
import org.wayhold.filter.HipparchusVehicleModel.Position;
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
 * (yaw rate and wheel speed at 100 Hz, fixes at 5 Hz, GNSS antenna 1.4 m forward and 0.35 m right of
 * the reference point; lever arm and latency estimated, as the turn and the speed make them observable). The timed pair is what one GNSS epoch costs on top of the 100 Hz stream: one 10 ms
 * predict and one position update. Hipparchus does exactly that in one {@code estimationStep}: its
 * process model returns the 10 ms transition F, the process noise Q and the measurement Jacobian H,
 * and the library predicts, then corrects in Joseph form with a Cholesky-solved gain.
 *
 * <p>The Hipparchus model is the test-scope {@link HipparchusVehicleModel}, written on its own, not by
 * calling wayhold's code: the constant-turn step in chord form (displacement v dt sinc(theta/2) along
 * yaw + theta/2) where wayhold uses sin(theta)/theta and (1 - cos(theta))/theta, and the noise from the
 * formulas the filter documents ({@code NonlinearModelVsHipparchusTest} checks the same model over a
 * 210 s drive). Here it takes the one 10 ms step with the wheel speed and yaw rate held.
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
    private static final double RATE_RAD_PER_S = 0.1;
    private static final double SIGMA_H_M = 1.0;
    /** Start of the timed step: after 1000 ticks of 10 ms. */
    private static final double T0_S = 1000 / 100.0;
    /** End of the timed step, and time of its fix. */
    private static final double T1_S = 1001 / 100.0;

    /** Defaults without the tyre-growth floor, which the reference model leaves out. */
    private final FilterSettings settings = HipparchusVehicleModel.modelledSettings(FilterSettings.defaults());
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
    private Position hipparchusFix;
    private NonLinearProcess<Position> process;

    @Setup(Level.Trial)
    public void setUp() {
        start = new NavigationFilter(settings, gating, OutageSettings.defaults(), profile);
        double[] x0 = new double[N];
        x0[StateIndex.EAST] = 0.8;
        x0[StateIndex.NORTH] = -0.6;
        x0[StateIndex.YAW] = 0.3 + Math.toRadians(1.0);
        x0[StateIndex.SPEED_SCALE] = 1.0;
        x0[StateIndex.GYRO_SCALE] = 1.0;
        x0[StateIndex.LEVER_FORWARD] = LEVER_FWD_M;
        x0[StateIndex.LEVER_LEFT] = LEVER_LEFT_M;
        double corr0 = settings.gnssCorrelatedShare() * settings.gnssDefaultSigmaM() * settings.gnssDefaultSigmaM();
        double[] p0 = new double[N * N];
        double[] var0 = new double[N];
        var0[StateIndex.EAST] = 2.0;
        var0[StateIndex.NORTH] = 2.0;
        var0[StateIndex.YAW] = Math.pow(Math.toRadians(2.0), 2);
        var0[StateIndex.GYRO_BIAS] = Math.pow(settings.initialGyroBiasSigmaRadPerS(), 2);
        var0[StateIndex.SPEED_SCALE] = Math.pow(settings.initialSpeedScaleSigma(), 2);
        var0[StateIndex.GYRO_SCALE] = Math.pow(settings.initialGyroScaleSigma(), 2);
        var0[StateIndex.GNSS_ERR_EAST] = corr0;
        var0[StateIndex.GNSS_ERR_NORTH] = corr0;
        var0[StateIndex.LEVER_FORWARD] = Math.pow(profile.leverArmSigmaM(), 2);
        var0[StateIndex.LEVER_LEFT] = Math.pow(profile.leverArmSigmaM(), 2);
        var0[StateIndex.GNSS_LATENCY] = Math.pow(profile.gnssLatencySigmaS(), 2);
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
        startEstimate = new ProcessEstimate(T0_S, new ArrayRealVector(start.state()),
                HipparchusVehicleModel.square(start.covariance()));
        double sigma = start.horizontalSigmaM(fix);
        HipparchusVehicleModel model = new HipparchusVehicleModel(settings);
        hipparchusFix = model.position(T1_S, fixEastM, fixNorthM, sigma);
        // Both streams read every 10 ms and have not changed: no trend, intervals of 10 ms.
        process = model.heldInputs(new HipparchusVehicleModel.Inputs(SPEED_MPS, RATE_RAD_PER_S, RATE_RAD_PER_S,
                RATE_RAD_PER_S, 0.01, 0.01, model.correlatedVarianceM2(sigma)));

        checkBothAgree();
    }

    /** Runs the pair once on each side and throws unless the results agree to {@link #TOL}. */
    private void checkBothAgree() {
        GnssOutcome.Kind kind = wayholdPairOnce();
        require(kind == GnssOutcome.Kind.ACCEPTED, "the timed fix must be applied, was " + kind);
        ProcessEstimate est = hipparchusPairOnce();
        Mismatch gap = HipparchusVehicleModel.mismatch(work.state(), work.covariance(), est);
        require(gap.stateRel() < TOL && gap.covRel() < TOL, gap.where());
        // The update must have moved the state: a no-op on both sides would also agree.
        require(Math.abs(est.getState().getEntry(StateIndex.EAST) - predicted.state()[StateIndex.EAST]) > 1e-6,
                "the fix did not move the estimate");
    }

    private GnssOutcome.Kind wayholdPairOnce() {
        work.restore(start);
        work.predictTo(T1_S);
        return work.correct(fix, fixEastM, fixNorthM, Double.NaN);
    }

    private ProcessEstimate hipparchusPairOnce() {
        ExtendedKalmanFilter<Position> ekf = new ExtendedKalmanFilter<>(decomposer, process, startEstimate);
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

    /** Antenna east and north (m) on the true circle at time t: speed 15 m/s, yaw rate 0.1 rad/s. */
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
}
