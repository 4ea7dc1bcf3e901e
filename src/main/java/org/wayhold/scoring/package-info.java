/**
 * Drift scoring: replays a drive with GNSS withheld in chosen windows and measures how far the
 * dead-reckoned estimate drifts from a reference, and how honest its covariance was.
 *
 * <p>Frames and units: errors are metres in one local ENU frame shared by the estimate and the
 * reference; times are seconds on the vehicle's clock; NEES is the normalised estimation error
 * squared of the horizontal position (unitless, 2 degrees of freedom).
 */
package org.wayhold.scoring;
