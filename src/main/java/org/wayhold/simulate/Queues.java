package org.wayhold.simulate;

import org.wayhold.settings.Check;

/**
 * Traffic-light queues along the route. At each the car brakes to a stop at the back of the queue,
 * waits, then creeps forward three to six times at a walking pace below a wheel sensor's threshold,
 * edging round a bend or into a turning lane, and launches when the light turns green. Each creep
 * ramps speed and yaw rate together over 1 s, so the path curvature stays constant and the car turns
 * in all by an angle drawn from {@code [minTurnDeg, maxTurnDeg]}, left or right, on a radius of at
 * least 5 m (the creeps are lengthened if needed).
 *
 * @param enabled     whether the route holds queues
 * @param count       queues on the route (>= 1)
 * @param minCreepMps slowest creep (m/s, > 0)
 * @param maxCreepMps fastest creep (m/s, >= minCreepMps)
 * @param minTurnDeg  smallest turn over one queue (deg, >= 0)
 * @param maxTurnDeg  largest turn over one queue (deg, >= minTurnDeg, <= 90)
 */
public record Queues(boolean enabled, int count, double minCreepMps, double maxCreepMps, double minTurnDeg,
                     double maxTurnDeg) {

    /** Three queues, creeping at 0.1-0.3 m/s and turning 10-20 degrees in each (common practice). */
    public static Queues off() {
        return new Queues(false, 3, 0.1, 0.3, 10.0, 20.0);
    }

    public Queues {
        Check.atLeast("route.queues.count", count, 1);
        Check.positive("route.queues.minCreepMps", minCreepMps, "m/s");
        Check.positive("route.queues.maxCreepMps", maxCreepMps, "m/s");
        Check.range("route.queues.maxCreepMps", minCreepMps, maxCreepMps, "m/s");
        if (maxCreepMps > 2.0) {
            throw new IllegalArgumentException("route.queues.maxCreepMps: a creep is at most 2 m/s, was " + maxCreepMps);
        }
        Check.nonNegative("route.queues.minTurnDeg", minTurnDeg, "deg");
        Check.range("route.queues.maxTurnDeg", minTurnDeg, maxTurnDeg, "deg");
        if (maxTurnDeg > 90.0) {
            throw new IllegalArgumentException("route.queues.maxTurnDeg: must be at most 90 deg, was " + maxTurnDeg);
        }
    }

    /** The same magnitudes, switched on. */
    public Queues on() {
        return new Queues(true, count, minCreepMps, maxCreepMps, minTurnDeg, maxTurnDeg);
    }

    /** The same magnitudes, switched on or off. */
    public Queues withEnabled(boolean value) {
        return new Queues(value, count, minCreepMps, maxCreepMps, minTurnDeg, maxTurnDeg);
    }

    /** This many queues, switched on. */
    public Queues withCount(int value) {
        return new Queues(true, value, minCreepMps, maxCreepMps, minTurnDeg, maxTurnDeg);
    }

    /** This creep speed range (m/s), switched on. */
    public Queues withCreepMps(double minMps, double maxMps) {
        return new Queues(true, count, minMps, maxMps, minTurnDeg, maxTurnDeg);
    }

    /** This turn range per queue (deg), switched on. */
    public Queues withTurnDeg(double minDeg, double maxDeg) {
        return new Queues(true, count, minCreepMps, maxCreepMps, minDeg, maxDeg);
    }
}
