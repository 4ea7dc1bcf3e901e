package org.wayhold.scoring;

/**
 * Where the vehicle really was, in the scoring's ENU frame: the reference trajectory of a log, the
 * withheld fixes, or a simulator's truth.
 */
public interface ReferenceTrack {

    /** True when the reference is known at {@code tS} (s, vehicle clock). */
    boolean covers(double tS);

    /** East of the vehicle reference point at {@code tS} (m). */
    double eastAt(double tS);

    /** North of the vehicle reference point at {@code tS} (m). */
    double northAt(double tS);

    /** Yaw at {@code tS} (rad, counter-clockwise from east), NaN when unknown. */
    double yawAt(double tS);

    /**
     * True when the reference is known at any time it covers (a trajectory, a simulator's truth), so a
     * window is evaluated on a regular time step; false when it is known only at its own points (the
     * withheld fixes), which are then the evaluation times.
     */
    default boolean continuous() {
        return true;
    }

    /**
     * True when the reference's points are positions of the GNSS antenna (the withheld fixes) rather
     * than of the vehicle reference point: the estimate compared with them is then the filter's antenna
     * position, its reference point moved by the configured lever arm at the estimated yaw, so that a
     * lever arm does not count as error.
     */
    default boolean atAntenna() {
        return false;
    }

    /**
     * The times of the reference's own points in {@code [fromT, toT]} (s, vehicle clock, ascending);
     * only asked of a reference that is not {@link #continuous()}.
     */
    default double[] timesWithin(double fromT, double toT) {
        throw new UnsupportedOperationException("a continuous reference has no discrete times");
    }
}
