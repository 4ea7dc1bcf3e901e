package org.wayhold.simulate;

import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;

/**
 * Generates the invented route of {@link RouteSettings}: a start from rest, open-sky stretches of
 * straights, turns and speed changes, one standstill with a short reversing move, and the tunnels,
 * canyons, motorway stretches, garage, queues and long stops in between.
 *
 * <p>Turns are constant-radius arcs entered and left through linear yaw-rate ramps (continuous yaw
 * rate, no clothoid needed), at a radius no tighter than speed^2 / maxLateralAccelMps2. Every
 * duration is rounded to 0.1 s so each knot also lies on the 50 Hz wheel-speed grid, which makes the
 * trapezoid sum of the wheel-speed readings an exact integral of the true speed.
 *
 * <p>The garage, queues and long stops are built from fixed manoeuvres; the planner reserves an upper
 * bound of their length (rounded up to the 0.1 s grid, so later knots stay on it) and fills what they
 * leave over with open-sky driving, so they never push the drive past its duration.
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
    /** Slip-road acceleration onto and off a motorway (m/s^2; common practice for merging). */
    private static final double SLIP_ROAD_ACCEL_MPS2 = 1.5;
    /** Tightest creeping radius (m): about the smallest circle a car can drive (common practice). */
    private static final double MIN_CREEP_RADIUS_M = 5.0;
    /** Speed and yaw-rate ramp of one creep (s). */
    private static final double CREEP_RAMP_S = 1.0;
    /** Creeps per queue, and the ranges of their holds and of the waits (s) between them. */
    private static final int MIN_CREEPS = 3;
    private static final int MAX_CREEPS = 5;
    private static final double MAX_CREEP_HOLD_S = 6.0;
    private static final double MAX_CREEP_WAIT_S = 5.0;
    private static final double MAX_FIRST_WAIT_S = 10.0;
    /** Garage: ramps into and out of the helix, straights at the entrance and on the deck (s). */
    private static final double HELIX_RAMP_S = 2.0;
    private static final double GARAGE_STRAIGHT_S = 3.0;
    /** Garage: radius of the turn round on the top deck (m) and the reverse out of the bay. */
    private static final double DECK_TURN_RADIUS_M = 6.0;
    private static final double BAY_REVERSE_MPS = 1.0;
    private static final double BAY_REVERSE_HOLD_S = 4.0;

    private enum Style { OPEN, TUNNEL, CANYON, MOTORWAY, GARAGE, QUEUE, LONG_STOP }

    private final RouteSettings rs;
    private final SplittableRandom rng;
    private final Route.Builder b;
    private final HillProfile hills;

    private RoutePlanner(RouteSettings rs, SplittableRandom rng, SplittableRandom hillRng) {
        this.rs = rs;
        this.rng = rng;
        this.b = Route.start(rng.nextDouble() * 2.0 * Math.PI, 0.0, 0.0);
        this.hills = rs.hills().enabled() ? new HillProfile(rs.hills(), hillRng) : null;
    }

    /**
     * Plans a route.
     *
     * @param rng     the route's random stream (manoeuvres, speeds, placement)
     * @param hillRng the grades' own stream, so a route with hills turns and brakes like the flat one
     * @throws IllegalArgumentException when the zones and the gaps they need do not fit in the drive's
     *                                  duration (the message gives the needed length)
     */
    static Route plan(RouteSettings rs, SplittableRandom rng, SplittableRandom hillRng) {
        return new RoutePlanner(rs, rng, hillRng).build();
    }

    private Route build() {
        List<Double> zonesS = new ArrayList<>();
        List<Style> zoneStyles = new ArrayList<>();
        List<Double> motorwayS = rs.motorway().activeStretchesS();
        int garages = rs.garage().enabled() ? 1 : 0;
        int queues = rs.queues().enabled() ? rs.queues().count() : 0;
        int longStops = rs.longStops().enabled() ? rs.longStops().count() : 0;
        int n = Math.max(Math.max(rs.tunnelsS().size(), rs.canyonsS().size()),
                Math.max(Math.max(motorwayS.size(), garages), Math.max(queues, longStops)));
        for (int i = 0; i < n; i++) {
            if (i < rs.tunnelsS().size()) {
                zonesS.add(grid(rs.tunnelsS().get(i)));
                zoneStyles.add(Style.TUNNEL);
            }
            if (i < rs.canyonsS().size()) {
                zonesS.add(grid(rs.canyonsS().get(i)));
                zoneStyles.add(Style.CANYON);
            }
            if (i < motorwayS.size()) {
                zonesS.add(grid(motorwayS.get(i)));
                zoneStyles.add(Style.MOTORWAY);
            }
            if (i < garages) {
                zonesS.add(gridCeil(garageMaxS()));
                zoneStyles.add(Style.GARAGE);
            }
            if (i < queues) {
                zonesS.add(gridCeil(queueMaxS()));
                zoneStyles.add(Style.QUEUE);
            }
            if (i < longStops) {
                zonesS.add(gridCeil(longStopMaxS()));
                zoneStyles.add(Style.LONG_STOP);
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
                    "route.durationS: %.1f s is too short; the start, the standstill, %d zone(s) (tunnels, canyons,"
                            + " motorway stretches, garage, queues, long stops) of %.1f s in all and the open-sky gaps"
                            + " need at least %.1f s",
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
            at += ticks(zonesS.get(i));
            switch (style) {
                case TUNNEL, CANYON -> {
                    Zone zone = style == Style.TUNNEL ? Zone.TUNNEL : Zone.CANYON;
                    b.begin(zone);
                    fill(at, style);
                    b.end(zone);
                }
                case MOTORWAY -> motorway(at);
                case GARAGE -> garage();
                case QUEUE -> queue();
                case LONG_STOP -> longStop();
                default -> throw new IllegalStateException("no zone of style " + style);
            }
            // The fixed manoeuvres end before their reserved length; drive on until it is used up.
            fill(at, Style.OPEN);
            at += ticks(gapsS[i + 1]);
            fill(at, Style.OPEN);
        }
        // Rounding can leave the last gap a tick or so short of the requested end; pad it.
        long totalTicks = ticks(totalS);
        if (b.elapsedTicks() < totalTicks) {
            hold((totalTicks - b.elapsedTicks()) * Route.TICK_S);
        }
        return b.build();
    }

    /**
     * Start from rest, drive, stand still and reverse, drive on. With a warm-up, a left or right turn
     * comes before the standstill and the opposite turn after it, whatever the random manoeuvres do.
     */
    private void buildFirstStretch(long endTick, boolean warmUp) {
        hold(PAUSE_S);
        double v0 = uniform(rs.minSpeedMps(), 0.5 * (rs.minSpeedMps() + rs.maxSpeedMps()));
        launch(v0);
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
        ramp(0.0, 0.0, grid(b.speedMps() / START_STOP_ACCEL_MPS2));
        hold(grid(rs.standstillS()));
        double vr = rs.reverseSpeedMps();
        double rampS = grid(Math.min(vr / REVERSE_ACCEL_MPS2, rs.reverseDistanceM() / vr));
        // The two ramps cover vr * rampS metres (two triangles); the hold covers the rest.
        double holdS = grid((rs.reverseDistanceM() - vr * rampS) / vr);
        ramp(-vr, 0.0, rampS);
        if (holdS >= GRID_S) {
            hold(holdS);
        }
        ramp(0.0, 0.0, rampS);
        hold(PAUSE_S);
        double v = uniform(rs.minSpeedMps(), rs.maxSpeedMps());
        launch(v);
    }

    /**
     * From rest to {@code v} straight ahead: at the ordinary 2 m/s^2, or with hard launches first at the
     * launch acceleration for the launch's length (shorter when v comes sooner), then at 2 m/s^2.
     */
    private void launch(double v) {
        HardLaunches h = rs.launches();
        if (!h.enabled()) {
            ramp(v, 0.0, grid(v / START_STOP_ACCEL_MPS2));
            return;
        }
        double launchS = grid(Math.min(h.durationS(), v / h.accelMps2()));
        double launchedMps = Math.min(v, h.accelMps2() * launchS);
        ramp(launchedMps, 0.0, launchS);
        if (v - launchedMps > 1e-9) {
            ramp(v, 0.0, grid((v - launchedMps) / START_STOP_ACCEL_MPS2));
        }
    }

    /** Longest a start from rest to the highest cruising speed can take (s). */
    private double launchMaxS() {
        return grid(rs.maxSpeedMps() / START_STOP_ACCEL_MPS2) + 2 * GRID_S;
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

    /** Brake to rest, stand for minutes, drive off. */
    private void longStop() {
        ramp(0.0, 0.0, grid(b.speedMps() / START_STOP_ACCEL_MPS2));
        b.begin(Zone.LONG_STOP);
        hold(grid(rs.longStops().durationS()));
        b.end(Zone.LONG_STOP);
        launch(uniform(rs.minSpeedMps(), rs.maxSpeedMps()));
    }

    private double longStopMaxS() {
        return grid(rs.maxSpeedMps() / START_STOP_ACCEL_MPS2) + grid(rs.longStops().durationS()) + launchMaxS()
                + 2 * GRID_S;
    }

    /**
     * A traffic-light queue: brake to the back of it, wait, creep forward a few times on a constant
     * curvature that turns the car by the drawn angle in all, launch on green.
     */
    private void queue() {
        Queues q = rs.queues();
        ramp(0.0, 0.0, grid(b.speedMps() / START_STOP_ACCEL_MPS2));
        b.begin(Zone.QUEUE);
        hold(grid(uniform(5.0, MAX_FIRST_WAIT_S)));
        int creeps = MIN_CREEPS + rng.nextInt(MAX_CREEPS - MIN_CREEPS + 1);
        double[] creepMps = new double[creeps];
        double[] holdS = new double[creeps];
        double[] waitS = new double[creeps];
        double speedSum = 0.0;
        for (int c = 0; c < creeps; c++) {
            creepMps[c] = uniform(q.minCreepMps(), q.maxCreepMps());
            holdS[c] = grid(uniform(3.0, MAX_CREEP_HOLD_S));
            waitS[c] = grid(uniform(2.0, MAX_CREEP_WAIT_S));
            speedSum += creepMps[c];
        }
        double angleRad = (rng.nextBoolean() ? 1.0 : -1.0) * Math.toRadians(uniform(q.minTurnDeg(), q.maxTurnDeg()));
        // Each creep covers v * (ramp + hold): two 1 s ramps from and to rest make one second at v.
        double distanceM = creepDistanceM(creepMps, holdS);
        double neededM = Math.abs(angleRad) * MIN_CREEP_RADIUS_M;
        if (distanceM < neededM) {
            double extraS = gridCeil((neededM - distanceM) / speedSum);
            for (int c = 0; c < creeps; c++) {
                holdS[c] += extraS;
            }
            distanceM = creepDistanceM(creepMps, holdS);
        }
        // Speed and yaw rate ramp together, so the yaw rate is curvature * speed throughout and the car
        // turns by curvature * distance: exactly the drawn angle.
        double curvaturePerM = angleRad / distanceM;
        for (int c = 0; c < creeps; c++) {
            ramp(creepMps[c], curvaturePerM * creepMps[c], CREEP_RAMP_S);
            hold(holdS[c]);
            ramp(0.0, 0.0, CREEP_RAMP_S);
            hold(waitS[c]);
        }
        b.end(Zone.QUEUE);
        launch(uniform(rs.minSpeedMps(), rs.maxSpeedMps()));
    }

    private static double creepDistanceM(double[] creepMps, double[] holdS) {
        double sum = 0.0;
        for (int c = 0; c < creepMps.length; c++) {
            sum += creepMps[c] * (CREEP_RAMP_S + holdS[c]);
        }
        return sum;
    }

    private double queueMaxS() {
        Queues q = rs.queues();
        // Lengthening the holds adds at most (needed distance / slowest creep) plus a grid step per creep.
        double lengtheningS = Math.toRadians(q.maxTurnDeg()) * MIN_CREEP_RADIUS_M / q.minCreepMps()
                + MAX_CREEPS * GRID_S;
        return grid(rs.maxSpeedMps() / START_STOP_ACCEL_MPS2) + MAX_FIRST_WAIT_S
                + MAX_CREEPS * (2 * CREEP_RAMP_S + MAX_CREEP_HOLD_S + MAX_CREEP_WAIT_S) + lengtheningS
                + launchMaxS() + 4 * GRID_S;
    }

    /**
     * A motorway stretch ending at {@code endTick}: up the slip road, motorway driving, down the slip
     * road back to a town speed.
     */
    private void motorway(long endTick) {
        Motorway m = rs.motorway();
        b.begin(Zone.MOTORWAY);
        double cruise = uniform(m.minSpeedMps(), m.maxSpeedMps());
        double exit = uniform(rs.minSpeedMps(), rs.maxSpeedMps());
        double onS = grid(Math.abs(cruise - b.speedMps()) / SLIP_ROAD_ACCEL_MPS2);
        double offMaxS = grid(Math.max(Math.abs(m.maxSpeedMps() - exit), Math.abs(m.minSpeedMps() - exit))
                / SLIP_ROAD_ACCEL_MPS2);
        long motorwayEnd = endTick - ticks(offMaxS);
        if (b.elapsedTicks() + ticks(onS) + ticks(10.0) > motorwayEnd) {
            throw new IllegalArgumentException(String.format(java.util.Locale.ROOT,
                    "route.motorway.stretchesS[]: %.1f s is too short for both slip roads at %.1f m/s^2 and 10 s "
                            + "of motorway between %.1f and %.1f m/s",
                    (endTick - b.elapsedTicks()) * Route.TICK_S, SLIP_ROAD_ACCEL_MPS2, rs.minSpeedMps(),
                    m.maxSpeedMps()));
        }
        ramp(cruise, 0.0, onS);
        fill(motorwayEnd, Style.MOTORWAY);
        double offS = grid(Math.abs(b.speedMps() - exit) / SLIP_ROAD_ACCEL_MPS2);
        long waitTicks = endTick - b.elapsedTicks() - ticks(offS);
        if (waitTicks > 0) {
            hold(waitTicks * Route.TICK_S);
        }
        ramp(exit, 0.0, offS);
        b.end(Zone.MOTORWAY);
    }

    /**
     * The garage visit of {@link Garage}: slow to ramp speed, enter (GNSS denied), climb the helix,
     * park on the top deck, back out, turn round, descend the helix turning the other way, leave.
     */
    private void garage() {
        Garage g = rs.garage();
        double v = g.speedMps();
        double grade = g.helixGradeRad();
        double helixS = helixHoldS(g);
        double yawRate = v * StrictMath.cos(grade) / g.radiusM();
        double sense = rng.nextBoolean() ? 1.0 : -1.0;
        // Slow down to the entrance on the level.
        b.rampTo(v, 0.0, 0.0, grid(Math.abs(b.speedMps() - v) / START_STOP_ACCEL_MPS2));
        b.begin(Zone.GARAGE);
        b.hold(GARAGE_STRAIGHT_S);
        helix(sense * yawRate, grade, helixS);
        b.hold(GARAGE_STRAIGHT_S);
        b.rampTo(0.0, 0.0, grid(v / START_STOP_ACCEL_MPS2));
        b.hold(grid(g.parkS()));
        b.rampTo(-BAY_REVERSE_MPS, 0.0, CREEP_RAMP_S);
        b.hold(BAY_REVERSE_HOLD_S);
        b.rampTo(0.0, 0.0, CREEP_RAMP_S);
        b.hold(PAUSE_S);
        b.rampTo(v, 0.0, grid(v / START_STOP_ACCEL_MPS2));
        turnLevel(sense * Math.PI, DECK_TURN_RADIUS_M);
        b.hold(GARAGE_STRAIGHT_S);
        helix(-sense * yawRate, -grade, helixS);
        b.hold(GARAGE_STRAIGHT_S);
        b.end(Zone.GARAGE);
        b.rampTo(uniform(rs.minSpeedMps(), rs.maxSpeedMps()), 0.0, grid(rs.maxSpeedMps() / START_STOP_ACCEL_MPS2));
    }

    /** One helix at constant speed: grade and yaw rate ramp in over 2 s, hold, and ramp out. */
    private void helix(double yawRateRadPerS, double gradeRad, double holdS) {
        double v = b.speedMps();
        b.rampTo(v, yawRateRadPerS, gradeRad, HELIX_RAMP_S);
        b.hold(holdS);
        b.rampTo(v, 0.0, 0.0, HELIX_RAMP_S);
    }

    /**
     * Length of the helix's constant part (s) for the garage's height: each 2 s ramp of a grade growing
     * linearly from 0 to gamma climbs v * (2 / gamma) * (1 - cos gamma) (the integral of v sin(gamma t / 2)
     * over 2 s), the constant part v sin(gamma) per second.
     */
    private static double helixHoldS(Garage g) {
        double v = g.speedMps();
        double grade = g.helixGradeRad();
        double heightM = g.storeys() * g.storeyHeightM();
        double rampsM = 2.0 * v * (HELIX_RAMP_S / grade) * (1.0 - StrictMath.cos(grade));
        return grid((heightM - rampsM) / (v * StrictMath.sin(grade)));
    }

    private double garageMaxS() {
        Garage g = rs.garage();
        double v = g.speedMps();
        double turnS = turnDurationS(Math.PI, DECK_TURN_RADIUS_M, v);
        return grid(Math.max(rs.maxSpeedMps(), v) / START_STOP_ACCEL_MPS2) + 4 * GARAGE_STRAIGHT_S
                + 2 * (2 * HELIX_RAMP_S + helixHoldS(g)) + 2 * grid(v / START_STOP_ACCEL_MPS2) + grid(g.parkS())
                + 2 * CREEP_RAMP_S + BAY_REVERSE_HOLD_S + PAUSE_S + turnS
                + grid(rs.maxSpeedMps() / START_STOP_ACCEL_MPS2) + 4 * GRID_S;
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
                    case TUNNEL -> uniform(10.0, 40.0);
                    case CANYON -> uniform(80.0, 100.0);
                    case MOTORWAY -> uniform(5.0, 25.0);
                    default -> uniform(30.0, 110.0);
                });
                double radiusM = turnRadiusM(v, style);
                if (ticks(turnDurationS(angleRad, radiusM, v)) <= remaining) {
                    turn(sign * angleRad, radiusM);
                    continue;
                }
            } else if (pick < 0.65) {
                double target = switch (style) {
                    case CANYON -> uniform(rs.minSpeedMps(), Math.min(rs.maxSpeedMps(), rs.minSpeedMps() + 3.0));
                    case MOTORWAY -> uniform(rs.motorway().minSpeedMps(), rs.motorway().maxSpeedMps());
                    default -> uniform(rs.minSpeedMps(), rs.maxSpeedMps());
                };
                double accel = style == Style.TUNNEL || style == Style.MOTORWAY ? uniform(0.3, 0.8) : uniform(0.6, 1.8);
                double durationS = grid(Math.abs(target - v) / accel);
                if (ticks(durationS) <= remaining) {
                    ramp(target, 0.0, durationS);
                    continue;
                }
            }
            double cruiseS = switch (style) {
                case TUNNEL -> uniform(5.0, 20.0);
                case CANYON -> uniform(3.0, 10.0);
                case MOTORWAY -> uniform(10.0, 30.0);
                default -> uniform(4.0, 15.0);
            };
            hold(Math.min(remaining, ticks(grid(cruiseS))) * Route.TICK_S);
        }
    }

    private double turnRadiusM(double speedMps, Style style) {
        double tightest = Math.max(speedMps * speedMps / rs.maxLateralAccelMps2(), MIN_RADIUS_M);
        return switch (style) {
            case TUNNEL -> Math.max(tightest, uniform(300.0, 800.0));
            case CANYON -> tightest * uniform(1.0, 1.2);
            case MOTORWAY -> Math.max(tightest, uniform(1000.0, 3000.0));
            default -> tightest * uniform(1.0, 1.5);
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
        ramp(v, yawRate, TURN_RAMP_S);
        hold(holdS);
        ramp(v, 0.0, TURN_RAMP_S);
    }

    /** The same turn on a level floor (the garage's deck), whatever the hills do. */
    private void turnLevel(double angleRad, double radiusM) {
        double v = b.speedMps();
        double yawRate = Math.signum(angleRad) * Math.abs(v) / radiusM;
        double holdS = Math.max(GRID_S, grid(Math.abs(angleRad / yawRate) - TURN_RAMP_S));
        b.rampTo(v, yawRate, 0.0, TURN_RAMP_S);
        b.hold(holdS);
        b.rampTo(v, 0.0, 0.0, TURN_RAMP_S);
    }

    /**
     * Appends a ramp to the route; with hills, the grade at its end is the profile's grade at the
     * distance the ramp ends at.
     */
    private void ramp(double speedMps, double yawRateRadPerS, double durationS) {
        if (hills == null) {
            b.rampTo(speedMps, yawRateRadPerS, durationS);
            return;
        }
        double lengthS = Math.round(durationS * Route.TICKS_PER_S) * Route.TICK_S;
        double endM = b.distanceM() + 0.5 * (Math.abs(b.speedMps()) + Math.abs(speedMps)) * lengthS;
        b.rampTo(speedMps, yawRateRadPerS, hills.gradeRadAt(endM), durationS);
    }

    /** Keeps speed and yaw rate for {@code durationS}; the grade follows the hills when there are any. */
    private void hold(double durationS) {
        ramp(b.speedMps(), b.yawRateRadPerS(), durationS);
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

    private static double gridCeil(double s) {
        return Math.max(GRID_S, Math.ceil(s / GRID_S - 1e-9) * GRID_S);
    }

    private static long ticks(double s) {
        return Math.round(s * Route.TICKS_PER_S);
    }

    private static long gridTicks(double t) {
        long step = ticks(GRID_S);
        return Math.max(0, Math.round(t / step) * step);
    }

    /**
     * The road's grade as a function of the distance driven: piecewise linear between knots placed
     * every {@code minLengthM}-{@code maxLengthM} metres, each with a grade drawn uniformly from
     * +-maxGradePct (as rise over run, turned into an angle). The first knot, at the start, is level.
     * Knots are drawn as the route needs them, from the hills' own random stream.
     */
    private static final class HillProfile {
        private final Hills hills;
        private final SplittableRandom rng;
        private final List<Double> knotM = new ArrayList<>();
        private final List<Double> knotGradeRad = new ArrayList<>();

        HillProfile(Hills hills, SplittableRandom rng) {
            this.hills = hills;
            this.rng = rng;
            knotM.add(0.0);
            knotGradeRad.add(0.0);
        }

        double gradeRadAt(double distanceM) {
            while (knotM.get(knotM.size() - 1) <= distanceM) {
                double step = hills.minLengthM() + (hills.maxLengthM() - hills.minLengthM()) * rng.nextDouble();
                double pct = hills.maxGradePct() * (2.0 * rng.nextDouble() - 1.0);
                knotM.add(knotM.get(knotM.size() - 1) + step);
                knotGradeRad.add(StrictMath.atan(pct / 100.0));
            }
            int j = 1;
            while (knotM.get(j) < distanceM) {
                j++;
            }
            double m0 = knotM.get(j - 1);
            double f = (distanceM - m0) / (knotM.get(j) - m0);
            return knotGradeRad.get(j - 1) + f * (knotGradeRad.get(j) - knotGradeRad.get(j - 1));
        }
    }
}
