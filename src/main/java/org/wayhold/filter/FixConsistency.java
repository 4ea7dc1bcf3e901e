package org.wayhold.filter;

import static org.wayhold.filter.StateIndex.EAST;
import static org.wayhold.filter.StateIndex.NORTH;
import static org.wayhold.filter.StateIndex.SIZE;
import static org.wayhold.filter.StateIndex.SPEED_SCALE;
import static org.wayhold.filter.StateIndex.YAW;

import org.wayhold.filter.FilterState.Slot;

/**
 * Tests fixes against the odometry: over 5 to 20 s the odometry's own path (never corrected by fixes)
 * moves by what the vehicle really moved, to within its heading and scale uncertainty times the
 * distance, while a receiver among tall buildings wanders by metres to tens of metres with the
 * reflections it tracks. Fixes that agree with each other can still disagree with the odometry; this
 * is the test that catches them.
 *
 * <p>The difference d between the fixes' displacement and the odometry's has variance
 * <pre>
 *   white(new) + white(old) + 2 sigma_c^2 (1 - exp(-dt / tau)) + dist^2 (var(yaw) + var(scale) + k^2)
 * </pre>
 * (the Gauss-Markov error's change over dt, and the relative motion error; k = {@link #ODOMETRY_SHARE}
 * for what the states do not model). When d'd over that variance passes the 2-dof chi-square quantile
 * at 0.999, the two disagree, and either may be wrong: fixes among buildings wander, and an odometry
 * glitch turns the heading. The missing variance, d'd / 2 less what was claimed, is shared in
 * proportion to the claims: the fixes' part is added to the fixes that follow (fading with
 * {@link #FADE_S}), the odometry's to the variances of position and yaw. Both sides then admit what they did not
 * know, and the next fixes settle which was wrong.
 */
final class FixConsistency {

    /** 2-dof chi-square quantile at 0.999: -2 ln(0.001) (NIST/SEMATECH e-Handbook 1.3.6.7.4: 13.816). */
    static final double GATE = 13.815510557964274;
    /** Shortest and longest span of the test (s). */
    static final double MIN_SPAN_S = 5.0;
    static final double MAX_SPAN_S = 20.0;
    /** The span the test prefers (s): long enough to see a wandering bias, short for the odometry. */
    static final double PREFERRED_SPAN_S = 10.0;
    /** Fixes enter the trail at most this often (s). */
    static final double TRAIL_SPACING_S = 1.0;
    /** Share of the distance the odometry may err by over the span beyond its states (common practice). */
    static final double ODOMETRY_SHARE = 0.01;
    /** Time constant with which the added variance fades once fixes agree again (s). */
    static final double FADE_S = 20.0;
    /**
     * Consecutive fixes that must fail the test before it acts (count): a single outlier fails it once,
     * a receiver tracking reflections fails it fix after fix.
     */
    static final int CONFIRMING_TESTS = 3;
    /** Added variance above which the fixes count as inconsistent for the pose's reasons (m^2). */
    static final double REPORTED_VAR_M2 = 1.0;

    private final double correlationTimeS;

    FixConsistency(double correlationTimeS) {
        this.correlationTimeS = correlationTimeS;
    }

    /**
     * Tests a fix against the trail and returns the variance to add to it per axis (m^2): the faded
     * earlier inconsistency, raised by this fix's own when it disagrees.
     *
     * @param whiteVar the fix's white variance per axis before any addition (m^2)
     */
    double extraVarianceM2(FilterState s, double eastM, double northM, double whiteVar) {
        double t = s.get(Slot.T_REL);
        double extra = s.get(Slot.INCONSISTENCY_VAR_M2);
        double since = t - s.get(Slot.INCONSISTENT_T_REL);
        if (extra > 0.0 && since > 0.0) {
            extra *= Math.exp(-since / FADE_S);
        }
        double[] old = reference(s, t);
        if (old != null) {
            double dt = t - old[0];
            double de = (eastM - old[1]) - (s.get(Slot.ODOMETRY_EAST_M) - old[3]);
            double dn = (northM - old[2]) - (s.get(Slot.ODOMETRY_NORTH_M) - old[4]);
            double dist = Math.hypot(s.get(Slot.ODOMETRY_EAST_M) - old[3], s.get(Slot.ODOMETRY_NORTH_M) - old[4]);
            double relVar = Math.max(s.p[YAW * SIZE + YAW], 0.0) + Math.max(s.p[SPEED_SCALE * SIZE + SPEED_SCALE], 0.0)
                    + ODOMETRY_SHARE * ODOMETRY_SHARE;
            double gnssVar = whiteVar + old[5]
                    + 2.0 * s.get(Slot.CORRELATED_VAR_M2) * (1.0 - Math.exp(-dt / correlationTimeS));
            double odometryVar = dist * dist * relVar;
            double var = gnssVar + odometryVar;
            double d2 = de * de + dn * dn;
            if (d2 / var <= GATE) {
                s.set(Slot.INCONSISTENT_RUN, 0);
            } else if (s.whole(Slot.INCONSISTENT_RUN) + 1 < CONFIRMING_TESTS) {
                // One fix far off is an outlier for the gate to catch, not a wandering receiver.
                s.set(Slot.INCONSISTENT_RUN, s.whole(Slot.INCONSISTENT_RUN) + 1);
            } else {
                // Either side may be wrong: a reflected signal moves the fixes, a heading glitch turns
                // the odometry. The shortfall of variance is shared in proportion to what each side
                // claimed, so neither is trusted more than the evidence allows.
                double shortfall = 0.5 * d2 - var;
                double forFixes = 0.5 * shortfall * gnssVar / var;
                if (forFixes > extra) {
                    extra = forFixes;
                }
                if (dist > 0.0) {
                    // The odometry's share: a heading error over the span, and the position error it left.
                    double forOdometry = shortfall * odometryVar / var;
                    s.p[YAW * SIZE + YAW] += forOdometry / (dist * dist);
                    s.p[EAST * SIZE + EAST] += forOdometry;
                    s.p[NORTH * SIZE + NORTH] += forOdometry;
                    s.set(Slot.WIDENED_T_REL, t);
                }
                s.set(Slot.INCONSISTENCY_VAR_M2, extra);
                s.set(Slot.INCONSISTENT_T_REL, t);
                return extra;
            }
        }
        return extra;
    }

    /** Adds a fix to the trail (at most one per {@link #TRAIL_SPACING_S}). */
    void record(FilterState s, double eastM, double northM, double whiteVar) {
        double t = s.get(Slot.T_REL);
        int count = s.whole(Slot.TRAIL_COUNT);
        int next = s.whole(Slot.TRAIL_NEXT);
        if (count > 0) {
            int newest = (next + FilterState.TRAIL_LENGTH - 1) % FilterState.TRAIL_LENGTH;
            if (t - s.trail[newest][0] < TRAIL_SPACING_S) {
                return;
            }
        }
        double[] e = s.trail[next];
        e[0] = t;
        e[1] = eastM;
        e[2] = northM;
        e[3] = s.get(Slot.ODOMETRY_EAST_M);
        e[4] = s.get(Slot.ODOMETRY_NORTH_M);
        e[5] = whiteVar;
        s.set(Slot.TRAIL_NEXT, (next + 1) % FilterState.TRAIL_LENGTH);
        s.set(Slot.TRAIL_COUNT, Math.min(count + 1, FilterState.TRAIL_LENGTH));
    }

    /** Forgets the trail: after a gap the odometry's path across it is no fair test. */
    static void clear(FilterState s) {
        s.set(Slot.TRAIL_COUNT, 0);
    }

    /** The trail entry whose age is nearest {@link #PREFERRED_SPAN_S} within the span, null if none. */
    private static double[] reference(FilterState s, double t) {
        int count = s.whole(Slot.TRAIL_COUNT);
        int next = s.whole(Slot.TRAIL_NEXT);
        double[] best = null;
        double bestOff = Double.POSITIVE_INFINITY;
        for (int i = 1; i <= count; i++) {
            double[] e = s.trail[(next - i + FilterState.TRAIL_LENGTH) % FilterState.TRAIL_LENGTH];
            double age = t - e[0];
            if (age < MIN_SPAN_S || age > MAX_SPAN_S) {
                continue;
            }
            double off = Math.abs(age - PREFERRED_SPAN_S);
            if (off < bestOff) {
                bestOff = off;
                best = e;
            }
        }
        return best;
    }
}
