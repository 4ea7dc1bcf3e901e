package org.wayhold.simulate;

import java.util.ArrayDeque;
import java.util.ArrayList;
import java.util.EnumMap;
import java.util.List;
import java.util.Map;
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
 * the wheel-speed noise, the gyro, the GNSS noise, the GNSS faults, the receiver's quality figures,
 * the road's grades and the canyons' non-line-of-sight bias. Each stream draws the same numbers
 * whether or not its error is switched on, so turning one error source off leaves every other one
 * unchanged; the effects that are not random (scale factors, latency, lever arm, tooth counting,
 * slip, tyre growth, warm-up) change only what they act on. Route elements (garage, queues, long
 * stops, motorway stretches, hard launches) change the route itself, so everything after the first
 * one differs.
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
        Route route = RoutePlanner.plan(s.route(), streams.route, streams.hills);
        return run(s, route, seed, streams);
    }

    /**
     * Simulates a drive on a given route, for exact tests (a circle, a straight line, a constant
     * grade). The route part of {@code s} supplies only the origin, start time and reference rate.
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
        final SplittableRandom hills;
        final Gaussian nlos;

        Streams(long seed) {
            SplittableRandom master = new SplittableRandom(seed);
            route = master.split();
            wheel = new Gaussian(master.split());
            gyro = new Gaussian(master.split());
            gnssNoise = new Gaussian(master.split());
            gnssFault = new Gaussian(master.split());
            receiver = new Gaussian(master.split());
            // Split after the original six, so drives without hills or canyon bias keep every number.
            hills = master.split();
            nlos = new Gaussian(master.split());
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

        // GNSS is denied in tunnels and in the garage; the first fixes after either are spoiled.
        List<long[]> denied = merged(route.tunnelTicks(), route.zoneTicks(Zone.GARAGE));
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

        Nlos nlos = gs.canyonNlos().enabled() ? new Nlos(gs.canyonNlos(), gnssDtS, rnd.nlos) : null;
        long latencyTicks = gs.latency().ticks();
        ArrayDeque<GnssFix> pending = new ArrayDeque<>();
        Wheel wheel = new Wheel(ws, route);

        for (int i = 0; i < n; i++) {
            double t = startT + i / (double) Route.TICKS_PER_S;
            int k = route.segmentAt(i);

            if (i % gyroTicks == 0) {
                int g = i / gyroTicks;
                double totalBiasRadPerS = ys.warmUp().enabled()
                        ? biasRadPerS + ys.warmUp().offsetRadPerS(i * Route.TICK_S) : biasRadPerS;
                gyroBiasRadPerS[g] = totalBiasRadPerS;
                double rate = bodyYawRateRadPerS(route, ys, k, i) + totalBiasRadPerS
                        + gyroNoiseRadPerS * rnd.gyro.next();
                samples.add(new YawRate(t, rate));
                biasRadPerS += biasStepRadPerS * rnd.gyro.next();
            }

            wheel.advanceTo(i);
            if (i % wheelTicks == 0) {
                double w = rnd.wheel.next();
                samples.add(new WheelSpeed(t, wheel.reading(k, i, w)));
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
                boolean inCanyon = inside(canyons, i);
                if (nlos != null) {
                    nlos.step(inCanyon, route.yawRad(k, i));
                }

                if (!inside(denied, i)) {
                    // The fix describes tick i; with latency it is stamped later.
                    double stampT = latencyTicks == 0 ? t : startT + (i + latencyTicks) / (double) Route.TICKS_PER_S;
                    double ts = i * Route.TICK_S;
                    double hdop = 0.8 + 0.4 * (0.5 + 0.5 * StrictMath.sin(2 * Math.PI * ts / HDOP_PERIOD_S + hdopPhase));
                    int sats = 8 + (int) Math.round(4 * (0.5 + 0.5 * StrictMath.sin(
                            2 * Math.PI * ts / SATS_PERIOD_S + satsPhase)));
                    FixType fix = FixType.THREE_D;
                    GnssFault.Kind kind = null;
                    double sizeM = 0.0;
                    double fixSigmaHM = sigmaHM;
                    if (justAfter(denied, i, multipathTicks)) {
                        kind = GnssFault.Kind.EXIT_MULTIPATH;
                        sizeM = gs.multipathMinM() + uSize * (gs.multipathMaxM() - gs.multipathMinM());
                        hdop = 2.0 + 2.0 * uHdop;
                        sats = 4 + satsDrop;
                        fix = sats == 4 ? FixType.TWO_D : FixType.THREE_D;
                    } else if (inCanyon && nlos != null) {
                        hdop = gs.canyonNlos().hdopFactor() * hdop;
                        sats = nlos.sats();
                        fixSigmaHM = gs.canyonNlos().reportedSigmaHM();
                        kind = uDrop < gs.canyonDropProbability() ? GnssFault.Kind.CANYON_DROPPED
                                : GnssFault.Kind.CANYON_NLOS;
                    } else if (inCanyon) {
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
                    if (kind == GnssFault.Kind.CANYON_NLOS) {
                        faultE = nlos.biasEastM();
                        faultN = nlos.biasNorthM();
                    }
                    if (kind != null) {
                        faults.add(new GnssFault(stampT, kind, faultE, faultN));
                    }
                    if (kind != GnssFault.Kind.CANYON_DROPPED) {
                        GnssFix f = fix(frame, truth.at(i, t), route.gradeRateRadPerS(k), gs, stampT,
                                gmEastM + whiteE + faultE, gmNorthM + whiteN + faultN, whiteU, velE, velN,
                                fixSigmaHM, fix, sats, hdop);
                        if (latencyTicks == 0) {
                            samples.add(f);
                        } else {
                            pending.add(f);
                        }
                    }
                }
            }
            // Late fixes join the log at their stamp; those stamped after the drive's end are never logged.
            while (!pending.isEmpty() && pending.peek().t() <= t) {
                samples.add(pending.poll());
            }

            if (i % refTicks == 0) {
                Geodetic g = frame.toGeodetic(truth.eastM(i), truth.northM(i), truth.upM(i));
                samples.add(new ReferencePoint(t, g.latDeg(), g.lonDeg(), g.altM(),
                        Angles.yawRadToHeadingDeg(route.yawRad(k, i))));
            }
        }

        Map<Zone, List<TimeWindow>> windows = new EnumMap<>(Zone.class);
        for (Zone z : Zone.values()) {
            windows.put(z, windows(route.zoneTicks(z), startT));
        }
        return new SimulatedDrive(s, seed, route, truth, frame, samples, windows, faults, gyroBiasRadPerS, gyroTicks);
    }

    /**
     * The angular rate the gyro's axis senses, before bias and noise (rad/s): the yaw rate projected on
     * the pitched body's z axis, yaw rate * cos(grade) (see {@link YawRateSettings}), times the scale
     * factor when that error is on. On a level road with no scale error it is the yaw rate itself.
     */
    private static double bodyYawRateRadPerS(Route route, YawRateSettings ys, int k, int i) {
        double rate = route.yawRateRadPerS(k, i);
        if (!route.level()) {
            rate *= StrictMath.cos(route.gradeRad(k, i));
        }
        return ys.scale().enabled() ? ys.scale().factor() * rate : rate;
    }

    /** Two lists of {@code [start, end)} tick windows as one, in time order. */
    private static List<long[]> merged(List<long[]> a, List<long[]> b) {
        if (b.isEmpty()) {
            return a;
        }
        List<long[]> out = new ArrayList<>(a);
        out.addAll(b);
        out.sort((x, y) -> Long.compare(x[0], y[0]));
        return out;
    }

    /**
     * The wheel-speed sensor. Its wheel's circumferential speed is the true speed along the road
     * times (1 + scale error), over (1 + tyre growth) and over (1 - slip), each factor applied only when
     * its effect is on. The classic reading adds white noise and rounds; with tooth counting the wheel's
     * angle is integrated every 10 ms tick (trapezoid rule, exact for the piecewise-linear speed of a
     * route without slip or growth) and the reading is the teeth counted since the last sample.
     */
    private static final class Wheel {
        private final WheelSpeedSettings ws;
        private final Route route;
        private final ToothCounting teeth;
        private final double stepMps;
        private double previousRollingMps;
        private double phaseTeeth;
        private long counted;

        Wheel(WheelSpeedSettings ws, Route route) {
            this.ws = ws;
            this.route = route;
            this.teeth = ws.teeth();
            this.stepMps = teeth.stepMps(ws.rateHz());
            this.previousRollingMps = teeth.enabled() ? rollingMps(route.segmentAt(0), 0) : 0.0;
        }

        /** Circumferential speed of the wheel at tick i (m/s, signed). */
        private double rollingMps(int k, double tick) {
            double v = route.speedMps(k, tick);
            double rolling = (1.0 + ws.scaleError()) * v;
            if (ws.tyreGrowth().enabled()) {
                rolling = rolling / (1.0 + ws.tyreGrowth().growthAt(v));
            }
            if (ws.slip().enabled()) {
                rolling = rolling / (1.0 - ws.slip().travelSlip(v, route.accelerationMps2(k), route.gradeRad(k, tick)));
            }
            return rolling;
        }

        /** With tooth counting, turns the wheel through the tick that ends at tick i and counts the teeth seen. */
        void advanceTo(int i) {
            if (!teeth.enabled() || i == 0) {
                return;
            }
            double rolling = rollingMps(route.segmentAt(i), i);
            double before = phaseTeeth;
            phaseTeeth += 0.5 * (previousRollingMps + rolling) * Route.TICK_S / teeth.toothArcM();
            previousRollingMps = rolling;
            double middle = i - 0.5;
            boolean detected = Math.abs(route.speedMps(route.segmentAt(middle), middle)) >= teeth.minSpeedMps();
            if (detected) {
                counted += (long) Math.floor(phaseTeeth) - (long) Math.floor(before);
            }
        }

        /** The reading at tick i in segment k; {@code w} is this sample's standard normal draw. */
        double reading(int k, int i, double w) {
            if (teeth.enabled()) {
                double r = counted * stepMps;
                counted = 0;
                return r;
            }
            double v = route.speedMps(k, i);
            // A wheel standing still sends no pulses: the reading is exactly zero, which is what lets a
            // filter detect standstill.
            return v == 0.0 ? 0.0 : quantize(rollingMps(k, i) + ws.noiseMps() * w, ws.quantumMps());
        }
    }

    /**
     * The non-line-of-sight bias of {@link CanyonNlos}: a unit Gauss-Markov process stepped at every
     * GNSS epoch (exact discretisation, as for the open-sky correlated error), mapped through the normal
     * distribution function onto the bias range, pointing across the current street to a side drawn
     * for each street.
     */
    private static final class Nlos {
        /** A turn of more than this from the street's direction starts a new street (rad). */
        private static final double NEW_STREET_RAD = Math.toRadians(45.0);

        private final CanyonNlos c;
        private final double phi;
        private final double step;
        private final Gaussian rng;
        private double x;
        private double streetYawRad = Double.NaN;
        private double side;
        private double yawRad;

        Nlos(CanyonNlos c, double dtS, Gaussian rng) {
            this.c = c;
            this.phi = StrictMath.exp(-dtS / c.timeConstantS());
            this.step = StrictMath.sqrt(1.0 - phi * phi);
            this.rng = rng;
            this.x = rng.next();
        }

        void step(boolean inCanyon, double yawRad) {
            x = phi * x + step * rng.next();
            this.yawRad = yawRad;
            if (!inCanyon) {
                streetYawRad = Double.NaN;
                return;
            }
            if (Double.isNaN(streetYawRad) || Math.abs(yawRad - streetYawRad) > NEW_STREET_RAD) {
                streetYawRad = yawRad;
                side = rng.uniform(0.0, 1.0) < 0.5 ? 1.0 : -1.0;
            }
        }

        double sizeM() {
            return c.minBiasM() + (c.maxBiasM() - c.minBiasM()) * CanyonNlos.normalCdf(x);
        }

        /** Bias east (m): the size along the left of the car (-sin yaw, cos yaw) times the street's side. */
        double biasEastM() {
            return -side * sizeM() * StrictMath.sin(yawRad);
        }

        double biasNorthM() {
            return side * sizeM() * StrictMath.cos(yawRad);
        }

        int sats() {
            return c.maxSats() - (int) Math.round((c.maxSats() - c.minSats()) * CanyonNlos.normalCdf(x));
        }
    }

    private static GnssFix fix(LocalFrame frame, Truth tr, double gradeRateRadPerS, GnssSettings gs, double t,
                               double errE, double errN, double errU, double velNoiseE, double velNoiseN,
                               double sigmaHM, FixType fixType, int sats, double hdop) {
        double f = gs.leverArmForwardM();
        double l = gs.leverArmLeftM();
        double u = gs.leverArmUpM();
        double antE = tr.bodyPointEastM(f, l, u);
        double antN = tr.bodyPointNorthM(f, l, u);
        Geodetic g = frame.toGeodetic(antE + errE, antN + errN, tr.bodyPointUpM(f, u) + errU);
        // Antenna velocity: the reference point's horizontal velocity plus yaw rate x lever arm, the arm
        // (rE, rN) rotated by 90 degrees counter-clockwise; on a changing grade the arm's horizontal
        // length changes too, at -(f sin(grade) + u cos(grade)) * grade rate along the heading.
        double rE = antE - tr.eastM();
        double rN = antN - tr.northM();
        double horizontal = tr.horizontalSpeedMps();
        double cosYaw = StrictMath.cos(tr.yawRad());
        double sinYaw = StrictMath.sin(tr.yawRad());
        double ve = horizontal * cosYaw - tr.yawRateRadPerS() * rN + velNoiseE;
        double vn = horizontal * sinYaw + tr.yawRateRadPerS() * rE + velNoiseN;
        if (gradeRateRadPerS != 0.0) {
            double aheadRateMps = -(f * StrictMath.sin(tr.gradeRad()) + u * StrictMath.cos(tr.gradeRad()))
                    * gradeRateRadPerS;
            ve += aheadRateMps * cosYaw;
            vn += aheadRateMps * sinYaw;
        }
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
