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
}
