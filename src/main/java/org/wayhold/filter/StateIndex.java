package org.wayhold.filter;

/**
 * Positions of the quantities in the filter's state vector.
 *
 * <p>Besides the pose (east, north, yaw) the state holds what must be learnt about the sensors for
 * dead reckoning to stay honest: the gyro's bias and scale factor, the wheel-speed scale factor, and
 * the GNSS antenna's lever arm and time stamp latency. The GNSS error states model the slowly
 * wandering part of a standalone receiver's error as a first-order Gauss-Markov process per
 * horizontal axis (Groves, <i>Principles of GNSS, Inertial, and Multisensor Integrated Navigation
 * Systems</i>, 2nd ed., sec. 9.4 and 14.2.7 on correlated range errors). Without them the filter
 * averages a wandering error as if it were white and enters a tunnel overconfident.
 *
 * <p>Adding a state: a constant here (and {@link #SIZE}), its prior in {@link Alignment}, its
 * dynamics in {@link MotionModel} (with {@link MotionModel#COUPLINGS}) and its noise in
 * {@link ProcessNoise}, and its column in the measurement models that see it.
 */
public final class StateIndex {
    /** East of the vehicle reference point (m, ENU). */
    public static final int EAST = 0;
    /** North of the vehicle reference point (m, ENU). */
    public static final int NORTH = 1;
    /** Yaw, counter-clockwise from east (rad). */
    public static final int YAW = 2;
    /** Gyro bias: the reading at rest (rad/s). */
    public static final int GYRO_BIAS = 3;
    /** Wheel-speed scale: true speed = scale * wheel speed (unitless, near 1). */
    public static final int SPEED_SCALE = 4;
    /** Gyro scale: true yaw rate = scale * (reading - bias) (unitless, near 1). */
    public static final int GYRO_SCALE = 5;
    /** Time-correlated GNSS error, east (m). */
    public static final int GNSS_ERR_EAST = 6;
    /** Time-correlated GNSS error, north (m). */
    public static final int GNSS_ERR_NORTH = 7;
    /** GNSS antenna ahead of the reference point (m, vehicle frame). */
    public static final int LEVER_FORWARD = 8;
    /** GNSS antenna left of the reference point (m, vehicle frame). */
    public static final int LEVER_LEFT = 9;
    /** Time from a fix's time of validity to its stamp (s). */
    public static final int GNSS_LATENCY = 10;
    /** Number of states. */
    public static final int SIZE = 11;

    private StateIndex() {
    }
}
