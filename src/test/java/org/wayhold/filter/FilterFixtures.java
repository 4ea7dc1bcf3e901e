package org.wayhold.filter;

import org.wayhold.sample.GnssFix;
import org.wayhold.settings.FilterSettings;
import org.wayhold.settings.GatingSettings;
import org.wayhold.settings.OutageSettings;
import org.wayhold.settings.VehicleProfile;

/** Settings and starting points shared by the filter tests. */
final class FilterFixtures {

    private FilterFixtures() {
    }

    /**
     * Filter settings with the given sensor noises, random walks and initial sigmas; the GNSS part is
     * the built-in default except the default sigma and the correlated share and time.
     */
    static FilterSettings settings(double wheelNoiseMps, double wheelRateHz, double gyroNoiseRadPerS,
                                   double gyroRateHz, double biasWalk, double scaleWalk, double gnssDefaultSigmaM,
                                   double correlatedShare, double correlationTimeS) {
        FilterSettings d = FilterSettings.defaults();
        return new FilterSettings(wheelNoiseMps, wheelRateHz, gyroNoiseRadPerS, gyroRateHz, biasWalk, scaleWalk,
                d.initialYawSigmaRad(), d.initialGyroBiasSigmaRadPerS(), d.initialSpeedScaleSigma(),
                d.gnssFloorM(), d.gnssRangeErrorM(), gnssDefaultSigmaM, null, correlatedShare, correlationTimeS,
                d.gnssVelocityMinSpeedMps(), d.gnssSpeedSigmaMps(), d.gnssCourseSigmaDeg(), d.standstillAfterS(),
                d.headingInitMinDistanceM(), 0.0, 0.0, 0.0, 0.0, d.wheelSpeedZeroBelowMps(), d.minTurnRadiusM(), 0.0);
    }

    /** No sensor noise, no random walks, no correlated GNSS error: pure dead reckoning. */
    static FilterSettings noiseless() {
        return settings(0.0, 50.0, 0.0, 100.0, 0.0, 0.0, 1.0, 0.0, 30.0);
    }

    static NavigationFilter filter(FilterSettings settings, GatingSettings gating, VehicleProfile profile) {
        return new NavigationFilter(settings, gating, OutageSettings.defaults(), profile);
    }

    /** A position-only fix; latitude and longitude are unused because the test passes ENU directly. */
    static GnssFix fix(double t, double sigmaHM) {
        return GnssFix.position(t, 0.0, 0.0, sigmaHM);
    }

    static double[] state(double eastM, double northM, double yawRad, double biasRadPerS, double scale,
                          double errEastM, double errNorthM) {
        return new double[] {eastM, northM, yawRad, biasRadPerS, scale, errEastM, errNorthM};
    }

    static double[] diagonal(double... variances) {
        int n = variances.length;
        double[] m = new double[n * n];
        for (int i = 0; i < n; i++) {
            m[i * n + i] = variances[i];
        }
        return m;
    }
}
