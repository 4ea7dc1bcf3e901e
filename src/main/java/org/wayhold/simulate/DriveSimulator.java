package org.wayhold.simulate;

import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;
import org.wayhold.geo.Angles;
import org.wayhold.geo.Geodetic;
import org.wayhold.geo.LocalFrame;
import org.wayhold.sample.FixType;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.ReferencePoint;
import org.wayhold.sample.Sample;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;

/**
 * Simulates a drive: plans the route, integrates the truth and samples every sensor from it.
 *
 * <p>Randomness: one {@link SplittableRandom} per seed, split into independent streams for the route,
 * the wheel-speed noise, the gyro, the GNSS noise, the GNSS faults and the receiver's quality
 * figures. Each stream draws the same numbers whether or not its error is switched on, so turning
 * one error source off leaves every other one unchanged.
 */
public final class DriveSimulator {

    /**
     * Periods of the slow open-sky swing of HDOP (0.8-1.2) and satellite count (8-12) as the
     * constellation moves (s). Invented values of the right order: geometry changes over minutes.
     */
    private static final double HDOP_PERIOD_S = 400.0;
    private static final double SATS_PERIOD_S = 650.0;

    private DriveSimulator() {
    }

    /**
     * Simulates a drive on the route generated from {@code s.route()}.
     *
     * @param s    scenario and sensor error models
     * @param seed the only source of randomness: same settings and seed give bit-identical output
     * @throws IllegalArgumentException when the tunnels and canyons do not fit in the duration
     */
    public static SimulatedDrive simulate(SimulationSettings s, long seed) {
        Streams streams = new Streams(seed);
        Route route = RoutePlanner.plan(s.route(), streams.route);
        return run(s, route, seed, streams);
    }

    /**
     * Simulates a drive on a given route, for exact tests (a circle, a straight line). The route
     * part of {@code s} supplies only the origin, start time and reference rate.
     *
     * @param s     sensor error models, origin, start time
     * @param route the truth's speed and yaw-rate profiles, tunnels and canyons
     * @param seed  the only source of randomness
     */
    public static SimulatedDrive simulate(SimulationSettings s, Route route, long seed) {
        return run(s, route, seed, new Streams(seed));
    }

    /** The independent random streams, split in a fixed order from the seed. */
    private static final class Streams {
        final SplittableRandom route;
        final Gaussian wheel;
        final Gaussian gyro;
        final Gaussian gnssNoise;
        final Gaussian gnssFault;
        final Gaussian receiver;

        Streams(long seed) {
            SplittableRandom master = new SplittableRandom(seed);
            route = master.split();
            wheel = new Gaussian(master.split());
            gyro = new Gaussian(master.split());
            gnssNoise = new Gaussian(master.split());
            gnssFault = new Gaussian(master.split());
            receiver = new Gaussian(master.split());
        }
    }

    private static SimulatedDrive run(SimulationSettings s, Route route, long seed, Streams rnd) {
        RouteSettings rs = s.route();
        WheelSpeedSettings ws = s.wheelSpeed();
        YawRateSettings ys = s.yawRate();
        GnssSettings gs = s.gnss();
        LocalFrame frame = new LocalFrame(new Geodetic(rs.originLatDeg(), rs.originLonDeg(), rs.originAltM()));
        TruthTable truth = new TruthTable(route);
        double startT = rs.startT();
        int n = Math.toIntExact(route.ticks());

        int wheelTicks = Route.ticksPerSample("wheelSpeed.rateHz", ws.rateHz());
        int gyroTicks = Route.ticksPerSample("yawRate.rateHz", ys.rateHz());
        int gnssTicks = Route.ticksPerSample("gnss.rateHz", gs.rateHz());
        int refTicks = Route.ticksPerSample("route.referenceRateHz", rs.referenceRateHz());

        List<long[]> tunnels = route.tunnelTicks();
        List<long[]> canyons = route.canyonTicks();
        long multipathTicks = Math.round(gs.multipathAfterExitS() * Route.TICKS_PER_S);

        List<Sample> samples = new ArrayList<>(n / gyroTicks + n / wheelTicks + n / gnssTicks + n / refTicks + 4);
        List<GnssFault> faults = new ArrayList<>();
        double[] gyroBiasRadPerS = new double[(n + gyroTicks - 1) / gyroTicks];

        // Gyro bias: starts at the configured value, then a random walk whose increment over dt has
        // standard deviation q * sqrt(dt) (the definition of a random walk coefficient in units per sqrt(s)).
        double biasRadPerS = Math.toRadians(ys.biasDegPerS());
        double gyroDtS = gyroTicks * Route.TICK_S;
        double biasStepRadPerS = Math.toRadians(ys.biasRandomWalkDegPerSPerSqrtS()) * Math.sqrt(gyroDtS);
        double gyroNoiseRadPerS = Math.toRadians(ys.noiseDegPerS());

        // First-order Gauss-Markov error, exact discretisation: x' = phi x + sigma sqrt(1 - phi^2) w with
        // phi = exp(-dt / tau), which keeps the variance at sigma^2 for any dt (Gelb, Applied Optimal
        // Estimation, 1974, sec. 3.8; Brown and Hwang, Introduction to Random Signals and Applied Kalman
        // Filtering, 4th ed., sec. 2.9). The process starts in its stationary distribution.
        double gnssDtS = gnssTicks * Route.TICK_S;
        double phi = StrictMath.exp(-gnssDtS / gs.markovTimeS());
        double gmStep = gs.markovSigmaM() * StrictMath.sqrt(1.0 - phi * phi);
        double gmEastM = gs.markovSigmaM() * rnd.gnssNoise.next();
        double gmNorthM = gs.markovSigmaM() * rnd.gnssNoise.next();
        double sigmaHM = gs.reportedSigmaHM();
        double outlierProbability = gs.outliersPerHour() / 3600.0 * gnssDtS;
        double hdopPhase = rnd.receiver.uniform(0.0, 2.0 * Math.PI);
        double satsPhase = rnd.receiver.uniform(0.0, 2.0 * Math.PI);

        for (int i = 0; i < n; i++) {
            double t = startT + i / (double) Route.TICKS_PER_S;
            int k = route.segmentAt(i);

            if (i % gyroTicks == 0) {
                int g = i / gyroTicks;
                gyroBiasRadPerS[g] = biasRadPerS;
                double rate = route.yawRateRadPerS(k, i) + biasRadPerS + gyroNoiseRadPerS * rnd.gyro.next();
                samples.add(new YawRate(t, rate));
                biasRadPerS += biasStepRadPerS * rnd.gyro.next();
            }

            if (i % wheelTicks == 0) {
                double w = rnd.wheel.next();
                double v = route.speedMps(k, i);
                // A wheel standing still sends no pulses: the reading is exactly zero, which is what lets a
                // filter detect standstill.
                double reading = v == 0.0 ? 0.0 : quantize((1.0 + ws.scaleError()) * v + ws.noiseMps() * w,
                        ws.quantumMps());
                samples.add(new WheelSpeed(t, reading));
            }

            if (i % gnssTicks == 0) {
                if (i > 0) {
                    gmEastM = phi * gmEastM + gmStep * rnd.gnssNoise.next();
                    gmNorthM = phi * gmNorthM + gmStep * rnd.gnssNoise.next();
                }
                // Every draw is taken for every fix, used or not, so the streams stay aligned.
                double whiteE = gs.whiteNoiseM() * rnd.gnssNoise.next();
                double whiteN = gs.whiteNoiseM() * rnd.gnssNoise.next();
                double whiteU = gs.verticalNoiseM() * rnd.gnssNoise.next();
                double velE = gs.velocityNoiseMps() * rnd.gnssNoise.next();
                double velN = gs.velocityNoiseMps() * rnd.gnssNoise.next();
                double uEvent = rnd.gnssFault.uniform(0.0, 1.0);
                double uDrop = rnd.gnssFault.uniform(0.0, 1.0);
                double uSize = rnd.gnssFault.uniform(0.0, 1.0);
                double uDir = rnd.gnssFault.uniform(0.0, 2.0 * Math.PI);
                double uHdop = rnd.receiver.uniform(0.0, 1.0);
                int satsDrop = rnd.receiver.uniformInt(0, 2);

                if (!inside(tunnels, i)) {
                    double ts = i * Route.TICK_S;
                    double hdop = 0.8 + 0.4 * (0.5 + 0.5 * StrictMath.sin(2 * Math.PI * ts / HDOP_PERIOD_S + hdopPhase));
                    int sats = 8 + (int) Math.round(4 * (0.5 + 0.5 * StrictMath.sin(
                            2 * Math.PI * ts / SATS_PERIOD_S + satsPhase)));
                    FixType fix = FixType.THREE_D;
                    GnssFault.Kind kind = null;
                    double sizeM = 0.0;
                    if (justAfter(tunnels, i, multipathTicks)) {
                        kind = GnssFault.Kind.EXIT_MULTIPATH;
                        sizeM = gs.multipathMinM() + uSize * (gs.multipathMaxM() - gs.multipathMinM());
                        hdop = 2.0 + 2.0 * uHdop;
                        sats = 4 + satsDrop;
                        fix = sats == 4 ? FixType.TWO_D : FixType.THREE_D;
                    } else if (inside(canyons, i)) {
                        hdop = 1.5 + 1.5 * uHdop;
                        sats = 5 + satsDrop;
                        if (uDrop < gs.canyonDropProbability()) {
                            kind = GnssFault.Kind.CANYON_DROPPED;
                        } else if (uEvent < gs.canyonFaultProbability()) {
                            kind = GnssFault.Kind.CANYON_MULTIPATH;
                            sizeM = gs.multipathMinM() + uSize * (gs.multipathMaxM() - gs.multipathMinM());
                        }
                    } else if (uEvent < outlierProbability) {
                        kind = GnssFault.Kind.OUTLIER;
                        sizeM = gs.outlierMinM() + uSize * (gs.outlierMaxM() - gs.outlierMinM());
                    }
                    hdop = Math.rint(hdop * 100.0) / 100.0;
                    double faultE = sizeM * StrictMath.cos(uDir);
                    double faultN = sizeM * StrictMath.sin(uDir);
                    if (kind != null) {
                        faults.add(new GnssFault(t, kind, faultE, faultN));
                    }
                    if (kind != GnssFault.Kind.CANYON_DROPPED) {
                        samples.add(fix(frame, truth.at(i, t), gs, t, gmEastM + whiteE + faultE,
                                gmNorthM + whiteN + faultN, whiteU, velE, velN, sigmaHM, fix, sats, hdop));
                    }
                }
            }

            if (i % refTicks == 0) {
                Geodetic g = frame.toGeodetic(truth.eastM(i), truth.northM(i), 0.0);
                samples.add(new ReferencePoint(t, g.latDeg(), g.lonDeg(), g.altM(),
                        Angles.yawRadToHeadingDeg(route.yawRad(k, i))));
            }
        }

        List<TimeWindow> tunnelWindows = windows(tunnels, startT);
        List<TimeWindow> canyonWindows = windows(canyons, startT);
        return new SimulatedDrive(s, seed, route, truth, frame, samples, tunnelWindows, canyonWindows, faults,
                gyroBiasRadPerS, gyroTicks);
    }

    private static GnssFix fix(LocalFrame frame, Truth tr, GnssSettings gs, double t, double errE, double errN,
                               double errU, double velNoiseE, double velNoiseN, double sigmaHM, FixType fixType,
                               int sats, double hdop) {
        double f = gs.leverArmForwardM();
        double l = gs.leverArmLeftM();
        double antE = tr.bodyPointEastM(f, l);
        double antN = tr.bodyPointNorthM(f, l);
        Geodetic g = frame.toGeodetic(antE + errE, antN + errN, gs.leverArmUpM() + errU);
        // Antenna velocity: the reference point's velocity plus yaw rate x lever arm, the arm (rE, rN)
        // rotated by 90 degrees counter-clockwise.
        double rE = antE - tr.eastM();
        double rN = antN - tr.northM();
        double ve = tr.speedMps() * StrictMath.cos(tr.yawRad()) - tr.yawRateRadPerS() * rN + velNoiseE;
        double vn = tr.speedMps() * StrictMath.sin(tr.yawRad()) + tr.yawRateRadPerS() * rE + velNoiseN;
        double speed = Math.hypot(ve, vn);
        double course = speed >= gs.courseMinSpeedMps() && speed > 0.0 ? Angles.yawRadToHeadingDeg(StrictMath.atan2(vn, ve))
                : Double.NaN;
        return new GnssFix(t, g.latDeg(), g.lonDeg(), g.altM(), sigmaHM, gs.verticalNoiseM(), fixType, sats, hdop,
                speed, course);
    }

    /** Whether tick i lies in one of the {@code [start, end)} windows. */
    private static boolean inside(List<long[]> windows, long i) {
        for (long[] w : windows) {
            if (i >= w[0] && i < w[1]) {
                return true;
            }
        }
        return false;
    }

    /** Whether tick i lies in the first {@code ticks} ticks after the end of one of the windows. */
    private static boolean justAfter(List<long[]> windows, long i, long ticks) {
        for (long[] w : windows) {
            if (i >= w[1] && i < w[1] + ticks) {
                return true;
            }
        }
        return false;
    }

    private static List<TimeWindow> windows(List<long[]> ticks, double startT) {
        List<TimeWindow> out = new ArrayList<>(ticks.size());
        for (long[] w : ticks) {
            out.add(new TimeWindow(startT + w[0] / (double) Route.TICKS_PER_S,
                    startT + w[1] / (double) Route.TICKS_PER_S));
        }
        return List.copyOf(out);
    }

    /**
     * Rounds to a multiple of the quantum. When the quantum is 1/N for a whole N (0.01 m/s), the result
     * is written as count / N so it is the double nearest the decimal value (12.34, not 12.340000000000002).
     */
    static double quantize(double value, double quantum) {
        if (quantum == 0.0) {
            return value;
        }
        double perUnit = 1.0 / quantum;
        double whole = Math.rint(perUnit);
        if (Math.abs(perUnit - whole) < 1e-9 * whole) {
            return Math.rint(value * whole) / whole;
        }
        return Math.rint(value / quantum) * quantum;
    }
}
