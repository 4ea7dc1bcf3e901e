package org.wayhold.filter;

import static org.wayhold.filter.StateIndex.EAST;
import static org.wayhold.filter.StateIndex.GNSS_LATENCY;
import static org.wayhold.filter.StateIndex.LEVER_FORWARD;
import static org.wayhold.filter.StateIndex.LEVER_LEFT;
import static org.wayhold.filter.StateIndex.NORTH;
import static org.wayhold.filter.StateIndex.SIZE;
import static org.wayhold.filter.StateIndex.SPEED_SCALE;
import static org.wayhold.filter.StateIndex.YAW;

import org.wayhold.filter.FilterState.Slot;

/**
 * Tests fixes against the odometry: over seconds to a minute the odometry's own path (never corrected
 * by fixes) moves by what the vehicle really moved, to within its heading and scale uncertainty times
 * the distance, while a receiver among tall buildings wanders by metres to tens of metres with the
 * reflections it tracks. Fixes that agree with each other can still disagree with the odometry; this
 * is the test that catches them.
 *
 * <p>Each fix is compared with two earlier fixes of a trail of fixes that passed: one about
 * {@link #SHORT_SPAN_S} back, which sees a bias that starts to wander, and the oldest within
 * {@link #LONG_SPAN_S}, which measures the whole offset a receiver took on since it was last right.
 * The difference d between the fixes' displacement and the odometry's has variance
 * <pre>
 *   white(new) + white(old) + 2 sigma_c^2 (1 - exp(-dt / tau)) + dist^2 (var(yaw) + var(scale) + k^2)
 * </pre>
 * (the Gauss-Markov error's change over dt, and the relative motion error; k = {@link #ODOMETRY_SHARE}
 * for what the states do not model), with the antenna's own motion taken out: the turn of the lever
 * arm and the change of the distance driven during the latency, and their uncertainty added. When d'd over that variance passes the 2-dof chi-square quantile
 * at 0.999 for {@link #CONFIRMING_TESTS} fixes in a row (one outlier fails once, a receiver tracking
 * reflections fix after fix), the two disagree, and either may be wrong: fixes among buildings
 * wander, and an odometry glitch turns the heading. Both make the same first impression, so neither is
 * believed over the other: the missing variance, d'd / 2 less what was claimed, is added both to the
 * fixes that follow (fading with {@link #FADE_S} once they agree again) and, when the estimate may have
 * followed them (fixes were used at full weight within the last {@link #MIN_SPAN_S} and this one lies
 * inside the estimate's gate), to the variances of position and yaw. A fix far outside the estimate's gate that
 * also disagrees with the odometry is wrong on two counts: the estimate keeps to the odometry. Each side then admits the whole disagreement, the estimate settles between them
 * with a covariance that covers either being wrong, and the next fixes settle which was. Fixes that
 * failed never join the trail, so the long test keeps measuring against the last fix that was right.
 */
final class FixConsistency {

    /** 2-dof chi-square quantile at 0.999: -2 ln(0.001) (NIST/SEMATECH e-Handbook 1.3.6.7.4: 13.816). */
    static final double GATE = 13.815510557964274;
    /** Shortest span of a test (s): below it the fixes' own noise hides a wandering bias. */
    static final double MIN_SPAN_S = 5.0;
    /** The span of the short test (s). */
    static final double SHORT_SPAN_S = 10.0;
    /** Longest span of the long test (s): about what a canyon lasts, and odometry stays within metres. */
    static final double LONG_SPAN_S = 60.0;
    /** Fixes enter the trail at most this often (s); with {@link FilterState#TRAIL_LENGTH} it spans a minute. */
    static final double TRAIL_SPACING_S = 2.0;
    /** Share of the distance the odometry may err by over the span beyond its states (common practice). */
    static final double ODOMETRY_SHARE = 0.003;
    /** Time constant with which the added variance fades once fixes agree again (s). */
    static final double FADE_S = 10.0;
    /** Consecutive fixes that must fail the test before it acts (count). */
    static final int CONFIRMING_TESTS = 3;
    /** Added variance above which the fixes count as inconsistent for the pose's reasons (m^2). */
    static final double REPORTED_VAR_M2 = 1.0;

    private final double correlationTimeS;

    FixConsistency(double correlationTimeS) {
        this.correlationTimeS = correlationTimeS;
    }

    /**
     * Tests a fix against the trail and returns the variance to add to it per axis (m^2): the faded
     * earlier inconsistency, raised by this fix's own when it disagrees. Marks the fix as failed (it
     * will not join the trail) when it disagrees.
     *
     * @param whiteVar       the fix's white variance per axis before any addition (m^2)
     * @param correlatedVar  the variance of the receiver's correlated error per axis the fix claims,
     *                       before any addition (m^2): the test must not let an earlier doubt explain
     *                       the disagreement it measures
     * @param estimateAgrees whether the fix lies inside the gate of the estimate without any addition:
     *                       then the estimate may have followed the fixes and share their error
     */
    double extraVarianceM2(FilterState s, double eastM, double northM, double whiteVar, double correlatedVar,
                           boolean estimateAgrees) {
        double t = s.get(Slot.T_REL);
        double extra = s.get(Slot.INCONSISTENCY_VAR_M2);
        double since = t - s.get(Slot.INCONSISTENT_T_REL);
        if (extra > 0.0 && since > 0.0) {
            extra *= Math.exp(-since / FADE_S);
        }
        double[] near = reference(s, t, true);
        double[] far = reference(s, t, false);
        double shortfall = 0.0;
        double dist = 0.0;
        boolean failed = false;
        for (double[] old : new double[][] {near, far}) {
            if (old == null) {
                continue;
            }
            double dt = t - old[0];
            double oe = s.get(Slot.ODOMETRY_EAST_M) - old[3];
            double on = s.get(Slot.ODOMETRY_NORTH_M) - old[4];
            // The fixes are the antenna's at their time of validity: its displacement is the reference
            // point's plus the change of the lever arm's direction, less the change of the distance
            // driven during the latency.
            double[] x = s.x;
            double cNow = Math.cos(x[YAW]);
            double sNow = Math.sin(x[YAW]);
            double cOld = Math.cos(old[6]);
            double sOld = Math.sin(old[6]);
            double v = x[SPEED_SCALE] * s.get(Slot.WHEEL_SPEED_MPS);
            double armE = (cNow - cOld) * x[LEVER_FORWARD] - (sNow - sOld) * x[LEVER_LEFT];
            double armN = (sNow - sOld) * x[LEVER_FORWARD] + (cNow - cOld) * x[LEVER_LEFT];
            double lagE = v * cNow - old[7] * cOld;
            double lagN = v * sNow - old[7] * sOld;
            double de = (eastM - old[1]) - oe - armE + x[GNSS_LATENCY] * lagE;
            double dn = (northM - old[2]) - on - armN + x[GNSS_LATENCY] * lagN;
            double d = Math.hypot(oe, on);
            double relVar = Math.max(s.p[YAW * SIZE + YAW], 0.0) + Math.max(s.p[SPEED_SCALE * SIZE + SPEED_SCALE], 0.0)
                    + ODOMETRY_SHARE * ODOMETRY_SHARE;
            double turn2 = (cNow - cOld) * (cNow - cOld) + (sNow - sOld) * (sNow - sOld);
            double leverVar = turn2 * 0.5 * (Math.max(s.p[LEVER_FORWARD * SIZE + LEVER_FORWARD], 0.0)
                    + Math.max(s.p[LEVER_LEFT * SIZE + LEVER_LEFT], 0.0));
            double lagVar = 0.5 * (lagE * lagE + lagN * lagN) * Math.max(s.p[GNSS_LATENCY * SIZE + GNSS_LATENCY], 0.0);
            double gnssVar = whiteVar + old[5]
                    + 2.0 * correlatedVar * (1.0 - Math.exp(-dt / correlationTimeS))
                    + leverVar + lagVar;
            double odometryVar = d * d * relVar;
            double var = gnssVar + odometryVar;
            double d2 = de * de + dn * dn;
            if (d2 / var > GATE) {
                failed = true;
                double missing = 0.5 * d2 - var;
                if (missing > shortfall) {
                    shortfall = missing;
                    dist = d;
                }
            }
        }
        s.set(Slot.FIX_FAILED, failed);
        if (!failed) {
            s.set(Slot.INCONSISTENT_RUN, 0);
            return extra;
        }
        s.set(Slot.INCONSISTENT_RUN, s.whole(Slot.INCONSISTENT_RUN) + 1);
        if (s.whole(Slot.INCONSISTENT_RUN) < CONFIRMING_TESTS) {
            // One fix far off is an outlier for the gate to catch, not a wandering receiver.
            return extra;
        }
        if (shortfall > extra) {
            extra = shortfall;
        }
        // The estimate shares the doubt only if it may have followed the fixes: fixes were used at their
        // full weight lately (not with an earlier doubt added) and this one agrees with it. A fix the estimate's own gate rejects, or one after a gap whose
        // fixes are held back, leaves an estimate that is the odometry's, and the fixes carry the doubt.
        boolean steered = t - s.get(Slot.LAST_TRUSTED_FIX_T_REL) < MIN_SPAN_S && estimateAgrees;
        if (dist > 0.0 && steered) {
            // The odometry may be the one at fault (a heading error over the span, and the position
            // error it left), or the fixes used lately pulled the estimate along with their error.
            s.p[YAW * SIZE + YAW] += shortfall / (dist * dist);
            s.p[EAST * SIZE + EAST] += shortfall;
            s.p[NORTH * SIZE + NORTH] += shortfall;
            s.set(Slot.WIDENED_T_REL, t);
        }
        s.set(Slot.INCONSISTENCY_VAR_M2, extra);
        s.set(Slot.INCONSISTENT_T_REL, t);
        return extra;
    }

    /** Adds a used fix that passed the test to the trail (at most one per {@link #TRAIL_SPACING_S}). */
    void record(FilterState s, double eastM, double northM, double whiteVar) {
        if (s.is(Slot.FIX_FAILED)) {
            return;
        }
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
        e[6] = s.x[YAW];
        e[7] = s.x[SPEED_SCALE] * s.get(Slot.WHEEL_SPEED_MPS);
        s.set(Slot.TRAIL_NEXT, (next + 1) % FilterState.TRAIL_LENGTH);
        s.set(Slot.TRAIL_COUNT, Math.min(count + 1, FilterState.TRAIL_LENGTH));
    }

    /**
     * Whether a fix may correct the state: not when it failed the test itself, nor while the doubt the
     * fixes carry exceeds their own white variance within {@link #FADE_S} of the last confirmed
     * disagreement. A doubtful fix is left out rather than taken at a lower weight: a receiver that
     * wanders slowly would otherwise draw the estimate along with it, a little at each fix, while the
     * covariance shrank with every one. Past the fade time the doubt only weights the fix: the fixes
     * have agreed with the odometry since, as far as the trail can tell.
     */
    static boolean mayCorrect(FilterState s, double extraVarM2, double whiteVarM2) {
        if (s.is(Slot.FIX_FAILED)) {
            return false;
        }
        return extraVarM2 <= whiteVarM2 || s.get(Slot.T_REL) - s.get(Slot.INCONSISTENT_T_REL) > FADE_S;
    }

    /** Drops the doubt added to fixes: fixes that agree with each other and with the odometry are taken again. */
    static void forgive(FilterState s) {
        s.set(Slot.INCONSISTENCY_VAR_M2, 0.0);
    }

    /** Forgets the trail and the doubt: after a reset the odometry's path is no fair test. */
    static void clear(FilterState s) {
        s.set(Slot.TRAIL_COUNT, 0);
        forgive(s);
    }

    /**
     * A trail entry within the spans: the one whose age is nearest {@link #SHORT_SPAN_S} when
     * {@code near}, else the oldest within {@link #LONG_SPAN_S}; null if none.
     */
    private static double[] reference(FilterState s, double t, boolean near) {
        int count = s.whole(Slot.TRAIL_COUNT);
        int next = s.whole(Slot.TRAIL_NEXT);
        double[] best = null;
        double bestScore = Double.POSITIVE_INFINITY;
        for (int i = 1; i <= count; i++) {
            double[] e = s.trail[(next - i + FilterState.TRAIL_LENGTH) % FilterState.TRAIL_LENGTH];
            double age = t - e[0];
            if (age < MIN_SPAN_S || age > LONG_SPAN_S) {
                continue;
            }
            double score = near ? Math.abs(age - SHORT_SPAN_S) : -age;
            if (score < bestScore) {
                bestScore = score;
                best = e;
            }
        }
        return best;
    }
}
