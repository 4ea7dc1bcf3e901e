package org.wayhold.simulate;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import org.wayhold.settings.Check;

/**
 * A planned drive: speed and yaw rate as piecewise-linear functions of time, plus the stretches where
 * GNSS is denied (tunnels) or degraded (urban canyons).
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
    /** Yaw at each knot (rad), integrated exactly from the profile. */
    private final double[] knotYawRad;
    /** Distance travelled at each knot (m). */
    private final double[] knotDistanceM;
    private final List<long[]> tunnelTicks;
    private final List<long[]> canyonTicks;

    private Route(double initialYawRad, long[] knotTick, double[] knotSpeedMps, double[] knotYawRateRadPerS,
                  List<long[]> tunnelTicks, List<long[]> canyonTicks) {
        this.initialYawRad = initialYawRad;
        this.knotTick = knotTick;
        this.knotSpeedMps = knotSpeedMps;
        this.knotYawRateRadPerS = knotYawRateRadPerS;
        this.tunnelTicks = List.copyOf(tunnelTicks);
        this.canyonTicks = List.copyOf(canyonTicks);
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
        return tunnelTicks;
    }

    /** Urban canyons as {@code [startTick, endTick)} pairs, in route order. */
    List<long[]> canyonTicks() {
        return canyonTicks;
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
        private final List<long[]> tunnels = new ArrayList<>();
        private final List<long[]> canyons = new ArrayList<>();
        private long openTunnel = -1;
        private long openCanyon = -1;

        private Builder(double yawRad, double speedMps, double yawRateRadPerS) {
            Check.finite("yawRad", yawRad, "rad");
            Check.finite("speedMps", speedMps, "m/s");
            Check.finite("yawRateRadPerS", yawRateRadPerS, "rad/s");
            this.initialYawRad = yawRad;
            ticks.add(0L);
            speeds.add(speedMps);
            yawRates.add(yawRateRadPerS);
        }

        /** Keeps speed and yaw rate constant for {@code durationS} seconds (> 0). */
        public Builder hold(double durationS) {
            return rampTo(speedMps(), yawRateRadPerS(), durationS);
        }

        /**
         * Changes speed and yaw rate linearly to the given values over {@code durationS} seconds.
         *
         * @param speedMps       speed at the end of the ramp (m/s, signed; may not have the opposite sign
         *                       of the current speed: stop at zero first)
         * @param yawRateRadPerS yaw rate at the end of the ramp (rad/s)
         * @param durationS      ramp length (s, > 0, rounded to the 10 ms grid)
         */
        public Builder rampTo(double speedMps, double yawRateRadPerS, double durationS) {
            Check.finite("speedMps", speedMps, "m/s");
            Check.finite("yawRateRadPerS", yawRateRadPerS, "rad/s");
            long n = Math.round(durationS * TICKS_PER_S);
            if (!(durationS > 0) || n < 1) {
                throw new IllegalArgumentException("durationS: must be at least one tick of " + TICK_S
                        + " s, was " + durationS + " s");
            }
            if (speedMps * speedMps() < 0.0) {
                throw new IllegalArgumentException("speedMps: a ramp may not reverse direction (from "
                        + speedMps() + " m/s to " + speedMps + " m/s); ramp to 0 m/s first");
            }
            ticks.add(elapsedTicks() + n);
            speeds.add(speedMps);
            yawRates.add(yawRateRadPerS);
            return this;
        }

        /** Marks the start of a GNSS-denied stretch at the current end of the route. */
        public Builder beginTunnel() {
            if (openTunnel >= 0) {
                throw new IllegalStateException("beginTunnel: a tunnel is already open since tick " + openTunnel);
            }
            openTunnel = elapsedTicks();
            return this;
        }

        /** Marks the end of the open GNSS-denied stretch. */
        public Builder endTunnel() {
            if (openTunnel < 0) {
                throw new IllegalStateException("endTunnel: no tunnel is open");
            }
            tunnels.add(new long[] {openTunnel, elapsedTicks()});
            openTunnel = -1;
            return this;
        }

        /** Marks the start of a stretch of degraded GNSS (urban canyon) at the current end of the route. */
        public Builder beginCanyon() {
            if (openCanyon >= 0) {
                throw new IllegalStateException("beginCanyon: a canyon is already open since tick " + openCanyon);
            }
            openCanyon = elapsedTicks();
            return this;
        }

        /** Marks the end of the open urban canyon. */
        public Builder endCanyon() {
            if (openCanyon < 0) {
                throw new IllegalStateException("endCanyon: no canyon is open");
            }
            canyons.add(new long[] {openCanyon, elapsedTicks()});
            openCanyon = -1;
            return this;
        }

        /** Speed at the current end of the route (m/s). */
        public double speedMps() {
            return speeds.get(speeds.size() - 1);
        }

        /** Yaw rate at the current end of the route (rad/s). */
        public double yawRateRadPerS() {
            return yawRates.get(yawRates.size() - 1);
        }

        /** Length of the route so far in ticks. */
        public long elapsedTicks() {
            return ticks.get(ticks.size() - 1);
        }

        /** Length of the route so far (s). */
        public double elapsedS() {
            return elapsedTicks() * TICK_S;
        }

        /** The finished route; open tunnel or canyon marks are closed at the end. */
        public Route build() {
            if (ticks.size() < 2) {
                throw new IllegalStateException("build: a route needs at least one hold or ramp");
            }
            if (openTunnel >= 0) {
                endTunnel();
            }
            if (openCanyon >= 0) {
                endCanyon();
            }
            int n = ticks.size();
            long[] t = new long[n];
            double[] v = new double[n];
            double[] w = new double[n];
            for (int i = 0; i < n; i++) {
                t[i] = ticks.get(i);
                v[i] = speeds.get(i);
                w[i] = yawRates.get(i);
            }
            return new Route(initialYawRad, t, v, w, tunnels, canyons);
        }
    }
}
