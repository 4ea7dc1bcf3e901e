package org.wayhold.pose;

import java.util.function.ToDoubleFunction;
import org.wayhold.geo.Geodetic;

/**
 * The layout of a pose as numbers: the one table of its double fields, in order, shared by the
 * history's columns ({@link PoseHistory}) and the binary form of snapshots ({@link PoseCodec}). The
 * order is part of the snapshot format: a new field goes at the end.
 *
 * <p>Besides the doubles a pose has its navigation state, whether its outage is active, and the origin
 * of its frame; each user keeps those in its own way.
 */
enum PoseColumns {
    T(Pose::t),
    LAT(Pose::latDeg),
    LON(Pose::lonDeg),
    ALT(Pose::altM),
    EAST(Pose::eastM),
    NORTH(Pose::northM),
    UP(Pose::upM),
    HEADING(Pose::headingDeg),
    SPEED(Pose::speedMps),
    YAW_RATE(Pose::yawRateRadPerS),
    COV_EE(Pose::covEastEastM2),
    COV_EN(Pose::covEastNorthM2),
    COV_NN(Pose::covNorthNorthM2),
    HEADING_SIGMA(Pose::headingSigmaDeg),
    SEMI_MAJOR(p -> p.ellipse95().semiMajorM()),
    SEMI_MINOR(p -> p.ellipse95().semiMinorM()),
    ORIENTATION(p -> p.ellipse95().orientationDeg()),
    OUTAGE_SINCE(p -> p.outage().sinceT()),
    OUTAGE_SECONDS(p -> p.outage().seconds()),
    OUTAGE_METERS(p -> p.outage().meters()),
    GYRO_BIAS(Pose::gyroBiasRadPerS),
    SPEED_SCALE(Pose::speedScale),
    LAST_FIX_T(Pose::lastFixT),
    ALERT_LIMIT(Pose::alertLimitM),
    RADIUS95(Pose::radius95M),
    /** The set of reasons' bits, exact in a double. */
    REASONS(Pose::reasons);

    /** Doubles per pose (count). */
    static final int COUNT = values().length;

    private static final PoseColumns[] ALL = values();
    private static final NavState[] STATES = NavState.values();

    private final ToDoubleFunction<Pose> field;

    PoseColumns(ToDoubleFunction<Pose> field) {
        this.field = field;
    }

    /** Writes the pose's doubles to {@code v[offset .. offset + COUNT)}, in table order. */
    static void write(Pose p, double[] v, int offset) {
        for (PoseColumns c : ALL) {
            v[offset + c.ordinal()] = c.field.applyAsDouble(p);
        }
    }

    /**
     * Builds a pose from doubles written by {@link #write} and the fields kept apart.
     *
     * @throws IllegalArgumentException when the state code is unknown or a record refuses a value
     */
    static Pose read(double[] v, int o, int stateCode, boolean outageActive, Geodetic origin) {
        if (stateCode < 0 || stateCode >= STATES.length) {
            throw new IllegalArgumentException("state: unknown navigation state code " + stateCode);
        }
        return new Pose(v[o + T.ordinal()], v[o + LAT.ordinal()], v[o + LON.ordinal()], v[o + ALT.ordinal()],
                v[o + EAST.ordinal()], v[o + NORTH.ordinal()], v[o + UP.ordinal()], v[o + HEADING.ordinal()],
                v[o + SPEED.ordinal()], v[o + YAW_RATE.ordinal()], v[o + COV_EE.ordinal()], v[o + COV_EN.ordinal()],
                v[o + COV_NN.ordinal()], v[o + HEADING_SIGMA.ordinal()],
                new Ellipse95(v[o + SEMI_MAJOR.ordinal()], v[o + SEMI_MINOR.ordinal()], v[o + ORIENTATION.ordinal()]),
                STATES[stateCode],
                new Outage(outageActive, v[o + OUTAGE_SINCE.ordinal()], v[o + OUTAGE_SECONDS.ordinal()],
                        v[o + OUTAGE_METERS.ordinal()]),
                v[o + GYRO_BIAS.ordinal()], v[o + SPEED_SCALE.ordinal()], origin, v[o + LAST_FIX_T.ordinal()],
                v[o + ALERT_LIMIT.ordinal()], v[o + RADIUS95.ordinal()], (int) v[o + REASONS.ordinal()]);
    }
}
