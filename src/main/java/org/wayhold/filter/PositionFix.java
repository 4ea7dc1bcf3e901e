package org.wayhold.filter;

import static org.wayhold.filter.StateIndex.EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_NORTH;
import static org.wayhold.filter.StateIndex.GNSS_LATENCY;
import static org.wayhold.filter.StateIndex.LEVER_FORWARD;
import static org.wayhold.filter.StateIndex.LEVER_LEFT;
import static org.wayhold.filter.StateIndex.NORTH;
import static org.wayhold.filter.StateIndex.SIZE;
import static org.wayhold.filter.StateIndex.SPEED_SCALE;
import static org.wayhold.filter.StateIndex.YAW;

import java.util.Arrays;

/**
 * The measurement model of a GNSS position fix. A fix is where the antenna was at its time of
 * validity, which lies the latency L before the time it is stamped with, plus the correlated GNSS
 * error:
 * <pre>
 *   h(x) = (east, north) + R(yaw) (forward, left) - v L (cos yaw, sin yaw) + (error east, error north)
 * </pre>
 * with v the current speed (scale times wheel speed). Over a latency of a few hundred milliseconds the
 * change of yaw and speed moves the antenna by centimetres, which this first-order form leaves out.
 * R is the fix's white variance per axis.
 */
final class PositionFix {

    /**
     * The lever arm is learnt only while the vehicle turns faster than this (rad/s, about 3 deg/s): on a
     * straight road an antenna offset looks like a position offset, and the state would soak up
     * whatever else the position is off by.
     */
    static final double LEVER_OBSERVABLE_RAD_PER_S = 0.05;
    /** The latency is learnt only above this speed (m/s): below it the distance it hides is centimetres. */
    static final double LATENCY_OBSERVABLE_MPS = 3.0;

    private PositionFix() {
    }

    /**
     * Marks the lever-arm and latency states as consider states of the next update unless the motion
     * makes them observable.
     *
     * @param omegaRadPerS the current turn rate (rad/s)
     * @param speedMps     the current speed (m/s)
     */
    static void freezeUnobservable(JosephUpdate u, double omegaRadPerS, double speedMps) {
        if (Math.abs(omegaRadPerS) < LEVER_OBSERVABLE_RAD_PER_S) {
            u.frozen[LEVER_FORWARD] = true;
            u.frozen[LEVER_LEFT] = true;
        }
        if (Math.abs(speedMps) < LATENCY_OBSERVABLE_MPS) {
            u.frozen[GNSS_LATENCY] = true;
        }
    }

    /**
     * Fills H, R and the innovation of a fix into {@code u}, prepares it, and returns its normalised
     * innovation squared.
     *
     * @param x             the state (not modified)
     * @param p             its covariance (not modified)
     * @param wheelSpeedMps the current wheel speed (m/s, signed)
     * @param u             receives the measurement
     * @param eastM         fix east (m, ENU)
     * @param northM        fix north (m, ENU)
     * @param whiteVar      white variance of the fix per axis (m^2)
     */
    static double innovation(double[] x, double[] p, double wheelSpeedMps, JosephUpdate u, double eastM,
                             double northM, double whiteVar) {
        double[] h = u.h;
        double c = Math.cos(x[YAW]);
        double s = Math.sin(x[YAW]);
        double fwd = x[LEVER_FORWARD];
        double left = x[LEVER_LEFT];
        double v = x[SPEED_SCALE] * wheelSpeedMps;
        double back = v * x[GNSS_LATENCY];
        double antEast = x[EAST] + fwd * c - left * s - back * c + x[GNSS_ERR_EAST];
        double antNorth = x[NORTH] + fwd * s + left * c - back * s + x[GNSS_ERR_NORTH];
        Arrays.fill(h, 0.0);
        h[EAST] = 1.0;
        h[YAW] = -fwd * s - left * c + back * s;
        h[SPEED_SCALE] = -wheelSpeedMps * x[GNSS_LATENCY] * c;
        h[GNSS_ERR_EAST] = 1.0;
        h[LEVER_FORWARD] = c;
        h[LEVER_LEFT] = -s;
        h[GNSS_LATENCY] = -v * c;
        h[SIZE + NORTH] = 1.0;
        h[SIZE + YAW] = fwd * c - left * s - back * c;
        h[SIZE + SPEED_SCALE] = -wheelSpeedMps * x[GNSS_LATENCY] * s;
        h[SIZE + GNSS_ERR_NORTH] = 1.0;
        h[SIZE + LEVER_FORWARD] = s;
        h[SIZE + LEVER_LEFT] = c;
        h[SIZE + GNSS_LATENCY] = -v * s;
        u.r[0] = whiteVar;
        u.r[1] = 0.0;
        u.r[2] = 0.0;
        u.r[3] = whiteVar;
        u.nu[0] = eastM - antEast;
        u.nu[1] = northM - antNorth;
        u.prepare(p, 2);
        return u.nis();
    }

    /** The antenna's east offset from the reference point (m), at rest. */
    static double antennaEastOffsetM(double[] x) {
        return x[LEVER_FORWARD] * Math.cos(x[YAW]) - x[LEVER_LEFT] * Math.sin(x[YAW]);
    }

    /** The antenna's north offset from the reference point (m), at rest. */
    static double antennaNorthOffsetM(double[] x) {
        return x[LEVER_FORWARD] * Math.sin(x[YAW]) + x[LEVER_LEFT] * Math.cos(x[YAW]);
    }
}
