package org.wayhold.filter;

import static org.assertj.core.api.Assertions.assertThat;

import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;
import org.hipparchus.filtering.kalman.Measurement;
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
import org.wayhold.settings.FilterSettings;
import org.wayhold.settings.GatingSettings;
import org.wayhold.settings.VehicleProfile;

/**
 * The full nonlinear filter against the same vehicle model written independently in this test for
 * Hipparchus 4.0.2's {@code ExtendedKalmanFilter} (Joseph-form update, Cholesky-solved gain), fed
 * the same seeded events: yaw rate at 100 Hz, wheel speed at 50 Hz with turns, position fixes at 5 Hz,
 * a 30 s outage without fixes, then fixes again.
 *
 * <p>The test's model is derived on its own rather than copied: the exact constant-turn step is
 * written in chord form (the displacement over an arc of angle theta is the chord v dt sinc(theta/2)
 * along yaw + theta/2, a standard identity of circular motion), where wayhold writes it with
 * sin(theta)/theta and (1 - cos(theta))/theta; the Jacobians are differentiated from that form. The
 * noise follows the formulas the filter documents: a white input of per-reading sigma at rate f has
 * the density sigma^2 / f, so a step of dt adds G G' sigma^2 / (f dt) with G the input sensitivity over
 * the step; the bias and scale random walks add w^2 dt; the Gauss-Markov GNSS error (Brown and Hwang,
 * 4th ed., sec. 4.2) adds sigma_c^2 (1 - exp(-2 dt / tau)), with sigma_c^2 the correlated share of the
 * last fix's variance. Hipparchus does one predict and one correct per measurement, so the process
 * model propagates through every input sample between two fixes and composes the transition
 * (Phi = F_k ... F_1) and the noise (Q = F_k Q_{k-1} F_k' + Q_k) exactly as the filter's per-sample
 * steps add up.
 *
 * <p>Left aside, as the issue allows: gating (the gate probability is 1 - 1e-12, a threshold of 55.3,
 * and the test asserts that every fix was used), reacquisition probation after the outage
 * ({@code reacquire_fixes = 1}: the first fix after the gap is applied at once) and angle wrapping
 * (yaw is compared modulo 2 pi). No standstill occurs, the fixes carry no speed or course.
 *
 * <p>Tolerances (the 1e-9): states to 1e-9 relative to max(1 m or 1 rad, |x|); covariances
 * to 1e-9 of sqrt(P_ii P_jj), i.e. on the correlation scale, so tiny bias variances are held to the
 * same relative standard as metre-sized position variances. Both filters compute the same arithmetic
 * in different orders; the difference is rounding amplified by the run's conditioning.
 */
class NonlinearModelVsHipparchusTest {

    private static final double TOL = 1e-9;
    private static final int N = StateIndex.SIZE;
    private static final int E = StateIndex.EAST;
    private static final int NO = StateIndex.NORTH;
    private static final int Y = StateIndex.YAW;
    private static final int B = StateIndex.GYRO_BIAS;
    private static final int S = StateIndex.SPEED_SCALE;
    private static final int GE = StateIndex.GNSS_ERR_EAST;
    private static final int GN = StateIndex.GNSS_ERR_NORTH;

    private static final double LEVER_FWD_M = 1.4;
    private static final double LEVER_LEFT_M = -0.35;

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
            events.add(new Event(tick, Kind.RATE, rate + trueBias + gyroSigma * gaussian(rnd), 0, 0, 0));
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
                double fe = e + LEVER_FWD_M * c - LEVER_LEFT_M * s + errE + ws * gaussian(rnd);
                double fn = n + LEVER_FWD_M * s + LEVER_LEFT_M * c + errN + ws * gaussian(rnd);
                events.add(new Event(tick, Kind.FIX, 0, fe, fn, sigma));
            }
            // Truth moves on to the next 10 ms tick along an arc.
            double th = rate * 0.01;
            double chord = speed * 0.01 * sinc(th / 2);
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

    /** sin(x) / x, with its Taylor series near 0 (truncation below 1e-21 for |x| < 1e-2). */
    static double sinc(double x) {
        if (Math.abs(x) < 1e-2) {
            double x2 = x * x;
            return 1.0 - x2 / 6.0 + x2 * x2 / 120.0 - x2 * x2 * x2 / 5040.0;
        }
        return Math.sin(x) / x;
    }

    /** d/dx of sin(x) / x, with its Taylor series near 0. */
    static double sincPrime(double x) {
        if (Math.abs(x) < 1e-2) {
            double x2 = x * x;
            return x * (-1.0 / 3.0 + x2 / 30.0 - x2 * x2 / 840.0);
        }
        return (x * Math.cos(x) - Math.sin(x)) / (x * x);
    }

    /** A position fix of the antenna with its white-noise covariance. */
    private record Fix(double time, RealVector value, RealMatrix covariance, double sigmaM) implements Measurement {
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

    /** The vehicle model of this test, written against Hipparchus's interfaces. */
    private static final class VehicleProcess implements NonLinearProcess<Fix> {
        private final List<Event> inputs;
        private final FilterSettings fs;
        private int cursor;
        private double heldWheel;
        private double heldRate;
        private double corrVar;

        VehicleProcess(List<Event> inputs, FilterSettings fs) {
            this.inputs = inputs;
            this.fs = fs;
            // Before any fix the correlated variance comes from the default sigma.
            this.corrVar = fs.gnssCorrelatedShare() * fs.gnssDefaultSigmaM() * fs.gnssDefaultSigmaM();
        }

        @Override
        public NonLinearEvolution getEvolution(double previousTime, RealVector previousState, Fix fix) {
            double[] x = previousState.toArray();
            RealMatrix phi = MatrixUtils.createRealIdentityMatrix(N);
            RealMatrix q = new Array2DRowRealMatrix(N, N);
            double t = previousTime;
            while (cursor < inputs.size() && inputs.get(cursor).t() <= fix.getTime()) {
                Event ev = inputs.get(cursor++);
                if (ev.t() > t) {
                    RealMatrix[] fq = step(x, ev.t() - t);
                    // Phi = F Phi; Q = F Q F' + Q_step
                    phi = fq[0].multiply(phi);
                    q = fq[0].multiply(q).multiplyTransposed(fq[0]).add(fq[1]);
                    t = ev.t();
                }
                if (ev.kind() == Kind.WHEEL) {
                    heldWheel = ev.value();
                } else {
                    heldRate = ev.value();
                }
            }
            if (fix.getTime() > t) {
                RealMatrix[] fq = step(x, fix.getTime() - t);
                phi = fq[0].multiply(phi);
                q = fq[0].multiply(q).multiplyTransposed(fq[0]).add(fq[1]);
            }
            // From this fix on, the Gauss-Markov noise uses the correlated share of its variance.
            corrVar = fs.gnssCorrelatedShare() * fix.sigmaM() * fix.sigmaM();

            // h(x) = position + R(yaw) (forward, left) + GNSS error; H = dh/dx.
            double c = Math.cos(x[Y]);
            double s = Math.sin(x[Y]);
            RealMatrix h = new Array2DRowRealMatrix(2, N);
            h.setEntry(0, E, 1.0);
            h.setEntry(0, Y, -LEVER_FWD_M * s - LEVER_LEFT_M * c);
            h.setEntry(0, GE, 1.0);
            h.setEntry(1, NO, 1.0);
            h.setEntry(1, Y, LEVER_FWD_M * c - LEVER_LEFT_M * s);
            h.setEntry(1, GN, 1.0);
            return new NonLinearEvolution(fix.getTime(), new ArrayRealVector(x), phi, q, h);
        }

        /**
         * One step of dt with the held inputs; updates x in place and returns {F, Q_step}.
         */
        private RealMatrix[] step(double[] x, double dt) {
            double omega = heldRate - x[B];
            double theta = omega * dt;
            double v = x[S] * heldWheel;
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
            double decay = Math.exp(-dt / fs.gnssCorrelationTimeS());

            RealMatrix f = MatrixUtils.createRealIdentityMatrix(N);
            f.setEntry(E, Y, -dn);
            f.setEntry(NO, Y, de);
            f.setEntry(E, S, heldWheel * dt * sc * cu);
            f.setEntry(NO, S, heldWheel * dt * sc * su);
            // theta = (rate - bias) dt: d/d(bias) = -dt d/d(theta)
            f.setEntry(E, B, -dt * deDTheta);
            f.setEntry(NO, B, -dt * dnDTheta);
            f.setEntry(Y, B, -dt);
            f.setEntry(GE, GE, decay);
            f.setEntry(GN, GN, decay);

            // Input sensitivities over the step, rows (east, north, yaw).
            double[] gWheel = {x[S] * dt * sc * cu, x[S] * dt * sc * su, 0.0};
            double[] gRate = {dt * deDTheta, dt * dnDTheta, dt};
            double densWheel = fs.wheelSpeedNoiseMps() * fs.wheelSpeedNoiseMps() / fs.wheelSpeedRateHz();
            double densGyro = fs.gyroNoiseRadPerS() * fs.gyroNoiseRadPerS() / fs.gyroRateHz();
            RealMatrix q = new Array2DRowRealMatrix(N, N);
            for (int i = 0; i < 3; i++) {
                for (int j = 0; j < 3; j++) {
                    q.setEntry(i, j, gWheel[i] * gWheel[j] * densWheel / dt + gRate[i] * gRate[j] * densGyro / dt);
                }
            }
            double wb = fs.gyroBiasRandomWalkRadPerSPerSqrtS();
            double ws = fs.speedScaleRandomWalkPerSqrtS();
            q.setEntry(B, B, wb * wb * dt);
            q.setEntry(S, S, ws * ws * dt);
            q.setEntry(GE, GE, corrVar * (1.0 - decay * decay));
            q.setEntry(GN, GN, corrVar * (1.0 - decay * decay));

            x[E] += de;
            x[NO] += dn;
            x[Y] += theta;
            x[GE] *= decay;
            x[GN] *= decay;
            return new RealMatrix[] {f, q};
        }

        @Override
        public RealVector getInnovation(Fix fix, NonLinearEvolution evolution, RealMatrix innovationCovariance) {
            double[] x = evolution.getCurrentState().toArray();
            double c = Math.cos(x[Y]);
            double s = Math.sin(x[Y]);
            double ae = x[E] + LEVER_FWD_M * c - LEVER_LEFT_M * s + x[GE];
            double an = x[NO] + LEVER_FWD_M * s + LEVER_LEFT_M * c + x[GN];
            return new ArrayRealVector(new double[] {fix.getValue().getEntry(0) - ae, fix.getValue().getEntry(1) - an});
        }
    }

    @Test
    void wayholdAgreesWithTheSameModelRunThroughHipparchusAfterEveryFix() {
        FilterSettings fs = FilterSettings.defaults();
        // Every fix applied: a gate of 1 - 1e-12 (threshold 55.3) and one agreeing fix to reacquire.
        GatingSettings gating = new GatingSettings(1.0 - 1e-12, 1);
        NavigationFilter wayhold = FilterFixtures.filter(fs, gating, new VehicleProfile(LEVER_FWD_M, LEVER_LEFT_M, 0.0));

        // Start 1 m and 1 deg off the truth with a covariance that says so; bias and scale uncalibrated.
        double corr0 = fs.gnssCorrelatedShare() * fs.gnssDefaultSigmaM() * fs.gnssDefaultSigmaM();
        double[] x0 = FilterFixtures.state(0.8, -0.6, 0.3 + Math.toRadians(1.0), 0.0, 1.0, 0.0, 0.0);
        double[] p0 = FilterFixtures.diagonal(2.0, 2.0, Math.pow(Math.toRadians(2.0), 2),
                Math.pow(fs.initialGyroBiasSigmaRadPerS(), 2), Math.pow(fs.initialSpeedScaleSigma(), 2), corr0, corr0);
        wayhold.initialize(0.0, x0, p0);

        List<Event> events = drive(4242L);
        List<Event> inputs = events.stream().filter(ev -> ev.kind() != Kind.FIX).toList();
        VehicleProcess process = new VehicleProcess(inputs, fs);
        ExtendedKalmanFilter<Fix> hipparchus = new ExtendedKalmanFilter<>(new CholeskyDecomposer(1e-12, 1e-14),
                process, new ProcessEstimate(0.0, new ArrayRealVector(x0), square(p0)));

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
                        assertThat(outcome.kind()).isEqualTo(GnssOutcome.Kind.REACQUIRED);
                        sawOutageEnd = true;
                    }
                    previousFixT = ev.t();
                    double white = (1.0 - fs.gnssCorrelatedShare()) * ev.sigma() * ev.sigma();
                    ProcessEstimate est = hipparchus.estimationStep(new Fix(ev.t(),
                            new ArrayRealVector(new double[] {ev.east(), ev.north()}),
                            MatrixUtils.createRealDiagonalMatrix(new double[] {white, white}), ev.sigma()));
                    double[] x = wayhold.state();
                    double[] p = wayhold.covariance();
                    double[] xh = est.getState().toArray();
                    double[][] ph = est.getCovariance().getData();
                    for (int i = 0; i < N; i++) {
                        double d = i == Y ? Math.IEEEremainder(x[i] - xh[i], 2 * Math.PI) : x[i] - xh[i];
                        double rel = Math.abs(d) / Math.max(1.0, Math.abs(i == Y ? 0.0 : xh[i]));
                        assertThat(rel).as("fix %d at %s s, state %d: wayhold %s, Hipparchus %s", fixes, ev.t(), i,
                                x[i], xh[i]).isLessThan(TOL);
                        worstState = Math.max(worstState, rel);
                        for (int j = 0; j < N; j++) {
                            double scale = Math.sqrt(ph[i][i] * ph[j][j]);
                            double relP = Math.abs(p[i * N + j] - ph[i][j]) / scale;
                            assertThat(relP).as("fix %d at %s s, P[%d][%d]: wayhold %s, Hipparchus %s", fixes, ev.t(),
                                    i, j, p[i * N + j], ph[i][j]).isLessThan(TOL);
                            worstCov = Math.max(worstCov, relP);
                        }
                    }
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
    }

    private static RealMatrix square(double[] rowMajor) {
        double[][] m = new double[N][N];
        for (int i = 0; i < N; i++) {
            System.arraycopy(rowMajor, i * N, m[i], 0, N);
        }
        return new Array2DRowRealMatrix(m);
    }
}
