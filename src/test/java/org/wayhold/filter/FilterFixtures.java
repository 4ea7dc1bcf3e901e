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
                d.headingInitMinDistanceM(), 0.0, 0.0, 0.0, 0.0, d.wheelSpeedZeroBelowMps(), d.minTurnRadiusM(), 0.0,
                0.0);
    }

    /** No sensor noise, no random walks, no correlated GNSS error: pure dead reckoning. */
    static FilterSettings noiseless() {
        return settings(0.0, 50.0, 0.0, 100.0, 0.0, 0.0, 1.0, 0.0, 30.0);
    }

    static NavigationFilter filter(FilterSettings settings, GatingSettings gating, VehicleProfile profile) {
        return new NavigationFilter(settings, gating, OutageSettings.defaults(), profile);
    }

    static NavigationFilter filter(FilterSettings settings, GatingSettings gating, OutageSettings outage,
                                   VehicleProfile profile) {
        return new NavigationFilter(settings, gating, outage, profile);
    }

    /** A position-only fix; latitude and longitude are unused because the test passes ENU directly. */
    static GnssFix fix(double t, double sigmaHM) {
        return GnssFix.position(t, 0.0, 0.0, sigmaHM);
    }

    /**
     * A state with the gyro scale at 1, the antenna at the reference point and no latency.
     */
    static double[] state(double eastM, double northM, double yawRad, double biasRadPerS, double scale,
                          double errEastM, double errNorthM) {
        double[] x = new double[StateIndex.SIZE];
        x[StateIndex.EAST] = eastM;
        x[StateIndex.NORTH] = northM;
        x[StateIndex.YAW] = yawRad;
        x[StateIndex.GYRO_BIAS] = biasRadPerS;
        x[StateIndex.SPEED_SCALE] = scale;
        x[StateIndex.GYRO_SCALE] = 1.0;
        x[StateIndex.GNSS_ERR_EAST] = errEastM;
        x[StateIndex.GNSS_ERR_NORTH] = errNorthM;
        return x;
    }

    /** The same state with the antenna at (forward, left) of the reference point (m). */
    static double[] withLever(double[] x, double forwardM, double leftM) {
        double[] y = x.clone();
        y[StateIndex.LEVER_FORWARD] = forwardM;
        y[StateIndex.LEVER_LEFT] = leftM;
        return y;
    }

    /**
     * A diagonal covariance with these variances of the states named as in {@link #state}; gyro scale,
     * lever arm and latency are known exactly (variance 0).
     */
    static double[] diagonal(double east, double north, double yaw, double bias, double scale, double errEast,
                             double errNorth) {
        int n = StateIndex.SIZE;
        double[] m = new double[n * n];
        m[StateIndex.EAST * n + StateIndex.EAST] = east;
        m[StateIndex.NORTH * n + StateIndex.NORTH] = north;
        m[StateIndex.YAW * n + StateIndex.YAW] = yaw;
        m[StateIndex.GYRO_BIAS * n + StateIndex.GYRO_BIAS] = bias;
        m[StateIndex.SPEED_SCALE * n + StateIndex.SPEED_SCALE] = scale;
        m[StateIndex.GNSS_ERR_EAST * n + StateIndex.GNSS_ERR_EAST] = errEast;
        m[StateIndex.GNSS_ERR_NORTH * n + StateIndex.GNSS_ERR_NORTH] = errNorth;
        return m;
    }
}
