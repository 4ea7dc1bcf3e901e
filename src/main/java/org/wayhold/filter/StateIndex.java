package org.wayhold.filter;

/**
 * Positions of the quantities in the filter's state vector.
 *
 * <p>The GNSS error states model the slowly wandering part of a standalone receiver's error as a
 * first-order Gauss-Markov process per horizontal axis (Groves, <i>Principles of GNSS, Inertial, and
 * Multisensor Integrated Navigation Systems</i>, 2nd ed., sec. 9.4 and 14.2.7 on correlated range
 * errors). Without them the filter averages a wandering error as if it were white and enters a tunnel
 * overconfident.
 */
public final class StateIndex {
    /** East of the vehicle reference point (m, ENU). */
    public static final int EAST = 0;
    /** North of the vehicle reference point (m, ENU). */
    public static final int NORTH = 1;
    /** Yaw, counter-clockwise from east (rad). */
    public static final int YAW = 2;
    /** Gyro bias: measured yaw rate minus true yaw rate (rad/s). */
    public static final int GYRO_BIAS = 3;
    /** Wheel-speed scale: true speed = scale * wheel speed (unitless, near 1). */
    public static final int SPEED_SCALE = 4;
    /** Time-correlated GNSS error, east (m). */
    public static final int GNSS_ERR_EAST = 5;
    /** Time-correlated GNSS error, north (m). */
    public static final int GNSS_ERR_NORTH = 6;
    /** Number of states. */
    public static final int SIZE = 7;

    private StateIndex() {
    }
}
