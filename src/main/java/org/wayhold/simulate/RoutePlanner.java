package org.wayhold.simulate;

import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;

/**
 * Generates the invented route of {@link RouteSettings}: a start from rest, open-sky stretches of
 * straights, turns and speed changes, one standstill with a short reversing move, and the tunnels and
 * canyons in between.
 *
 * <p>Turns are constant-radius arcs entered and left through linear yaw-rate ramps (continuous yaw
 * rate, no clothoid needed), at a radius no tighter than speed^2 / maxLateralAccelMps2. Every
 * duration is rounded to 0.1 s so each knot also lies on the 50 Hz wheel-speed grid, which makes the
 * trapezoid sum of the wheel-speed readings an exact integral of the true speed.
 */
final class RoutePlanner {

    /** Every duration the planner emits is a multiple of this (s). */
    private static final double GRID_S = 0.1;
    /** Yaw-rate ramp at each end of a turn (s). */
    private static final double TURN_RAMP_S = 2.0;
    /** Smallest turn radius whatever the speed (m): a tight urban corner. */
    private static final double MIN_RADIUS_M = 25.0;
    /** Acceleration used to start and stop (m/s^2): about 0.2 g, firm but ordinary driving. */
    private static final double START_STOP_ACCEL_MPS2 = 2.0;
    /** Acceleration into and out of the reversing speed (m/s^2): a gentle parking manoeuvre. */
    private static final double REVERSE_ACCEL_MPS2 = 0.75;
    /** Rest at the start and between reversing and driving on (s). */
    private static final double PAUSE_S = 2.0;
    /** Angle of the turns the first stretch must hold (rad). */
    private static final double FORCED_TURN_RAD = Math.PI / 2.0;

    private enum Style { OPEN, TUNNEL, CANYON }

    private final RouteSettings rs;
    private final SplittableRandom rng;
    private final Route.Builder b;

    private RoutePlanner(RouteSettings rs, SplittableRandom rng) {
        this.rs = rs;
        this.rng = rng;
        this.b = Route.start(rng.nextDouble() * 2.0 * Math.PI, 0.0, 0.0);
    }

    /**
     * Plans a route.
     *
     * @throws IllegalArgumentException when the tunnels, canyons and the gaps they need do not fit in
     *                                  the drive's duration (the message gives the needed length)
     */
    static Route plan(RouteSettings rs, SplittableRandom rng) {
        return new RoutePlanner(rs, rng).build();
    }

    private Route build() {
        List<Double> zonesS = new ArrayList<>();
        List<Style> zoneStyles = new ArrayList<>();
        int n = Math.max(rs.tunnelsS().size(), rs.canyonsS().size());
        for (int i = 0; i < n; i++) {
            if (i < rs.tunnelsS().size()) {
                zonesS.add(grid(rs.tunnelsS().get(i)));
                zoneStyles.add(Style.TUNNEL);
            }
            if (i < rs.canyonsS().size()) {
                zonesS.add(grid(rs.canyonsS().get(i)));
                zoneStyles.add(Style.CANYON);
            }
        }
        double totalS = grid(rs.durationS());
        double startS = PAUSE_S + rs.maxSpeedMps() / START_STOP_ACCEL_MPS2 + GRID_S;
        boolean warmUp = rs.warmUpS() > 0.0;
        double firstMinS = warmUp
                ? Math.max(rs.warmUpS(), startS + stopBlockMaxS() + 2.0 * forcedTurnMaxS() + 5.0)
                : startS + stopBlockMaxS() + 2.0;
        double zonesSumS = zonesS.stream().mapToDouble(Double::doubleValue).sum();
        double neededS = firstMinS + zonesSumS + zonesS.size() * rs.minGapS();
        if (zonesS.isEmpty()) {
            neededS = firstMinS;
        }
        if (neededS > totalS + 1e-9) {
            throw new IllegalArgumentException(String.format(java.util.Locale.ROOT,
                    "route.durationS: %.1f s is too short; the start, the standstill, %d tunnel(s) and canyon(s)"
                            + " of %.1f s in all and the open-sky gaps need at least %.1f s",
                    totalS, zonesS.size(), zonesSumS, Math.ceil(neededS)));
        }
        // Share the slack among the gaps at random, so zones do not sit at the same place on every seed.
        double[] gapsS = new double[zonesS.size() + 1];
        double[] weights = new double[gapsS.length];
        double weightSum = 0;
        for (int i = 0; i < weights.length; i++) {
            weights[i] = 0.5 + rng.nextDouble();
            weightSum += weights[i];
        }
        double slackS = totalS - neededS;
        double assignedS = 0;
        for (int i = 0; i < gapsS.length; i++) {
            double minS = i == 0 ? firstMinS : rs.minGapS();
            double extraS = i == gapsS.length - 1 ? slackS - assignedS : gridFloor(slackS * weights[i] / weightSum);
            assignedS += extraS;
            gapsS[i] = minS + extraS;
        }
        if (zonesS.isEmpty()) {
            gapsS[0] = totalS;
        }

        long firstEnd = ticks(gapsS[0]);
        buildFirstStretch(firstEnd, warmUp);
        long at = firstEnd;
        for (int i = 0; i < zonesS.size(); i++) {
            Style style = zoneStyles.get(i);
            if (style == Style.TUNNEL) {
                b.beginTunnel();
            } else {
                b.beginCanyon();
            }
            at += ticks(zonesS.get(i));
            fill(at, style);
            if (style == Style.TUNNEL) {
                b.endTunnel();
            } else {
                b.endCanyon();
            }
            at += ticks(gapsS[i + 1]);
            fill(at, Style.OPEN);
        }
        // Rounding can leave the last gap a tick or so short of the requested end; pad it.
        long totalTicks = ticks(totalS);
        if (b.elapsedTicks() < totalTicks) {
            b.hold((totalTicks - b.elapsedTicks()) * Route.TICK_S);
        }
        return b.build();
    }

    /**
     * Start from rest, drive, stand still and reverse, drive on. With a warm-up, a left or right turn
     * comes before the standstill and the opposite turn after it, whatever the random manoeuvres do.
     */
    private void buildFirstStretch(long endTick, boolean warmUp) {
        b.hold(PAUSE_S);
        double v0 = uniform(rs.minSpeedMps(), 0.5 * (rs.minSpeedMps() + rs.maxSpeedMps()));
        b.rampTo(v0, 0.0, grid(v0 / START_STOP_ACCEL_MPS2));
        int firstTurn = rng.nextBoolean() ? 1 : -1;
        long turnsTicks = warmUp ? 2 * ticks(forcedTurnMaxS()) : 0;
        long spare = Math.max(0, endTick - b.elapsedTicks() - ticks(stopBlockMaxS()) - turnsTicks);
        long before = b.elapsedTicks() + gridTicks(spare * uniform(0.3, 0.6));
        if (warmUp) {
            turn(firstTurn * FORCED_TURN_RAD, turnRadiusM(b.speedMps(), Style.OPEN));
        }
        fill(before, Style.OPEN);
        stopAndReverse();
        if (warmUp) {
            turn(-firstTurn * FORCED_TURN_RAD, turnRadiusM(b.speedMps(), Style.OPEN));
        }
        fill(endTick, Style.OPEN);
    }

    /** Decelerate to rest, stand, reverse a few metres, pause, drive on (a parking manoeuvre). */
    private void stopAndReverse() {
        b.rampTo(0.0, 0.0, grid(b.speedMps() / START_STOP_ACCEL_MPS2));
        b.hold(grid(rs.standstillS()));
        double vr = rs.reverseSpeedMps();
        double rampS = grid(Math.min(vr / REVERSE_ACCEL_MPS2, rs.reverseDistanceM() / vr));
        // The two ramps cover vr * rampS metres (two triangles); the hold covers the rest.
        double holdS = grid((rs.reverseDistanceM() - vr * rampS) / vr);
        b.rampTo(-vr, 0.0, rampS);
        if (holdS >= GRID_S) {
            b.hold(holdS);
        }
        b.rampTo(0.0, 0.0, rampS);
        b.hold(PAUSE_S);
        double v = uniform(rs.minSpeedMps(), rs.maxSpeedMps());
        b.rampTo(v, 0.0, grid(v / START_STOP_ACCEL_MPS2));
    }

    private double stopBlockMaxS() {
        double vr = rs.reverseSpeedMps();
        double rampS = grid(Math.min(vr / REVERSE_ACCEL_MPS2, rs.reverseDistanceM() / vr));
        double holdS = Math.max(0.0, grid((rs.reverseDistanceM() - vr * rampS) / vr));
        return 2.0 * grid(rs.maxSpeedMps() / START_STOP_ACCEL_MPS2) + grid(rs.standstillS())
                + 2.0 * rampS + holdS + PAUSE_S + 4 * GRID_S;
    }

    private double forcedTurnMaxS() {
        double slowest = Math.max(rs.maxSpeedMps() / rs.maxLateralAccelMps2(), MIN_RADIUS_M / rs.minSpeedMps());
        return grid(FORCED_TURN_RAD * 1.5 * slowest + 2.0 * TURN_RAMP_S) + 4 * GRID_S;
    }

    /** Drives manoeuvres of the given style until {@code endTick}, ending with yaw rate 0. */
    private void fill(long endTick, Style style) {
        while (b.elapsedTicks() < endTick) {
            long remaining = endTick - b.elapsedTicks();
            double pick = rng.nextDouble();
            double v = b.speedMps();
            if (pick < 0.35) {
                double sign = rng.nextBoolean() ? 1.0 : -1.0;
                double angleRad = Math.toRadians(switch (style) {
                    case OPEN -> uniform(30.0, 110.0);
                    case TUNNEL -> uniform(10.0, 40.0);
                    case CANYON -> uniform(80.0, 100.0);
                });
                double radiusM = turnRadiusM(v, style);
                if (ticks(turnDurationS(angleRad, radiusM, v)) <= remaining) {
                    turn(sign * angleRad, radiusM);
                    continue;
                }
            } else if (pick < 0.65) {
                double target = switch (style) {
                    case OPEN -> uniform(rs.minSpeedMps(), rs.maxSpeedMps());
                    case TUNNEL -> uniform(rs.minSpeedMps(), rs.maxSpeedMps());
                    case CANYON -> uniform(rs.minSpeedMps(), Math.min(rs.maxSpeedMps(), rs.minSpeedMps() + 3.0));
                };
                double accel = style == Style.TUNNEL ? uniform(0.3, 0.8) : uniform(0.6, 1.8);
                double durationS = grid(Math.abs(target - v) / accel);
                if (ticks(durationS) <= remaining) {
                    b.rampTo(target, 0.0, durationS);
                    continue;
                }
            }
            double cruiseS = switch (style) {
                case OPEN -> uniform(4.0, 15.0);
                case TUNNEL -> uniform(5.0, 20.0);
                case CANYON -> uniform(3.0, 10.0);
            };
            b.hold(Math.min(remaining, ticks(grid(cruiseS))) * Route.TICK_S);
        }
    }

    private double turnRadiusM(double speedMps, Style style) {
        double tightest = Math.max(speedMps * speedMps / rs.maxLateralAccelMps2(), MIN_RADIUS_M);
        return switch (style) {
            case OPEN -> tightest * uniform(1.0, 1.5);
            case TUNNEL -> Math.max(tightest, uniform(300.0, 800.0));
            case CANYON -> tightest * uniform(1.0, 1.2);
        };
    }

    private static double turnDurationS(double angleRad, double radiusM, double speedMps) {
        double yawRate = Math.abs(speedMps) / radiusM;
        double holdS = Math.max(GRID_S, grid(Math.abs(angleRad) / yawRate - TURN_RAMP_S));
        return 2.0 * TURN_RAMP_S + holdS;
    }

    /**
     * A constant-speed turn: the yaw rate ramps linearly to speed/radius, holds, and ramps back to 0.
     * The two ramps turn the vehicle by yawRate * TURN_RAMP_S together, so the hold supplies the rest.
     */
    private void turn(double angleRad, double radiusM) {
        double v = b.speedMps();
        double yawRate = Math.signum(angleRad) * Math.abs(v) / radiusM;
        double holdS = Math.max(GRID_S, grid(Math.abs(angleRad / yawRate) - TURN_RAMP_S));
        b.rampTo(v, yawRate, TURN_RAMP_S);
        b.hold(holdS);
        b.rampTo(v, 0.0, TURN_RAMP_S);
    }

    private double uniform(double lo, double hi) {
        return lo + (hi - lo) * rng.nextDouble();
    }

    private static double grid(double s) {
        return Math.max(GRID_S, Math.round(s / GRID_S) * GRID_S);
    }

    private static double gridFloor(double s) {
        return Math.max(0.0, Math.floor(s / GRID_S) * GRID_S);
    }

    private static long ticks(double s) {
        return Math.round(s * Route.TICKS_PER_S);
    }

    private static long gridTicks(double t) {
        long step = ticks(GRID_S);
        return Math.max(0, Math.round(t / step) * step);
    }
}
