package org.wayhold.simulate;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.EnumMap;
import java.util.List;
import java.util.Map;
import org.wayhold.settings.Check;

/**
 * A planned drive: speed, yaw rate and road grade as piecewise-linear functions of time, plus marked
 * stretches ({@link Zone}): where GNSS is denied (tunnels, the garage) or degraded (urban canyons), and
 * where the queues, long stops and motorway stretches are.
 *
 * <p>Speed is along the road (what a wheel rolls), yaw rate is the rate of change of the horizontal
 * direction of travel, and the grade is the road's inclination under the car (radians, positive
 * climbing forward). The horizontal speed is speed * cos(grade) and the climb rate speed * sin(grade).
 *
 * <p>Every knot lies on the 10 ms tick grid, so the sensor models (100, 50, 10 and 5 Hz) sample the
 * profiles exactly at knots or between them, never across one. Yaw is the exact integral of the
 * yaw-rate profile (piecewise quadratic); the distance travelled is the exact integral of |speed|.
 * Speed may not change sign inside one ramp: a reversing move ramps to zero first, so |speed| is
 * piecewise linear too.
 *
 * <p>Times here are seconds since the start of the route ({@code s}); absolute epoch seconds are added
 * by {@link DriveSimulator}.
 */
public final class Route {

    /** The grid every knot and every sample lies on (s). */
    public static final double TICK_S = 0.01;
    /** Ticks per second; the grid is counted in integer ticks so no time is ever rounded. */
    public static final int TICKS_PER_S = 100;

    /**
     * A sample rate must divide the 100 Hz tick grid so every sample falls on a tick.
     *
     * @param field   the settings field, for the message
     * @param rateHz  the sample rate (Hz)
     * @return ticks between samples
     */
    static int ticksPerSample(String field, double rateHz) {
        Check.positive(field, rateHz, "Hz");
        double ticks = TICKS_PER_S / rateHz;
        long whole = Math.round(ticks);
        if (whole < 1 || Math.abs(ticks - whole) > 1e-9) {
            throw new IllegalArgumentException(field + ": must divide " + TICKS_PER_S
                    + " Hz (for example 100, 50, 25, 20, 10, 5, 1), was " + rateHz + " Hz");
        }
        return (int) whole;
    }

    private final double initialYawRad;
    private final long[] knotTick;
    private final double[] knotSpeedMps;
    private final double[] knotYawRateRadPerS;
    private final double[] knotGradeRad;
    private final boolean level;
    /** Yaw at each knot (rad), integrated exactly from the profile. */
    private final double[] knotYawRad;
    /** Distance travelled at each knot (m). */
    private final double[] knotDistanceM;
    private final Map<Zone, List<long[]>> zoneTicks;

    private Route(double initialYawRad, long[] knotTick, double[] knotSpeedMps, double[] knotYawRateRadPerS,
                  double[] knotGradeRad, Map<Zone, List<long[]>> zoneTicks) {
        this.initialYawRad = initialYawRad;
        this.knotTick = knotTick;
        this.knotSpeedMps = knotSpeedMps;
        this.knotYawRateRadPerS = knotYawRateRadPerS;
        this.knotGradeRad = knotGradeRad;
        boolean flat = true;
        for (double g : knotGradeRad) {
            flat &= g == 0.0;
        }
        this.level = flat;
        this.zoneTicks = new EnumMap<>(Zone.class);
        for (Zone z : Zone.values()) {
            this.zoneTicks.put(z, List.copyOf(zoneTicks.getOrDefault(z, List.of())));
        }
        int n = knotTick.length;
        knotYawRad = new double[n];
        knotDistanceM = new double[n];
        knotYawRad[0] = initialYawRad;
        for (int k = 1; k < n; k++) {
            double lengthS = (knotTick[k] - knotTick[k - 1]) * TICK_S;
            // Trapezoid rule is exact for a linear integrand; |speed| is linear because no ramp crosses zero.
            knotYawRad[k] = knotYawRad[k - 1]
                    + 0.5 * (knotYawRateRadPerS[k - 1] + knotYawRateRadPerS[k]) * lengthS;
            knotDistanceM[k] = knotDistanceM[k - 1]
                    + 0.5 * (Math.abs(knotSpeedMps[k - 1]) + Math.abs(knotSpeedMps[k])) * lengthS;
        }
    }

    /**
     * Starts a route with the vehicle's initial state.
     *
     * @param yawRad         initial yaw (radians counter-clockwise from east)
     * @param speedMps       initial speed (m/s, signed)
     * @param yawRateRadPerS initial yaw rate (rad/s, counter-clockwise positive)
     */
    public static Builder start(double yawRad, double speedMps, double yawRateRadPerS) {
        return new Builder(yawRad, speedMps, yawRateRadPerS);
    }

    /** Length of the route in ticks of {@link #TICK_S}. */
    public long ticks() {
        return knotTick[knotTick.length - 1];
    }

    /** Length of the route (s). */
    public double durationS() {
        return ticks() * TICK_S;
    }

    /** Yaw at the start (radians counter-clockwise from east). */
    public double initialYawRad() {
        return initialYawRad;
    }

    /** Tunnels as {@code [startTick, endTick)} pairs, in route order. */
    List<long[]> tunnelTicks() {
        return zoneTicks.get(Zone.TUNNEL);
    }

    /** Urban canyons as {@code [startTick, endTick)} pairs, in route order. */
    List<long[]> canyonTicks() {
        return zoneTicks.get(Zone.CANYON);
    }

    /** Stretches of one kind as {@code [startTick, endTick)} pairs, in route order. */
    List<long[]> zoneTicks(Zone zone) {
        return zoneTicks.get(zone);
    }

    /** The knots' ticks, in order (a copy). */
    long[] knotTicks() {
        return knotTick.clone();
    }

    /** Whether the grade is zero everywhere (a flat road). */
    boolean level() {
        return level;
    }

    /** Index of the segment {@code [knot k, knot k+1]} holding {@code tick} (last segment for the end). */
    int segmentAt(double tick) {
        if (tick <= 0) {
            return 0;
        }
        int k = Arrays.binarySearch(knotTick, (long) Math.floor(tick));
        if (k < 0) {
            k = -k - 2;
        }
        return Math.min(k, knotTick.length - 2);
    }

    /** Speed at a fractional tick within segment {@code k} (m/s). */
    double speedMps(int k, double tick) {
        return lerp(k, tick, knotSpeedMps);
    }

    /** Yaw rate at a fractional tick within segment {@code k} (rad/s). */
    double yawRateRadPerS(int k, double tick) {
        return lerp(k, tick, knotYawRateRadPerS);
    }

    /** Road grade at a fractional tick within segment {@code k} (rad, positive climbing forward). */
    double gradeRad(int k, double tick) {
        return lerp(k, tick, knotGradeRad);
    }

    /** Rate of change of the grade within segment {@code k} (rad/s): the pitch rate. */
    double gradeRateRadPerS(int k) {
        return (knotGradeRad[k + 1] - knotGradeRad[k]) / ((knotTick[k + 1] - knotTick[k]) * TICK_S);
    }

    /** Acceleration along the road within segment {@code k} (m/s^2; constant, the speed is linear). */
    double accelerationMps2(int k) {
        return (knotSpeedMps[k + 1] - knotSpeedMps[k]) / ((knotTick[k + 1] - knotTick[k]) * TICK_S);
    }

    /** Yaw at a fractional tick within segment {@code k}: the exact integral of the linear yaw rate (rad). */
    double yawRad(int k, double tick) {
        double s = (tick - knotTick[k]) * TICK_S;
        double lengthS = (knotTick[k + 1] - knotTick[k]) * TICK_S;
        double slope = (knotYawRateRadPerS[k + 1] - knotYawRateRadPerS[k]) / lengthS;
        return knotYawRad[k] + knotYawRateRadPerS[k] * s + 0.5 * slope * s * s;
    }

    /** Distance travelled at a fractional tick within segment {@code k}: exact integral of |speed| (m). */
    double distanceM(int k, double tick) {
        double s = (tick - knotTick[k]) * TICK_S;
        double lengthS = (knotTick[k + 1] - knotTick[k]) * TICK_S;
        double v0 = Math.abs(knotSpeedMps[k]);
        double slope = (Math.abs(knotSpeedMps[k + 1]) - v0) / lengthS;
        return knotDistanceM[k] + v0 * s + 0.5 * slope * s * s;
    }

    private double lerp(int k, double tick, double[] values) {
        double f = (tick - knotTick[k]) / (double) (knotTick[k + 1] - knotTick[k]);
        return values[k] + (values[k + 1] - values[k]) * f;
    }

    /** Builds a route one manoeuvre at a time. Durations are rounded to the 10 ms grid. */
    public static final class Builder {
        private final double initialYawRad;
        private final List<Long> ticks = new ArrayList<>();
        private final List<Double> speeds = new ArrayList<>();
        private final List<Double> yawRates = new ArrayList<>();
        private final List<Double> grades = new ArrayList<>();
        private final Map<Zone, List<long[]>> zones = new EnumMap<>(Zone.class);
        private final Map<Zone, Long> open = new EnumMap<>(Zone.class);
        private double distanceM;

        private Builder(double yawRad, double speedMps, double yawRateRadPerS) {
            Check.finite("yawRad", yawRad, "rad");
            Check.finite("speedMps", speedMps, "m/s");
            Check.finite("yawRateRadPerS", yawRateRadPerS, "rad/s");
            this.initialYawRad = yawRad;
            ticks.add(0L);
            speeds.add(speedMps);
            yawRates.add(yawRateRadPerS);
            grades.add(0.0);
        }

        /** Keeps speed and yaw rate constant for {@code durationS} seconds (> 0). */
        public Builder hold(double durationS) {
            return rampTo(speedMps(), yawRateRadPerS(), durationS);
        }

        /**
         * Changes speed and yaw rate linearly to the given values over {@code durationS} seconds; the
         * grade stays as it is.
         *
         * @param speedMps       speed at the end of the ramp (m/s, signed; may not have the opposite sign
         *                       of the current speed: stop at zero first)
         * @param yawRateRadPerS yaw rate at the end of the ramp (rad/s)
         * @param durationS      ramp length (s, > 0, rounded to the 10 ms grid)
         */
        public Builder rampTo(double speedMps, double yawRateRadPerS, double durationS) {
            return rampTo(speedMps, yawRateRadPerS, gradeRad(), durationS);
        }

        /**
         * Changes speed, yaw rate and road grade linearly to the given values over {@code durationS}
         * seconds.
         *
         * @param speedMps       speed along the road at the end of the ramp (m/s, signed; may not have the
         *                       opposite sign of the current speed: stop at zero first)
         * @param yawRateRadPerS yaw rate at the end of the ramp (rad/s)
         * @param gradeRad       road grade at the end of the ramp (rad, within +-0.5, positive climbing
         *                       forward)
         * @param durationS      ramp length (s, > 0, rounded to the 10 ms grid)
         */
        public Builder rampTo(double speedMps, double yawRateRadPerS, double gradeRad, double durationS) {
            Check.finite("speedMps", speedMps, "m/s");
            Check.finite("yawRateRadPerS", yawRateRadPerS, "rad/s");
            if (!(Math.abs(gradeRad) <= 0.5)) {
                // 0.5 rad is a 55% grade, beyond any road.
                throw new IllegalArgumentException("gradeRad: must lie within +-0.5 rad, was " + gradeRad);
            }
            long n = Math.round(durationS * TICKS_PER_S);
            if (!(durationS > 0) || n < 1) {
                throw new IllegalArgumentException("durationS: must be at least one tick of " + TICK_S
                        + " s, was " + durationS + " s");
            }
            if (speedMps * speedMps() < 0.0) {
                throw new IllegalArgumentException("speedMps: a ramp may not reverse direction (from "
                        + speedMps() + " m/s to " + speedMps + " m/s); ramp to 0 m/s first");
            }
            distanceM += 0.5 * (Math.abs(speedMps()) + Math.abs(speedMps)) * n * TICK_S;
            ticks.add(elapsedTicks() + n);
            speeds.add(speedMps);
            yawRates.add(yawRateRadPerS);
            grades.add(gradeRad);
            return this;
        }

        /** Marks the start of a stretch of this kind at the current end of the route. */
        public Builder begin(Zone zone) {
            Long since = open.get(zone);
            if (since != null) {
                throw new IllegalStateException("begin: a " + zone + " stretch is already open since tick " + since);
            }
            open.put(zone, elapsedTicks());
            return this;
        }

        /** Marks the end of the open stretch of this kind. */
        public Builder end(Zone zone) {
            Long since = open.remove(zone);
            if (since == null) {
                throw new IllegalStateException("end: no " + zone + " stretch is open");
            }
            zones.computeIfAbsent(zone, z -> new ArrayList<>()).add(new long[] {since, elapsedTicks()});
            return this;
        }

        /** Marks the start of a GNSS-denied stretch at the current end of the route. */
        public Builder beginTunnel() {
            return begin(Zone.TUNNEL);
        }

        /** Marks the end of the open GNSS-denied stretch. */
        public Builder endTunnel() {
            return end(Zone.TUNNEL);
        }

        /** Marks the start of a stretch of degraded GNSS (urban canyon) at the current end of the route. */
        public Builder beginCanyon() {
            return begin(Zone.CANYON);
        }

        /** Marks the end of the open urban canyon. */
        public Builder endCanyon() {
            return end(Zone.CANYON);
        }

        /** Speed at the current end of the route (m/s). */
        public double speedMps() {
            return speeds.get(speeds.size() - 1);
        }

        /** Yaw rate at the current end of the route (rad/s). */
        public double yawRateRadPerS() {
            return yawRates.get(yawRates.size() - 1);
        }

        /** Road grade at the current end of the route (rad). */
        public double gradeRad() {
            return grades.get(grades.size() - 1);
        }

        /** Path length driven so far, forward and reverse both counted (m). */
        public double distanceM() {
            return distanceM;
        }

        /** Length of the route so far in ticks. */
        public long elapsedTicks() {
            return ticks.get(ticks.size() - 1);
        }

        /** Length of the route so far (s). */
        public double elapsedS() {
            return elapsedTicks() * TICK_S;
        }

        /** The finished route; open stretches are closed at the end. */
        public Route build() {
            if (ticks.size() < 2) {
                throw new IllegalStateException("build: a route needs at least one hold or ramp");
            }
            for (Zone z : List.copyOf(open.keySet())) {
                end(z);
            }
            int n = ticks.size();
            long[] t = new long[n];
            double[] v = new double[n];
            double[] w = new double[n];
            double[] g = new double[n];
            for (int i = 0; i < n; i++) {
                t[i] = ticks.get(i);
                v[i] = speeds.get(i);
                w[i] = yawRates.get(i);
                g[i] = grades.get(i);
            }
            return new Route(initialYawRad, t, v, w, g, zones);
        }
    }
}
