package org.wayhold.calibration;

import java.util.List;
import java.util.Map;
import org.wayhold.settings.Settings;

/**
 * What a calibration found.
 *
 * @param settings            the calibrated configuration: the base with the fitted filter noise and
 *                            vehicle profile
 * @param estimates           per fitted parameter
 * @param wheelNoiseMps       wheel-speed reading noise from the readings (m/s; the configured value when
 *                            the readings did not allow an estimate, see notes)
 * @param configuredWheelNoiseMps the configured wheel-speed reading noise (m/s)
 * @param wheelFlatness       fall of ln L when the wheel-speed noise is multiplied by 1.5 (nats; near 0 or
 *                            negative: the innovations cannot tell it)
 * @param gyroNoiseRadPerS    yaw-rate reading noise from the readings (rad/s)
 * @param configuredGyroNoiseRadPerS the configured yaw-rate reading noise (rad/s)
 * @param gyroFlatness        fall of ln L when the gyro noise is multiplied by 1.5 (nats)
 * @param gyroBiasRadPerS     the calibrated filter's mean gyro-bias estimate over the second half of each
 *                            drive (rad/s): reported, not written (a bias changes from one power-on to the
 *                            next, and the filter learns it online)
 * @param startLogLikelihood  ln L at the optimiser's start (nats)
 * @param logLikelihood       ln L at the estimate (nats)
 * @param countedFixes        fixes whose innovations make up ln L (count)
 * @param evaluations         likelihood evaluations of the optimiser (count)
 * @param configuredMeanNis   mean NIS of the counted fixes with the configured settings (2 when consistent)
 * @param calibratedMeanNis   the same with the calibrated settings
 * @param support             what the drives support
 * @param notes               anything else left at the configured value, and why
 */
public record CalibrationResult(Settings settings, Map<Parameter, Estimate> estimates, double wheelNoiseMps,
                                double configuredWheelNoiseMps, double wheelFlatness, double gyroNoiseRadPerS,
                                double configuredGyroNoiseRadPerS, double gyroFlatness, double gyroBiasRadPerS,
                                double startLogLikelihood, double logLikelihood, int countedFixes, int evaluations,
                                double configuredMeanNis, double calibratedMeanNis, DriveSupport support,
                                List<String> notes) {

    public CalibrationResult {
        estimates = Map.copyOf(estimates);
        notes = List.copyOf(notes);
    }

    /** The estimate of a parameter. */
    public Estimate estimate(Parameter p) {
        return estimates.get(p);
    }

    /** The parameters left at their configured values. */
    public List<Parameter> leftAtConfigured() {
        return java.util.Arrays.stream(Parameter.values()).filter(p -> !estimates.get(p).kept()).toList();
    }
}
