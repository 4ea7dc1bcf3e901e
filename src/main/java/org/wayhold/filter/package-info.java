/**
 * The extended Kalman filter that fuses wheel speed, yaw rate and GNSS fixes.
 *
 * <p>Frames and units: positions are metres in the session's local east-north-up (ENU) frame; yaw is
 * radians counter-clockwise from east; rates are rad/s; times are seconds relative to the session
 * epoch (never raw epoch seconds, so no precision is lost near 1.8e9 s).
 *
 * <p>Matrix symbols are used only in this package and mean, for the {@value
 * org.wayhold.filter.StateIndex#SIZE}-element state x:
 * <ul>
 *   <li>P (n x n) state covariance; F (n x n) state transition Jacobian; Q (n x n) process noise;</li>
 *   <li>H (m x n) measurement Jacobian; R (m x m) measurement noise; S = H P H' + R (m x m)
 *       innovation covariance; K = P H' S^-1 (n x m) gain.</li>
 * </ul>
 * The state layout is in {@link org.wayhold.filter.StateIndex}.
 */
package org.wayhold.filter;
