/**
 * Calibration: one vehicle's sensor profile fitted to its recorded drives by maximum likelihood of the
 * filter's innovations (the prediction-error decomposition: Schweppe, "Evaluation of likelihood
 * functions for Gaussian signals", IEEE Trans. Information Theory 11(1), 1965; Harvey, <i>Forecasting,
 * structural time series models and the Kalman filter</i>, 1989, ch. 3).
 *
 * <p>Flow ({@link org.wayhold.calibration.Calibration#fit}): check what the drives can support
 * ({@link org.wayhold.calibration.DriveSupport}); take the wheel-speed and gyro reading noise from the
 * readings themselves ({@link org.wayhold.calibration.ReadingNoise}); run the filter once with the
 * constants as states and start from their converged estimates; then maximise the log-likelihood of
 * the position innovations over the parameters ({@link org.wayhold.calibration.Parameter}), each
 * evaluation a replay of the drives through the same {@link org.wayhold.pipeline.VehicleTrack} the
 * service and {@code score} run ({@link org.wayhold.calibration.InnovationLikelihood}); keep only what
 * the likelihood supports. {@link org.wayhold.calibration.HoldOut} scores drives the fit did not see.
 *
 * <p>Units: SI and radians as in the filter; times in seconds on the vehicle's clock; log-likelihoods
 * in nats.
 */
package org.wayhold.calibration;
