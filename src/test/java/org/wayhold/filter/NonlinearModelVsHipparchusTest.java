package org.wayhold.filter;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;
import org.hipparchus.filtering.kalman.ProcessEstimate;
import org.hipparchus.filtering.kalman.extended.ExtendedKalmanFilter;
import org.hipparchus.filtering.kalman.extended.NonLinearEvolution;
import org.hipparchus.filtering.kalman.extended.NonLinearProcess;
import org.hipparchus.linear.Array2DRowRealMatrix;
import org.hipparchus.linear.ArrayRealVector;
import org.hipparchus.linear.CholeskyDecomposer;
import org.hipparchus.linear.MatrixUtils;
import org.hipparchus.linear.RealMatrix;
import org.hipparchus.linear.RealVector;
import org.junit.jupiter.api.Test;
import org.wayhold.filter.HipparchusVehicleModel.Mismatch;
import org.wayhold.filter.HipparchusVehicleModel.Position;
import org.wayhold.settings.FilterSettings;
import org.wayhold.settings.GatingSettings;
import org.wayhold.settings.OutageSettings;
import org.wayhold.settings.VehicleProfile;

/**
 * The full nonlinear filter against the same vehicle model written independently for Hipparchus
 * 4.0.2's {@code ExtendedKalmanFilter} (Joseph-form update, Cholesky-solved gain), fed the same seeded
 * events: yaw rate at 100 Hz, wheel speed at 50 Hz with turns, position fixes at 5 Hz, a 30 s outage
 * without fixes, then fixes again.
 *
 * <p>The one-step model (chord-form constant turn, its Jacobians, the noise formulas and where they
 * come from) is {@link HipparchusVehicleModel}. Hipparchus does one predict and one correct per
 * measurement, so this test's process model propagates through every input sample between two fixes
 * and composes the transition (Phi = F_k ... F_1) and the noise (Q = F_k Q_{k-1} F_k' + Q_k) exactly
 * as the filter's per-sample steps add up.
 *
 * <p>The truth has a gyro scale of 1.01, a bias of 0.2 deg/s, a speed scale of 1.012 and a GNSS latency
 * of 80 ms, so the filter's scale, bias and latency states all move. Left aside here, each checked by
 * its own tests: gating (the gate probability is 1 - 1e-12, a threshold of 55.3, and the test asserts
 * that every fix was used), reacquisition after the outage (the outage rule's gap is 60 s, so the
 * fixes after the 30 s outage pass through the gate without probation), the lever arm as a consider
 * state (its variance is 0: the arm is known), the tyre-growth floor (set to 0) and angle wrapping (yaw
 * is compared modulo 2 pi). No standstill occurs, the fixes carry no speed or course.
 *
 * <p>Tolerances (1e-9, the project's rule for agreement with a reference filter, DEVELOPERS.md,
 * "Targets the tests hold"): states to 1e-9 relative to max(1 m or 1 rad, |x|); covariances
 * to 1e-9 of sqrt(P_ii P_jj), i.e. on the correlation scale, so tiny bias variances are held to the
 * same relative standard as metre-sized position variances. Both filters compute the same arithmetic
 * in different orders; the difference is rounding amplified by the run's conditioning.
 */
class NonlinearModelVsHipparchusTest {

    private static final double TOL = 1e-9;
    private static final int N = StateIndex.SIZE;

    private static final double LEVER_FWD_M = 1.4;
    private static final double LEVER_LEFT_M = -0.35;
    private static final double LATENCY_S = 0.08;

    private enum Kind { WHEEL, RATE, FIX }

    /** One event; times in integer milliseconds so both filters see the very same doubles. */
    private record Event(long tickMs, Kind kind, double value, double east, double north, double sigma) {
        double t() {
            return tickMs / 1000.0;
        }
    }

    /** The drive: 120 s with fixes, 30 s without, 60 s with fixes again. */
    private static List<Event> drive(long seed) {
        SplittableRandom rnd = new SplittableRandom(seed);
        double trueScale = 1.012;
        double trueBias = Math.toRadians(0.2);
        double trueGyroScale = 1.01;
        double gyroSigma = Math.toRadians(0.1);
        double wheelSigma = 0.05;
        double share = 0.6;
        double tau = 40.0;
        double e = 0.0;
        double n = 0.0;
        double yaw = 0.3;
        double speed = 12.0;
        double rate = 0.0;
        double errE = 0.0;
        double errN = 0.0;
        List<Event> events = new ArrayList<>();
        for (long tick = 0; tick <= 210_000; tick += 10) {
            double t = tick / 1000.0;
            // Turns: a slowly varying rate (up to 0.25 rad/s) in alternating bursts; speed 10-20 m/s.
            double phase = t % 20.0;
            double target = phase < 8.0 ? 0.0 : 0.25 * Math.sin(Math.PI * (phase - 8.0) / 12.0) * (((long) (t / 20)) % 2 == 0 ? 1 : -1);
            rate += 0.05 * (target - rate);
            speed = 15.0 + 5.0 * Math.sin(t / 23.0);
            events.add(new Event(tick, Kind.RATE, rate / trueGyroScale + trueBias + gyroSigma * gaussian(rnd), 0, 0, 0));
            if (tick % 20 == 0) {
                events.add(new Event(tick, Kind.WHEEL, speed / trueScale + wheelSigma * gaussian(rnd), 0, 0, 0));
            }
            boolean outage = t > 120.0 && t <= 150.0;
            if (tick % 200 == 0 && tick > 0 && !outage) {
                double sigma = rnd.nextDouble(0.8, 1.6);
                double d = Math.exp(-0.2 / tau);
                double cs = Math.sqrt(share) * sigma * Math.sqrt(1 - d * d);
                errE = d * errE + cs * gaussian(rnd);
                errN = d * errN + cs * gaussian(rnd);
                double ws = Math.sqrt(1 - share) * sigma;
                double c = Math.cos(yaw);
                double s = Math.sin(yaw);
                // The fix is stamped LATENCY_S after the time it was valid for.
                double fe = e + LEVER_FWD_M * c - LEVER_LEFT_M * s - speed * LATENCY_S * c + errE + ws * gaussian(rnd);
                double fn = n + LEVER_FWD_M * s + LEVER_LEFT_M * c - speed * LATENCY_S * s + errN + ws * gaussian(rnd);
                events.add(new Event(tick, Kind.FIX, 0, fe, fn, sigma));
            }
            // Truth moves on to the next 10 ms tick along an arc.
            double th = rate * 0.01;
            double chord = speed * 0.01 * HipparchusVehicleModel.sinc(th / 2);
            e += chord * Math.cos(yaw + th / 2);
            n += chord * Math.sin(yaw + th / 2);
            yaw += th;
        }
        return events;
    }

    private static double gaussian(SplittableRandom rnd) {
        double u1 = 1.0 - rnd.nextDouble();
        double u2 = rnd.nextDouble();
        return Math.sqrt(-2.0 * Math.log(u1)) * Math.cos(2.0 * Math.PI * u2);
    }

    /**
     * The vehicle model through every input sample between two fixes, with the inputs the filter
     * would use, composed into one transition for Hipparchus.
     */
    private static final class VehicleProcess implements NonLinearProcess<Position> {
        private final List<Event> inputs;
        private final HipparchusVehicleModel model;
        private int cursor;
        private double heldWheel;
        private double heldRate;
        private double wheelT = Double.NaN;
        private double prevWheel;
        private double prevWheelT = Double.NaN;
        private double rateT = Double.NaN;
        private double prevRate;
        private double prevRateT = Double.NaN;
        private double corrVar;
        private final double nominalWheelS;
        private final double nominalRateS;

        VehicleProcess(List<Event> inputs, FilterSettings fs, HipparchusVehicleModel model) {
            this.inputs = inputs;
            this.model = model;
            this.nominalWheelS = 1.0 / fs.wheelSpeedRateHz();
            this.nominalRateS = 1.0 / fs.gyroRateHz();
            // Before any fix the correlated variance comes from the default sigma.
            this.corrVar = model.correlatedVarianceM2(fs.gnssDefaultSigmaM());
        }

        @Override
        public NonLinearEvolution getEvolution(double previousTime, RealVector previousState, Position fix) {
            double[] x = previousState.toArray();
            RealMatrix phi = MatrixUtils.createRealIdentityMatrix(N);
            RealMatrix q = new Array2DRowRealMatrix(N, N);
            double t = previousTime;
            while (cursor < inputs.size() && inputs.get(cursor).t() <= fix.getTime()) {
                Event ev = inputs.get(cursor++);
                if (ev.t() > t) {
                    HipparchusVehicleModel.Step step = step(x, t, ev.t() - t);
                    // Phi = F Phi; Q = F Q F' + Q_step
                    phi = step.f().multiply(phi);
                    q = step.f().multiply(q).multiplyTransposed(step.f()).add(step.q());
                    t = ev.t();
                }
                if (ev.kind() == Kind.WHEEL) {
                    prevWheel = heldWheel;
                    prevWheelT = wheelT;
                    heldWheel = ev.value();
                    wheelT = ev.t();
                } else {
                    prevRate = heldRate;
                    prevRateT = rateT;
                    heldRate = ev.value();
                    rateT = ev.t();
                }
            }
            if (fix.getTime() > t) {
                HipparchusVehicleModel.Step step = step(x, t, fix.getTime() - t);
                phi = step.f().multiply(phi);
                q = step.f().multiply(q).multiplyTransposed(step.f()).add(step.q());
            }
            // From this fix on, the Gauss-Markov noise uses the correlated share of its variance.
            corrVar = model.correlatedVarianceM2(fix.sigmaM());
            return new NonLinearEvolution(fix.getTime(), new ArrayRealVector(x), phi, q,
                    model.positionJacobian(x, heldWheel));
        }

        /**
         * The value of an input at time tm, by the rule NavigationFilter documents: the straight line
         * through the last two readings, followed at most one reading interval and 0.1 s past the
         * latest reading; before two readings exist, the latest one.
         */
        private static double onTrend(double latest, double latestT, double previous, double previousT, double tm) {
            double interval = latestT - previousT;
            if (!(interval > 0.0)) {
                return latest;
            }
            double ahead = Math.min(tm - latestT, Math.min(interval, 0.1));
            return ahead <= 0.0 ? latest : latest + (latest - previous) * ahead / interval;
        }

        /**
         * One step of dt from t with the inputs taken at the step's midpoint; updates x in place and
         * returns its F and Q.
         */
        private HipparchusVehicleModel.Step step(double[] x, double t, double dt) {
            double mid = t + 0.5 * dt;
            double wheel = onTrend(heldWheel, wheelT, prevWheel, prevWheelT, mid);
            if (wheel * heldWheel <= 0.0) {
                wheel = heldWheel;
            }
            double rate = onTrend(heldRate, rateT, prevRate, prevRateT, mid);
            // The first reading of a stream has no interval yet: the configured rate's stands in.
            double wheelInterval = wheelT - prevWheelT > 0.0 ? wheelT - prevWheelT : nominalWheelS;
            double rateInterval = rateT - prevRateT > 0.0 ? rateT - prevRateT : nominalRateS;
            double previous = Double.isNaN(prevRateT) ? heldRate : prevRate;
            return model.step(x, dt, new HipparchusVehicleModel.Inputs(wheel, rate, heldRate, previous, wheelInterval,
                    rateInterval, corrVar));
        }

        @Override
        public RealVector getInnovation(Position fix, NonLinearEvolution evolution, RealMatrix innovationCovariance) {
            return model.innovation(fix, evolution.getCurrentState(), heldWheel);
        }
    }

    @Test
    void wayholdAgreesWithTheSameModelRunThroughHipparchusAfterEveryFix() {
        FilterSettings fs = HipparchusVehicleModel.modelledSettings(FilterSettings.defaults());
        // Every fix applied: a gate of 1 - 1e-12 (threshold 55.3), and a 60 s gap before an outage.
        GatingSettings gating = new GatingSettings(1.0 - 1e-12, 1);
        double latencySigmaS = 0.05;
        VehicleProfile profile = new VehicleProfile(LEVER_FWD_M, LEVER_LEFT_M, 0.0, 0.0, 0.0, latencySigmaS, 1.0, 1.0);
        NavigationFilter wayhold = FilterFixtures.filter(fs, gating, new OutageSettings(60.0, 10.0), profile);

        // Start 1 m and 1 deg off the truth with a covariance that says so; bias, scales and latency
        // uncalibrated, the lever arm known.
        double corr0 = fs.gnssCorrelatedShare() * fs.gnssDefaultSigmaM() * fs.gnssDefaultSigmaM();
        double[] x0 = FilterFixtures.withLever(
                FilterFixtures.state(0.8, -0.6, 0.3 + Math.toRadians(1.0), 0.0, 1.0, 0.0, 0.0), LEVER_FWD_M, LEVER_LEFT_M);
        double[] p0 = FilterFixtures.diagonal(2.0, 2.0, Math.pow(Math.toRadians(2.0), 2),
                Math.pow(fs.initialGyroBiasSigmaRadPerS(), 2), Math.pow(fs.initialSpeedScaleSigma(), 2), corr0, corr0);
        p0[StateIndex.GYRO_SCALE * N + StateIndex.GYRO_SCALE] = Math.pow(fs.initialGyroScaleSigma(), 2);
        p0[StateIndex.GNSS_LATENCY * N + StateIndex.GNSS_LATENCY] = latencySigmaS * latencySigmaS;
        wayhold.initialize(0.0, x0, p0);

        List<Event> events = drive(7L);
        List<Event> inputs = events.stream().filter(ev -> ev.kind() != Kind.FIX).toList();
        HipparchusVehicleModel model = new HipparchusVehicleModel(fs);
        VehicleProcess process = new VehicleProcess(inputs, fs, model);
        ExtendedKalmanFilter<Position> hipparchus = new ExtendedKalmanFilter<>(new CholeskyDecomposer(1e-12, 1e-14),
                process, new ProcessEstimate(0.0, new ArrayRealVector(x0), HipparchusVehicleModel.square(p0)));

        double worstState = 0.0;
        double worstCov = 0.0;
        int fixes = 0;
        boolean sawOutageEnd = false;
        double previousFixT = 0.0;
        for (Event ev : events) {
            wayhold.predictTo(ev.t());
            switch (ev.kind()) {
                case WHEEL -> wayhold.setWheelSpeed(ev.value());
                case RATE -> wayhold.setYawRate(ev.value());
                case FIX -> {
                    GnssOutcome outcome = wayhold.updateGnss(FilterFixtures.fix(ev.t(), ev.sigma()), ev.east(),
                            ev.north(), Double.NaN);
                    assertThat(outcome.used()).as("fix at %s s: %s", ev.t(), outcome).isTrue();
                    if (ev.t() - previousFixT > 29.0) {
                        assertThat(outcome.kind()).isEqualTo(GnssOutcome.Kind.ACCEPTED);
                        sawOutageEnd = true;
                    }
                    previousFixT = ev.t();
                    ProcessEstimate est = hipparchus.estimationStep(
                            model.position(ev.t(), ev.east(), ev.north(), ev.sigma()));
                    Mismatch gap = HipparchusVehicleModel.mismatch(wayhold.state(), wayhold.covariance(), est);
                    assertThat(gap.stateRel()).as("fix %d at %s s, %s", fixes, ev.t(), gap.where()).isLessThan(TOL);
                    assertThat(gap.covRel()).as("fix %d at %s s, %s", fixes, ev.t(), gap.where()).isLessThan(TOL);
                    worstState = Math.max(worstState, gap.stateRel());
                    worstCov = Math.max(worstCov, gap.covRel());
                    fixes++;
                }
                default -> throw new IllegalStateException();
            }
        }
        // 5 Hz over 180 s of aided driving.
        assertThat(fixes).isEqualTo(900);
        assertThat(sawOutageEnd).isTrue();
        assertThat(worstState).isLessThan(TOL);
        assertThat(worstCov).isLessThan(TOL);
        // The window monitor widens on about one window of ten fixes in a thousand by design (its own tests
        // check it); this seed's fixes never trip it, so what was compared is the model alone.
        assertThat(wayhold.snapshot().counts().get(FilterCounter.COVARIANCE_WIDENINGS)).isZero();
        // The run exercised the calibration states: they moved towards the truth.
        double[] x = wayhold.state();
        assertThat(x[StateIndex.GYRO_SCALE]).isCloseTo(1.01, within(0.005));
        assertThat(x[StateIndex.GNSS_LATENCY]).isCloseTo(LATENCY_S, within(0.03));
    }
}
