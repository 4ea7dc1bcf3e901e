package org.wayhold.accuracy;

import org.wayhold.settings.FilterSettings;
import org.wayhold.settings.Settings;

/**
 * The defaults with the model terms switched off that stand for effects the simulator's default drive
 * does not have (a yaw-rate error proportional to the rate, sideslip, tyre growth): the filter's model
 * then matches the simulated sensors, and a consistency test (NEES, inside95) tests the mechanics
 * rather than how conservative those terms make it. The realistic effects are scored with the full
 * defaults by the effect study.
 */
final class MatchedSettings {

    private MatchedSettings() {
    }

    static Settings settings() {
        Settings d = Settings.defaults();
        FilterSettings f = d.filter();
        FilterSettings matched = new FilterSettings(f.wheelSpeedNoiseMps(), f.wheelSpeedRateHz(), f.gyroNoiseRadPerS(),
                f.gyroRateHz(), f.gyroBiasRandomWalkRadPerSPerSqrtS(), f.speedScaleRandomWalkPerSqrtS(),
                f.initialYawSigmaRad(), f.initialGyroBiasSigmaRadPerS(), f.initialSpeedScaleSigma(), f.gnssFloorM(),
                f.gnssRangeErrorM(), f.gnssDefaultSigmaM(), f.gnssFixScale(), f.gnssCorrelatedShare(),
                f.gnssCorrelationTimeS(), f.gnssVelocityMinSpeedMps(), f.gnssSpeedSigmaMps(), f.gnssCourseSigmaDeg(),
                f.standstillAfterS(), f.headingInitMinDistanceM(), f.initialGyroScaleSigma(),
                f.gyroScaleRandomWalkPerSqrtS(), 0.0, 0.0, f.wheelSpeedZeroBelowMps(), f.minTurnRadiusM(),
                f.gnssHdopFloorM(), 0.0);
        return new Settings(d.server(), matched, d.gating(), d.outage(), d.ordering(), d.history(), d.vehicles(),
                d.journal(), d.ingest());
    }
}
