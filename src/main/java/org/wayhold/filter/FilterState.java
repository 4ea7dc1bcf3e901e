package org.wayhold.filter;

import static org.wayhold.filter.StateIndex.SIZE;

import java.io.DataInput;
import java.io.DataOutput;
import java.io.IOException;
import java.util.List;
import java.util.function.Function;
import java.util.function.ObjIntConsumer;
import java.util.function.ToDoubleFunction;
import java.util.function.ToIntFunction;

/**
 * Everything a navigation filter knows and remembers: the state vector x, its covariance P, and the
 * bookkeeping of the parts around them (held inputs, standstill, alignment, reacquisition, height,
 * counters). The parts of {@link NavigationFilter} are stateless apart from work arrays; all of their
 * memory lives here, so a checkpoint, a branch and a snapshot are copies of one object.
 *
 * <p>{@link #FIELDS} is the one list of what the state holds. Copying, restoring and the binary codec
 * all walk it, so a new field is added in two places that sit side by side: its declaration and its
 * entry in the list. The codec writes the list's length and each array's length, so a state written by
 * a different layout is refused rather than misread.
 *
 * <p>Units: positions m (ENU), angles rad, times s since the session epoch, as in the package doc.
 */
public final class FilterState {

    /** Version of the layout {@link #write} writes; raise it when {@link #FIELDS} changes. */
    static final int FORMAT = 3;

    /** Per held fix: east innovation, north innovation, white variance, odometer, time. */
    static final int PENDING_FIELDS = 5;

    // The estimate.
    /** State vector, layout {@link StateIndex}. */
    final double[] x = new double[SIZE];
    /** Covariance of x, row-major SIZE x SIZE. */
    final double[] p = new double[SIZE * SIZE];
    /** False until a position and a yaw exist. */
    boolean initialized;
    /** Time of the estimate (s since epoch), NaN before the first event. */
    double tRel = Double.NaN;

    // Height channel.
    double upM;
    double varUpM2 = Double.POSITIVE_INFINITY;

    // Held inputs: the latest two readings of each stream.
    double wheelSpeedMps;
    double wheelSpeedTRel = Double.NaN;
    double previousWheelSpeedMps;
    double previousWheelSpeedTRel = Double.NaN;
    double yawRateRadPerS;
    double yawRateTRel = Double.NaN;
    double previousYawRateRadPerS;
    double previousYawRateTRel = Double.NaN;
    boolean hasYawRate;

    // Standstill.
    double zeroSpeedSinceTRel = Double.NaN;
    boolean standstill;

    // GNSS bookkeeping.
    /** Variance of the correlated GNSS error process (m^2), from the newest fix's accuracy. */
    double correlatedVarM2;
    double odometerM;
    double lastUsedFixTRel = Double.NaN;
    double lastFixTRel = Double.NaN;
    double odometerAtLastUsedFixM = Double.NaN;
    /** Decision on the newest fix; -1 before any (an ordinal of {@link GnssOutcome.Kind}). */
    int lastKind = -1;
    double lastNis = Double.NaN;

    // Alignment: where the vehicle was while its yaw is still unknown.
    double anchorEastM = Double.NaN;
    double anchorNorthM = Double.NaN;
    double anchorOdometerM = Double.NaN;

    // Reacquisition: fixes held back after a gap or a gated fix.
    /** An ordinal of {@link Reacquisition.Probation}. */
    int probation;
    final double[][] pending;
    int pendingCount;

    /** Running counts, indexed by {@link FilterCounter#ordinal()}. */
    final long[] counts = new long[FilterCounter.values().length];

    /** @param heldFixes capacity of the reacquisition buffer (count, at least 1) */
    FilterState(int heldFixes) {
        this.pending = new double[heldFixes][PENDING_FIELDS];
    }

    /** A deep copy. */
    FilterState copy() {
        FilterState c = new FilterState(pending.length);
        c.restore(this);
        return c;
    }

    /** Makes this state an exact copy of {@code o}, which must have the same capacity. */
    void restore(FilterState o) {
        for (Field f : FIELDS) {
            f.copy(o, this);
        }
    }

    /** Writes the whole state, bit for bit, for snapshots that must restore a filter exactly. */
    void write(DataOutput out) throws IOException {
        out.writeInt(FORMAT);
        out.writeInt(FIELDS.size());
        for (Field f : FIELDS) {
            f.write(this, out);
        }
    }

    /**
     * Reads what {@link #write} wrote into this state.
     *
     * @throws IOException when the data is not a state of this layout and capacity
     */
    void read(DataInput in) throws IOException {
        int format = in.readInt();
        if (format != FORMAT) {
            throw new IOException("filter state: format " + format + ", expected " + FORMAT);
        }
        int n = in.readInt();
        if (n != FIELDS.size()) {
            throw new IOException("filter state: " + n + " fields, expected " + FIELDS.size());
        }
        for (Field f : FIELDS) {
            f.read(this, in);
        }
        if (pendingCount < 0 || pendingCount > pending.length) {
            throw new IOException("filter state: " + pendingCount + " held fixes, more than " + pending.length);
        }
        if (lastKind < -1 || lastKind >= GnssOutcome.Kind.values().length) {
            throw new IOException("filter state: no fix decision numbered " + lastKind);
        }
        if (probation < 0 || probation >= Reacquisition.Probation.values().length) {
            throw new IOException("filter state: no probation numbered " + probation);
        }
    }

    /** Time of the estimate (s since the session epoch), NaN before the first event. */
    public double tRel() {
        return tRel;
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

    /** The decision on the newest fix, null before any. */
    GnssOutcome.Kind lastKind() {
        return lastKind < 0 ? null : GnssOutcome.Kind.values()[lastKind];
    }

    /**
     * The fields of the state, in codec order. Each entry knows how to copy, write and read its field.
     */
    private static final List<Field> FIELDS = List.of(
            Field.doubles(s -> s.x),
            Field.doubles(s -> s.p),
            Field.flag(s -> s.initialized, (s, v) -> s.initialized = v),
            Field.real(s -> s.tRel, (s, v) -> s.tRel = v),
            Field.real(s -> s.upM, (s, v) -> s.upM = v),
            Field.real(s -> s.varUpM2, (s, v) -> s.varUpM2 = v),
            Field.real(s -> s.wheelSpeedMps, (s, v) -> s.wheelSpeedMps = v),
            Field.real(s -> s.wheelSpeedTRel, (s, v) -> s.wheelSpeedTRel = v),
            Field.real(s -> s.previousWheelSpeedMps, (s, v) -> s.previousWheelSpeedMps = v),
            Field.real(s -> s.previousWheelSpeedTRel, (s, v) -> s.previousWheelSpeedTRel = v),
            Field.real(s -> s.yawRateRadPerS, (s, v) -> s.yawRateRadPerS = v),
            Field.real(s -> s.yawRateTRel, (s, v) -> s.yawRateTRel = v),
            Field.real(s -> s.previousYawRateRadPerS, (s, v) -> s.previousYawRateRadPerS = v),
            Field.real(s -> s.previousYawRateTRel, (s, v) -> s.previousYawRateTRel = v),
            Field.flag(s -> s.hasYawRate, (s, v) -> s.hasYawRate = v),
            Field.real(s -> s.zeroSpeedSinceTRel, (s, v) -> s.zeroSpeedSinceTRel = v),
            Field.flag(s -> s.standstill, (s, v) -> s.standstill = v),
            Field.real(s -> s.correlatedVarM2, (s, v) -> s.correlatedVarM2 = v),
            Field.real(s -> s.odometerM, (s, v) -> s.odometerM = v),
            Field.real(s -> s.lastUsedFixTRel, (s, v) -> s.lastUsedFixTRel = v),
            Field.real(s -> s.lastFixTRel, (s, v) -> s.lastFixTRel = v),
            Field.real(s -> s.odometerAtLastUsedFixM, (s, v) -> s.odometerAtLastUsedFixM = v),
            Field.integer(s -> s.lastKind, (s, v) -> s.lastKind = v),
            Field.real(s -> s.lastNis, (s, v) -> s.lastNis = v),
            Field.real(s -> s.anchorEastM, (s, v) -> s.anchorEastM = v),
            Field.real(s -> s.anchorNorthM, (s, v) -> s.anchorNorthM = v),
            Field.real(s -> s.anchorOdometerM, (s, v) -> s.anchorOdometerM = v),
            Field.integer(s -> s.probation, (s, v) -> s.probation = v),
            Field.rows(s -> s.pending),
            Field.integer(s -> s.pendingCount, (s, v) -> s.pendingCount = v),
            Field.longs(s -> s.counts));

    /** One field of the state: how to copy it between states and how to write and read it. */
    private interface Field {
        void copy(FilterState from, FilterState to);

        void write(FilterState s, DataOutput out) throws IOException;

        void read(FilterState s, DataInput in) throws IOException;

        static Field real(ToDoubleFunction<FilterState> get, ObjDoubleSetter set) {
            return new Field() {
                @Override
                public void copy(FilterState from, FilterState to) {
                    set.accept(to, get.applyAsDouble(from));
                }

                @Override
                public void write(FilterState s, DataOutput out) throws IOException {
                    out.writeDouble(get.applyAsDouble(s));
                }

                @Override
                public void read(FilterState s, DataInput in) throws IOException {
                    set.accept(s, in.readDouble());
                }
            };
        }

        static Field integer(ToIntFunction<FilterState> get, ObjIntConsumer<FilterState> set) {
            return new Field() {
                @Override
                public void copy(FilterState from, FilterState to) {
                    set.accept(to, get.applyAsInt(from));
                }

                @Override
                public void write(FilterState s, DataOutput out) throws IOException {
                    out.writeInt(get.applyAsInt(s));
                }

                @Override
                public void read(FilterState s, DataInput in) throws IOException {
                    set.accept(s, in.readInt());
                }
            };
        }

        static Field flag(java.util.function.Predicate<FilterState> get, ObjBooleanSetter set) {
            return new Field() {
                @Override
                public void copy(FilterState from, FilterState to) {
                    set.accept(to, get.test(from));
                }

                @Override
                public void write(FilterState s, DataOutput out) throws IOException {
                    out.writeBoolean(get.test(s));
                }

                @Override
                public void read(FilterState s, DataInput in) throws IOException {
                    set.accept(s, in.readBoolean());
                }
            };
        }

        /** A fixed-length array of doubles owned by the state. */
        static Field doubles(Function<FilterState, double[]> get) {
            return new Field() {
                @Override
                public void copy(FilterState from, FilterState to) {
                    double[] src = get.apply(from);
                    System.arraycopy(src, 0, get.apply(to), 0, src.length);
                }

                @Override
                public void write(FilterState s, DataOutput out) throws IOException {
                    double[] a = get.apply(s);
                    out.writeInt(a.length);
                    for (double v : a) {
                        out.writeDouble(v);
                    }
                }

                @Override
                public void read(FilterState s, DataInput in) throws IOException {
                    double[] a = get.apply(s);
                    readLength(in, a.length);
                    for (int i = 0; i < a.length; i++) {
                        a[i] = in.readDouble();
                    }
                }
            };
        }

        /** A fixed-length array of counters owned by the state. */
        static Field longs(Function<FilterState, long[]> get) {
            return new Field() {
                @Override
                public void copy(FilterState from, FilterState to) {
                    long[] src = get.apply(from);
                    System.arraycopy(src, 0, get.apply(to), 0, src.length);
                }

                @Override
                public void write(FilterState s, DataOutput out) throws IOException {
                    long[] a = get.apply(s);
                    out.writeInt(a.length);
                    for (long v : a) {
                        out.writeLong(v);
                    }
                }

                @Override
                public void read(FilterState s, DataInput in) throws IOException {
                    long[] a = get.apply(s);
                    readLength(in, a.length);
                    for (int i = 0; i < a.length; i++) {
                        a[i] = in.readLong();
                    }
                }
            };
        }

        /** Rows of equal, fixed length owned by the state. */
        static Field rows(Function<FilterState, double[][]> get) {
            return new Field() {
                @Override
                public void copy(FilterState from, FilterState to) {
                    double[][] src = get.apply(from);
                    double[][] dst = get.apply(to);
                    for (int i = 0; i < src.length; i++) {
                        System.arraycopy(src[i], 0, dst[i], 0, src[i].length);
                    }
                }

                @Override
                public void write(FilterState s, DataOutput out) throws IOException {
                    double[][] a = get.apply(s);
                    out.writeInt(a.length);
                    for (double[] row : a) {
                        for (double v : row) {
                            out.writeDouble(v);
                        }
                    }
                }

                @Override
                public void read(FilterState s, DataInput in) throws IOException {
                    double[][] a = get.apply(s);
                    readLength(in, a.length);
                    for (double[] row : a) {
                        for (int j = 0; j < row.length; j++) {
                            row[j] = in.readDouble();
                        }
                    }
                }
            };
        }

        private static void readLength(DataInput in, int expected) throws IOException {
            int n = in.readInt();
            if (n != expected) {
                throw new IOException("filter state: an array of " + n + " entries where " + expected
                        + " were expected");
            }
        }
    }

    @FunctionalInterface
    private interface ObjDoubleSetter {
        void accept(FilterState s, double v);
    }

    @FunctionalInterface
    private interface ObjBooleanSetter {
        void accept(FilterState s, boolean v);
    }
}
