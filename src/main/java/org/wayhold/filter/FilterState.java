package org.wayhold.filter;

import static org.wayhold.filter.StateIndex.SIZE;

import java.io.DataInput;
import java.io.DataOutput;
import java.io.IOException;
import java.util.Arrays;

/**
 * Everything a navigation filter knows and remembers: the state vector x, its covariance P, and the
 * bookkeeping of the parts around them (held inputs, standstill, alignment, reacquisition, height,
 * counters). The parts of {@link NavigationFilter} are stateless apart from work arrays; all of their
 * memory lives here, so a checkpoint, a branch and a snapshot are copies of one object.
 *
 * <p>{@link Slot} is the one list of the scalar bookkeeping; with x, P, the held fixes, the innovation
 * window, the displacement ring and the {@link FilterCounter}s it is all the state holds. Copying, restoring and the binary codec walk these
 * arrays whole, so a new scalar is one new {@link Slot} constant and nothing else. The codec writes
 * each array's length, so a state written by a different layout is refused rather than misread.
 *
 * <p>Units: positions m (ENU), angles rad, times s since the session epoch, as in the package doc.
 */
public final class FilterState {

    /**
     * Version of the layout {@link #write} writes; raise it when the meaning of a slot changes. Format 7
     * holds the time of the last trusted fix, ln det S of the newest fix and the remembered fault of the
     * fixes; format 6 had only the first two, and format 5 one of them with the same number of slots, so
     * a length cannot tell formats apart and every earlier one is refused.
     */
    static final int FORMAT = 7;

    /** Per held fix: east innovation, north innovation, white variance, odometer, time. */
    static final int PENDING_FIELDS = 5;

    /** Position NIS values kept for the sustained-disagreement test (count). */
    static final int NIS_WINDOW = 10;

    /** Fixes kept for the displacement test, one per two seconds at most (count). */
    static final int TRAIL_LENGTH = 32;
    /**
     * Per trail entry: time, fix east, fix north, odometry east, odometry north, white variance, yaw,
     * speed (scaled).
     */
    static final int TRAIL_FIELDS = 8;

    /**
     * The scalar bookkeeping, one slot each. Flags are 0 or 1, whole numbers are stored exactly (all
     * are far below 2^53); NaN means "none yet" where a time or position may be absent.
     */
    enum Slot {
        /** True once a position and a yaw exist (flag). */
        INITIALIZED(0.0),
        /** Time of the estimate (s since epoch), NaN before the first event. */
        T_REL(Double.NaN),
        /** Height of the reference point (m, ENU up). */
        UP_M(0.0),
        /** Variance of the height (m^2), infinite before the first fix with a height. */
        VAR_UP_M2(Double.POSITIVE_INFINITY),
        /** Newest wheel-speed reading (m/s, signed). */
        WHEEL_SPEED_MPS(0.0),
        /** Time of the newest wheel-speed reading (s since epoch). */
        WHEEL_SPEED_T_REL(Double.NaN),
        /** The wheel-speed reading before it (m/s). */
        PREVIOUS_WHEEL_SPEED_MPS(0.0),
        /** Time of the wheel-speed reading before it (s since epoch). */
        PREVIOUS_WHEEL_SPEED_T_REL(Double.NaN),
        /** Newest yaw-rate reading (rad/s, counter-clockwise positive). */
        YAW_RATE_RAD_PER_S(0.0),
        /** Time of the newest yaw-rate reading (s since epoch). */
        YAW_RATE_T_REL(Double.NaN),
        /** The yaw-rate reading before it (rad/s). */
        PREVIOUS_YAW_RATE_RAD_PER_S(0.0),
        /** Time of the yaw-rate reading before it (s since epoch). */
        PREVIOUS_YAW_RATE_T_REL(Double.NaN),
        /** True once any yaw-rate reading arrived (flag). */
        HAS_YAW_RATE(0.0),
        /** Since when the wheels read zero (s since epoch), NaN while they do not. */
        ZERO_SPEED_SINCE_T_REL(Double.NaN),
        /** True while the vehicle is taken to stand still (flag). */
        STANDSTILL(0.0),
        /** Variance of the correlated GNSS error process (m^2), from the newest fix's accuracy. */
        CORRELATED_VAR_M2(0.0),
        /** Distance driven since the session began (m). */
        ODOMETER_M(0.0),
        /** Time of the last fix that corrected or started the state (s since epoch). */
        LAST_USED_FIX_T_REL(Double.NaN),
        /** Time of the last fix used at the accuracy it claims, with no doubt added (s since epoch). */
        LAST_TRUSTED_FIX_T_REL(Double.NaN),
        /** Time of the last fix received (s since epoch). */
        LAST_FIX_T_REL(Double.NaN),
        /** Odometer at the last used fix (m). */
        ODOMETER_AT_LAST_USED_FIX_M(Double.NaN),
        /** Decision on the newest fix, an ordinal of {@link GnssOutcome.Kind}; -1 before any. */
        LAST_KIND(-1.0),
        /** Normalised innovation squared of the newest fix (unitless), NaN when not computed. */
        LAST_NIS(Double.NaN),
        /** ln det S of the newest fix's position innovation (ln m^4), NaN when not computed. */
        LAST_LOG_DET_S(Double.NaN),
        /** Alignment anchor: where the vehicle was while its yaw was unknown, east (m). */
        ANCHOR_EAST_M(Double.NaN),
        /** Alignment anchor, north (m). */
        ANCHOR_NORTH_M(Double.NaN),
        /** Odometer at the anchor (m). */
        ANCHOR_ODOMETER_M(Double.NaN),
        /** Why fixes are held back, an ordinal of {@link Reacquisition.Probation}. */
        PROBATION(0.0),
        /** Number of held fixes (count). */
        PENDING_COUNT(0.0),
        /** True while the wheels read zero but the gyro says the vehicle turns (flag). */
        CREEPING(0.0),
        /** Time of the last yaw-rate reading that contradicted a standstill (s since epoch). */
        LAST_TURN_AT_REST_T_REL(Double.NaN),
        /** Direction of the last nonzero wheel-speed reading: +1 forward, -1 reversing. */
        LAST_MOVING_SIGN(1.0),
        /** Dead-reckoned east, never corrected by fixes (m): the odometry's own path. */
        ODOMETRY_EAST_M(0.0),
        /** Dead-reckoned north, never corrected by fixes (m). */
        ODOMETRY_NORTH_M(0.0),
        /** Variance added to fixes while they disagree with the odometry (m^2 per axis). */
        INCONSISTENCY_VAR_M2(0.0),
        /** Time the fixes last disagreed with the odometry (s since epoch). */
        INCONSISTENT_T_REL(Double.NaN),
        /** Consecutive fixes that failed the displacement test (count). */
        INCONSISTENT_RUN(0.0),
        /** The newest fix failed the displacement test (flag). */
        FIX_FAILED(0.0),
        /** Where the last fix that disagreed with the odometry lay from the odometry's own path, east (m). */
        FAULT_EAST_M(0.0),
        /** The same, north (m). */
        FAULT_NORTH_M(0.0),
        /** Time of that fix (s since epoch); NaN when no disagreement is unresolved. */
        FAULT_T_REL(Double.NaN),
        /** Odometer at that fix (m). */
        FAULT_ODOMETER_M(0.0),
        /** Time the covariance was last widened for sustained disagreement or a jump (s since epoch). */
        WIDENED_T_REL(Double.NaN),
        /** Number of NIS values in the innovation window (count). */
        NIS_COUNT(0.0),
        /** Next slot of the innovation window (index). */
        NIS_NEXT(0.0),
        /** Number of entries in the displacement ring (count). */
        TRAIL_COUNT(0.0),
        /** Next slot of the displacement ring (index). */
        TRAIL_NEXT(0.0),
        /** True once any wheel-speed reading arrived (flag). */
        HAS_WHEEL_SPEED(0.0),
        /** The last fix's sigma was raised by its geometry or by inconsistency (flag). */
        FIX_WEAK(0.0),
        /** Wheel speed when the scale's uncertainty last grew for a change of speed (m/s). */
        SCALE_REFERENCE_SPEED_MPS(0.0),
        /** When the current probation began (s since epoch). */
        PROBATION_SINCE_T_REL(Double.NaN),
        /** Horizontal variance of the fix at the alignment anchor, per axis (m^2). */
        ANCHOR_VAR_M2(Double.NaN),
        /** Distance the raw wheel speed integrates to, unscaled and signed (m). */
        WHEEL_DISTANCE_M(0.0),
        /** Next slot of the wheel-speed marks (index). */
        WHEEL_MARK_NEXT(0.0),
        /** Number of wheel-speed marks (count). */
        WHEEL_MARK_COUNT(0.0);

        private final double initial;

        Slot(double initial) {
            this.initial = initial;
        }
    }

    private static final Slot[] SLOTS = Slot.values();
    /** {@link GnssOutcome.Kind#values()} once: that method copies the array at every call. */
    private static final GnssOutcome.Kind[] KINDS = GnssOutcome.Kind.values();

    /** State vector, layout {@link StateIndex}. */
    final double[] x = new double[SIZE];
    /** Covariance of x, row-major SIZE x SIZE. */
    final double[] p = new double[SIZE * SIZE];
    /** The scalar bookkeeping, indexed by {@link Slot#ordinal()}. */
    private final double[] v = new double[SLOTS.length];
    /** Fixes held back by {@link Reacquisition}, {@link #PENDING_FIELDS} entries each. */
    final double[][] pending;
    /** Wheel-speed readings kept for the mean speed at a fix (count). */
    static final int WHEEL_MARKS = 16;

    /** The last position NIS values of used fixes, a ring of {@link #NIS_WINDOW}. */
    final double[] recentNis = new double[NIS_WINDOW];
    /** Past fixes with the odometry's position at their time, a ring of {@link #TRAIL_LENGTH}. */
    final double[][] trail = new double[TRAIL_LENGTH][TRAIL_FIELDS];
    /** Times of recent wheel-speed readings and the wheel distance at each, a ring of {@link #WHEEL_MARKS}. */
    final double[] wheelMarkT = new double[WHEEL_MARKS];
    final double[] wheelMarkDistance = new double[WHEEL_MARKS];
    /** Running counts, indexed by {@link FilterCounter#ordinal()}. */
    private final long[] counts = new long[FilterCounter.values().length];

    /** @param heldFixes capacity of the reacquisition buffer (count, at least 1) */
    FilterState(int heldFixes) {
        this.pending = new double[heldFixes][PENDING_FIELDS];
        for (Slot slot : SLOTS) {
            v[slot.ordinal()] = slot.initial;
        }
    }

    double get(Slot slot) {
        return v[slot.ordinal()];
    }

    void set(Slot slot, double value) {
        v[slot.ordinal()] = value;
    }

    boolean is(Slot flag) {
        return v[flag.ordinal()] != 0.0;
    }

    void set(Slot flag, boolean value) {
        v[flag.ordinal()] = value ? 1.0 : 0.0;
    }

    int whole(Slot slot) {
        return (int) v[slot.ordinal()];
    }

    void set(Slot slot, int value) {
        v[slot.ordinal()] = value;
    }

    /** Time of the estimate (s since the session epoch), NaN before the first event. */
    public double tRel() {
        return get(Slot.T_REL);
    }

    /** The decision on the newest fix, null before any. */
    GnssOutcome.Kind lastKind() {
        int k = whole(Slot.LAST_KIND);
        return k < 0 ? null : KINDS[k];
    }

    long count(FilterCounter c) {
        return counts[c.ordinal()];
    }

    void increment(FilterCounter c) {
        counts[c.ordinal()]++;
    }

    void add(FilterCounter c, long n) {
        counts[c.ordinal()] += n;
    }

    /** An immutable copy of the counters. */
    FilterCounts counts() {
        return new FilterCounts(counts);
    }

    /** A deep copy. */
    FilterState copy() {
        FilterState c = new FilterState(pending.length);
        c.restore(this);
        return c;
    }

    /** Makes this state an exact copy of {@code o}, which must have the same capacity. */
    void restore(FilterState o) {
        System.arraycopy(o.x, 0, x, 0, x.length);
        System.arraycopy(o.p, 0, p, 0, p.length);
        System.arraycopy(o.v, 0, v, 0, v.length);
        for (int i = 0; i < pending.length; i++) {
            System.arraycopy(o.pending[i], 0, pending[i], 0, PENDING_FIELDS);
        }
        System.arraycopy(o.recentNis, 0, recentNis, 0, NIS_WINDOW);
        System.arraycopy(o.wheelMarkT, 0, wheelMarkT, 0, WHEEL_MARKS);
        System.arraycopy(o.wheelMarkDistance, 0, wheelMarkDistance, 0, WHEEL_MARKS);
        for (int i = 0; i < TRAIL_LENGTH; i++) {
            System.arraycopy(o.trail[i], 0, trail[i], 0, TRAIL_FIELDS);
        }
        System.arraycopy(o.counts, 0, counts, 0, counts.length);
    }

    /** Writes the whole state, bit for bit, for snapshots that must restore a filter exactly. */
    void write(DataOutput out) throws IOException {
        out.writeInt(FORMAT);
        writeAll(out, x);
        writeAll(out, p);
        writeAll(out, v);
        out.writeInt(pending.length);
        for (double[] row : pending) {
            writeAll(out, row);
        }
        writeAll(out, recentNis);
        writeAll(out, wheelMarkT);
        writeAll(out, wheelMarkDistance);
        out.writeInt(trail.length);
        for (double[] row : trail) {
            writeAll(out, row);
        }
        out.writeInt(counts.length);
        for (long c : counts) {
            out.writeLong(c);
        }
    }

    /**
     * Reads what {@link #write} wrote into this state.
     *
     * @throws IOException when the data is not a state of this layout and capacity, or holds values
     *                     no filter can reach
     */
    void read(DataInput in) throws IOException {
        int format = in.readInt();
        if (format != FORMAT) {
            throw new IOException("filter state: format " + format + ", expected " + FORMAT);
        }
        readAll(in, x, "state vector");
        readAll(in, p, "covariance");
        readAll(in, v, "bookkeeping");
        expectLength(in, pending.length, "held fixes");
        for (double[] row : pending) {
            readAll(in, row, "held fix");
        }
        readAll(in, recentNis, "innovation window");
        readAll(in, wheelMarkT, "wheel-speed marks");
        readAll(in, wheelMarkDistance, "wheel-speed marks");
        expectLength(in, trail.length, "displacement ring");
        for (double[] row : trail) {
            readAll(in, row, "displacement entry");
        }
        expectLength(in, counts.length, "counters");
        for (int i = 0; i < counts.length; i++) {
            counts[i] = in.readLong();
        }
        int held = whole(Slot.PENDING_COUNT);
        if (held < 0 || held > pending.length) {
            throw new IOException("filter state: " + held + " held fixes, more than " + pending.length);
        }
        int kind = whole(Slot.LAST_KIND);
        if (kind < -1 || kind >= GnssOutcome.Kind.values().length) {
            throw new IOException("filter state: no fix decision numbered " + kind);
        }
        int probation = whole(Slot.PROBATION);
        if (probation < 0 || probation >= Reacquisition.Probation.values().length) {
            throw new IOException("filter state: no probation numbered " + probation);
        }
    }

    private static void writeAll(DataOutput out, double[] a) throws IOException {
        out.writeInt(a.length);
        for (double d : a) {
            out.writeDouble(d);
        }
    }

    private static void readAll(DataInput in, double[] a, String what) throws IOException {
        expectLength(in, a.length, what);
        for (int i = 0; i < a.length; i++) {
            a[i] = in.readDouble();
        }
    }

    private static void expectLength(DataInput in, int expected, String what) throws IOException {
        int n = in.readInt();
        if (n != expected) {
            throw new IOException("filter state: " + n + " entries of " + what + " where " + expected
                    + " were expected");
        }
    }

    @Override
    public String toString() {
        return "FilterState[t_rel=" + tRel() + ", x=" + Arrays.toString(x) + "]";
    }
}
