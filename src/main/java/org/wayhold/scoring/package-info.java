/**
 * Drift scoring: replays a drive with GNSS withheld in chosen windows and measures how far the
 * dead-reckoned estimate drifts from a reference, and how honest its covariance was.
 *
 * <p>Frames and units: errors are metres in one local ENU frame shared by the estimate and the
 * reference; times are seconds on the vehicle's clock; NEES is the normalised estimation error
 * squared of the horizontal position (unitless, 2 degrees of freedom).
 *
 * <p>Flow of an offline scoring ({@link org.wayhold.scoring.ScoringRun}): survey each log once per
 * configuration ({@link org.wayhold.scoring.DriveSurvey}: aided runs and saved filter states on a 1 s
 * grid, and the log's odometry gaps), choose windows clear of real gaps in the fixes and of odometry gaps
 * ({@link org.wayhold.scoring.WindowPlan}), score them from the
 * saved states ({@link org.wayhold.scoring.OutageReplay#runFrom}), sum them up per length
 * ({@link org.wayhold.scoring.LengthSummary}, R-7 quantiles in {@link org.wayhold.scoring.Quantiles}).
 */
package org.wayhold.scoring;
