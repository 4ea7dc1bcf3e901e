package org.wayhold.filter;

import org.wayhold.filter.FilterState.Slot;

import static org.wayhold.filter.StateIndex.EAST;
import static org.wayhold.filter.StateIndex.NORTH;
import static org.wayhold.filter.StateIndex.SIZE;
import static org.wayhold.filter.StateIndex.SPEED_SCALE;
import static org.wayhold.filter.StateIndex.YAW;

import org.wayhold.settings.GatingSettings;
import org.wayhold.settings.OutageSettings;

/**
 * Decides what a fix does to an initialised state: correct it, wait, or start afresh.
 *
 * <p>A fix inside the chi-square gate corrects the state. After a gap (no used fix for longer than
 * {@code outage.gap_s}) or after a gated fix, fixes are held until {@code gating.reacquire_fixes}
 * consecutive ones agree with each other over at least {@code gating.reacquire_span_s}, so a single
 * outlier or erratic multipath cannot yank the pose, nor can the fixes just out of a tunnel that
 * reflections offset alike: as the vehicle moves on, the odometry shows them to disagree with the later
 * fixes; then the newest is applied, after {@link #widenForJump} has moved the covariance to cover the
 * jump when it lies outside the gate, so a filter that drifted further than its covariance admits is
 * pulled back and says so. Agreeing fixes further than {@link #RESET_NIS} outside the covariance (or
 * with an implausible calibration) restart position and yaw instead.
 */
final class Reacquisition {

    /** Why fixes are being held back. */
    enum Probation { NONE, AFTER_GAP, AFTER_GATE }

    /** {@link Probation#values()} once: that method copies the array at every call. */
    private static final Probation[] PROBATIONS = Probation.values();

    /** What to do with the current fix. */
    enum Verdict {
        /** Inside the gate: correct the state with it. */
        ACCEPT,
        /** Enough held fixes agree: correct the state with it whatever the gate says. */
        REACQUIRE,
        /** Enough held fixes agree but lie absurdly far from the estimate: start position and yaw afresh. */
        RESET,
        /** Held while waiting for agreement. */
        PENDING,
        /** Outside the gate; held as the first of a possible agreement. */
        GATED
    }

    /**
     * A reacquisition whose normalised innovation squared exceeds this restarts position and yaw
     * instead of correcting them: about 30 sigma, far beyond any honest covariance.
     */
    static final double RESET_NIS = 900.0;

    private final double gateThreshold;
    private final double gapS;
    private final int reacquireFixes;
    private final double reacquireSpanS;
    private final double correlationTimeS;

    Reacquisition(GatingSettings gating, OutageSettings outage, double correlationTimeS) {
        this.gateThreshold = ChiSquare.quantile2Dof(gating.chiSquareProbability());
        this.gapS = outage.gapS();
        this.reacquireFixes = gating.reacquireFixes();
        this.reacquireSpanS = gating.reacquireSpanS();
        this.correlationTimeS = correlationTimeS;
    }

    /** The chi-square gate on a fix's NIS (unitless). */
    double gateThreshold() {
        return gateThreshold;
    }

    /** Fixes that must agree (count), the capacity of the held-fix buffer. */
    int reacquireFixes() {
        return reacquireFixes;
    }

    /**
     * Decides on a fix whose innovation has been computed.
     *
     * @param s                    the state (probation and held fixes modified)
     * @param nuEastM              east innovation (m)
     * @param nuNorthM             north innovation (m)
     * @param nis                  its normalised innovation squared (unitless), with any doubt added to the fix
     * @param claimedNis           the same at the accuracy the fix claims: how far a jump is
     * @param whiteVar             the fix's whole variance per axis as it claims it (m^2), without any
     *                             doubt added: held fixes must agree at the accuracy they claim, so that
     *                             one far off cannot join them on the strength of a doubt
     * @param fault                whether the fix sits where remembered faulty fixes sat ({@link #sameFault})
     * @param calibrationPlausible whether the calibration states could survive a reset
     * @param consistent           whether the fix agrees with the odometry's path ({@link FixConsistency}):
     *                             fixes that agree with each other but not with the odometry are
     *                             never taken by a reacquisition or a reset, only through the gate
     */
    Verdict decide(FilterState s, double nuEastM, double nuNorthM, double nis, double claimedNis, double whiteVar,
                   boolean fault, boolean calibrationPlausible, boolean consistent) {
        // A gap makes any probation one after a gap: one gated fix before it must not turn the fixes
        // after it into fixes that only need to pass the gate.
        if (s.whole(Slot.PROBATION) != Probation.AFTER_GAP.ordinal()
                && s.get(Slot.T_REL) - s.get(Slot.LAST_USED_FIX_T_REL) > gapS) {
            begin(s, Probation.AFTER_GAP);
        }
        // A fix where the rejected ones sat passes no gate: the covariance that lets it in grew because
        // the fixes were kept out, not because the estimate drifted onto them.
        boolean passes = nis <= gateThreshold && !fault;
        Probation probation = PROBATIONS[s.whole(Slot.PROBATION)];
        if (probation == Probation.NONE || (probation == Probation.AFTER_GATE && passes)) {
            if (passes) {
                end(s);
                return Verdict.ACCEPT;
            }
            begin(s, Probation.AFTER_GATE);
            hold(s, nuEastM, nuNorthM, whiteVar);
            return Verdict.GATED;
        }
        hold(s, nuEastM, nuNorthM, whiteVar);
        if (!consistent) {
            // A receiver that jumped with a reflection gives fixes that agree with each other: only the
            // odometry can tell, and it says no. Such fixes never end a probation, even when the
            // inconsistency's own widening lets them pass the gate: the fixes that end it must agree
            // with the odometry, or come after the odometry's reach (the consistency test's longest
            // span) has passed.
            return Verdict.GATED;
        }
        boolean agreed = s.whole(Slot.PENDING_COUNT) >= reacquireFixes
                && (reacquireFixes == 1 || s.get(Slot.T_REL) - s.pending[0][4] >= reacquireSpanS);
        if (agreed && fault) {
            return Verdict.GATED;
        }
        if (agreed && (claimedNis > RESET_NIS || !calibrationPlausible)) {
            end(s);
            return Verdict.RESET;
        }
        if (agreed) {
            end(s);
            return Verdict.REACQUIRE;
        }
        return passes || probation == Probation.AFTER_GAP ? Verdict.PENDING : Verdict.GATED;
    }

    /**
     * Remembers where a fix that disagreed with the odometry lay from the odometry's own path (the dead
     * reckoning no fix corrects). Once the fixes that came after the disagreement are all that the
     * consistency test can see, they agree with each other and with the odometry's turns however far
     * off they are: only this memory still says that they sit where the rejected ones sat.
     *
     * <p>Only a fix that stood out from the estimate by more than the estimate's variance and its own
     * whole claimed variance allow (at the gate's chi-square level) is a fault to remember: one that
     * failed on its noise leaves nothing. And only a jump inside a stream of used fixes starts the
     * memory: the estimate then is moments from the fixes' own, and the offset is the receiver's.
     * After a gap the offset may as well be the dead reckoning's drift, which is what a reacquisition
     * is for. A memory begun that way is kept up to date while the fixes stay off.
     */
    void rememberFault(FilterState s, double eastM, double northM, double nuEastM, double nuNorthM, double fixVar) {
        double t = s.get(Slot.T_REL);
        double lastUsed = s.get(Slot.LAST_USED_FIX_T_REL);
        if (!(t - lastUsed <= gapS || s.get(Slot.FAULT_T_REL) >= lastUsed)) {
            return;
        }
        double var = 0.5 * (s.p[EAST * SIZE + EAST] + s.p[NORTH * SIZE + NORTH]) + fixVar;
        if ((nuEastM * nuEastM + nuNorthM * nuNorthM) / var <= gateThreshold) {
            return;
        }
        s.set(Slot.FAULT_EAST_M, eastM - s.get(Slot.ODOMETRY_EAST_M));
        s.set(Slot.FAULT_NORTH_M, northM - s.get(Slot.ODOMETRY_NORTH_M));
        s.set(Slot.FAULT_T_REL, t);
        s.set(Slot.FAULT_ODOMETER_M, s.get(Slot.ODOMETER_M));
    }

    /** Forgets the disagreement: fixes were taken at the accuracy they claim. */
    static void resolveFault(FilterState s) {
        s.set(Slot.FAULT_T_REL, Double.NaN);
    }

    /**
     * Whether a fix lies where the remembered faulty fix lay, both taken from the odometry's own path:
     * then it is the same fault persisting (a reflection that holds while the street does), not a
     * drift of the estimate it would correct, and taking it would move the estimate onto the fault
     * while shrinking its covariance. The two offsets are compared at the variance the odometry's
     * heading and scale give over the distance driven since, plus both fixes' white variance, at the
     * gate's chi-square level; the odometry's path, unlike the estimate's covariance, is not widened
     * by the wait. The memory lasts two correlation times of the receiver's error: a fault that
     * outlasts that is beyond what the error model can tell from a true position.
     */
    boolean sameFault(FilterState s, double eastM, double northM, double whiteVar) {
        double since = s.get(Slot.T_REL) - s.get(Slot.FAULT_T_REL);
        if (!(since >= 0.0 && since <= FAULT_MEMORY_CORRELATION_TIMES * correlationTimeS)) {
            return false;
        }
        double de = eastM - s.get(Slot.ODOMETRY_EAST_M) - s.get(Slot.FAULT_EAST_M);
        double dn = northM - s.get(Slot.ODOMETRY_NORTH_M) - s.get(Slot.FAULT_NORTH_M);
        double d = s.get(Slot.ODOMETER_M) - s.get(Slot.FAULT_ODOMETER_M);
        double relVar = Math.max(s.p[YAW * SIZE + YAW], 0.0) + Math.max(s.p[SPEED_SCALE * SIZE + SPEED_SCALE], 0.0)
                + FixConsistency.ODOMETRY_SHARE * FixConsistency.ODOMETRY_SHARE;
        double var = d * d * relVar + 2.0 * whiteVar;
        return (de * de + dn * dn) / var <= gateThreshold;
    }

    /** Correlation times of the receiver's error a remembered fault lasts. */
    static final double FAULT_MEMORY_CORRELATION_TIMES = 2.0;

    private static void begin(FilterState s, Probation why) {
        s.set(Slot.PROBATION, why.ordinal());
        s.set(Slot.PENDING_COUNT, 0);
        s.set(Slot.PROBATION_SINCE_T_REL, s.get(Slot.T_REL));
    }

    /** True while fixes are held back. */
    static boolean inProbation(FilterState s) {
        return s.whole(Slot.PROBATION) != Probation.NONE.ordinal();
    }

    /**
     * Moves the covariance to a jump before a reacquisition applies it: the innovation nu is added to
     * the position block as nu nu' (rank one, so P stays positive semi-definite), and its cross-track
     * part over the distance driven since the last used fix, the heading error that would explain it,
     * to the yaw's variance. The update that follows then moves the position to the fixes instead of
     * parking the jump in the correlated GNSS error states, whose prior is a metre or so, and the
     * covariance after it says how little the filter knew.
     *
     * @param drivenM distance driven since the last used fix (m)
     */
    static void widenForJump(FilterState s, double nuEastM, double nuNorthM, double drivenM) {
        double[] p = s.p;
        p[EAST * SIZE + EAST] += nuEastM * nuEastM;
        p[EAST * SIZE + NORTH] += nuEastM * nuNorthM;
        p[NORTH * SIZE + EAST] += nuEastM * nuNorthM;
        p[NORTH * SIZE + NORTH] += nuNorthM * nuNorthM;
        if (drivenM > MIN_HEADING_BASE_M) {
            double cross = -nuEastM * Math.sin(s.x[YAW]) + nuNorthM * Math.cos(s.x[YAW]);
            double dPsi = Math.min(Math.abs(cross) / drivenM, MAX_HEADING_JUMP_RAD);
            p[YAW * SIZE + YAW] += dPsi * dPsi;
        }
        s.increment(FilterCounter.COVARIANCE_WIDENINGS);
        s.set(Slot.WIDENED_T_REL, s.get(Slot.T_REL));
    }

    /** Shortest drive over which a jump's cross-track part is read as a heading error (m). */
    private static final double MIN_HEADING_BASE_M = 10.0;
    /** Largest heading error a jump may add (rad): 30 degrees; a larger one needs a reset. */
    private static final double MAX_HEADING_JUMP_RAD = Math.toRadians(30.0);

    /** Ends any probation and forgets the held fixes. */
    static void end(FilterState s) {
        s.set(Slot.PROBATION, Probation.NONE.ordinal());
        s.set(Slot.PENDING_COUNT, 0);
    }

    /**
     * Holds the current fix's innovation for the agreement test. Consecutive fixes share the
     * prediction error, so the difference of two innovations only carries the fixes' white noise, the
     * change of the correlated GNSS error between them, and the error of the relative motion the wheels
     * and gyro predicted: distance driven times the yaw and scale uncertainty. A difference outside the
     * chi-square gate means they disagree, and the older ones are dropped.
     */
    private void hold(FilterState s, double nuEastM, double nuNorthM, double whiteVar) {
        double[] p = s.p;
        double[][] pending = s.pending;
        double relVarPerM2 = Math.max(p[YAW * SIZE + YAW], 0.0) + Math.max(p[SPEED_SCALE * SIZE + SPEED_SCALE], 0.0);
        // Newest first: a disagreement drops that fix and every older one.
        for (int i = s.whole(Slot.PENDING_COUNT) - 1; i >= 0; i--) {
            double[] q = pending[i];
            double de = nuEastM - q[0];
            double dn = nuNorthM - q[1];
            double driven = s.get(Slot.ODOMETER_M) - q[3];
            double gmChange = 2.0 * s.get(Slot.CORRELATED_VAR_M2) * (1.0 - Math.exp(-(s.get(Slot.T_REL) - q[4]) / correlationTimeS));
            double v = whiteVar + q[2] + driven * driven * relVarPerM2 + gmChange;
            if ((de * de + dn * dn) / v > gateThreshold) {
                int drop = i + 1;
                s.add(FilterCounter.FIXES_DROPPED, drop);
                for (int j = 0; j < s.whole(Slot.PENDING_COUNT) - drop; j++) {
                    double[] kept = pending[j + drop];
                    pending[j + drop] = pending[j];
                    pending[j] = kept;
                }
                s.set(Slot.PENDING_COUNT, s.whole(Slot.PENDING_COUNT) - (drop));
                break;
            }
        }
        if (s.whole(Slot.PENDING_COUNT) == reacquireFixes) {
            // Full and all agree: the oldest stays, so that the agreement spans time; the second
            // oldest makes room (the only one when a single fix suffices).
            int out = reacquireFixes == 1 ? 0 : 1;
            double[] freed = pending[out];
            System.arraycopy(pending, out + 1, pending, out, reacquireFixes - 1 - out);
            pending[reacquireFixes - 1] = freed;
            s.set(Slot.PENDING_COUNT, s.whole(Slot.PENDING_COUNT) - 1);
        }
        int held = s.whole(Slot.PENDING_COUNT);
        s.set(Slot.PENDING_COUNT, held + 1);
        double[] slot = pending[held];
        slot[0] = nuEastM;
        slot[1] = nuNorthM;
        slot[2] = whiteVar;
        slot[3] = s.get(Slot.ODOMETER_M);
        slot[4] = s.get(Slot.T_REL);
    }
}
