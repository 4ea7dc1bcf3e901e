package org.wayhold.settings;

import java.util.EnumMap;
import java.util.Map;
import org.wayhold.sample.FixType;

/**
 * Noise model and initial uncertainty of the extended Kalman filter. YAML section {@code filter}.
 *
 * @param wheelSpeedNoiseMps            1-sigma white noise of one wheel-speed reading (m/s)
 * @param wheelSpeedRateHz              nominal wheel-speed sample rate (Hz): the reading interval assumed until
 *                                      two readings show the real one
 * @param gyroNoiseRadPerS              1-sigma white noise of one yaw-rate reading (rad/s)
 * @param gyroRateHz                    nominal yaw-rate sample rate (Hz): the reading interval assumed until two
 *                                      readings show the real one
 * @param gyroBiasRandomWalkRadPerSPerSqrtS random walk of the gyro bias (rad/s per sqrt(s))
 * @param speedScaleRandomWalkPerSqrtS  random walk of the wheel-speed scale factor (1 per sqrt(s))
 * @param initialYawSigmaRad            1-sigma of the initial yaw when taken from a GNSS course (rad)
 * @param initialGyroBiasSigmaRadPerS   1-sigma of the gyro bias before calibration (rad/s)
 * @param initialSpeedScaleSigma        1-sigma of the wheel-speed scale before calibration (unitless)
 * @param gnssFloorM                    smallest 1-sigma horizontal GNSS error the filter will believe (m)
 * @param gnssRangeErrorM               user range error multiplied by HDOP when a fix has no sigma_h (m)
 * @param gnssDefaultSigmaM             1-sigma horizontal error assumed when a fix has neither sigma_h nor hdop (m)
 * @param gnssFixScale                  multiplier on the horizontal sigma per fix type (unitless)
 * @param gnssCorrelatedShare           share of the GNSS error variance that is time-correlated (0..1)
 * @param gnssCorrelationTimeS          correlation time of the first-order Gauss-Markov GNSS error (s)
 * @param gnssVelocityMinSpeedMps       GNSS speed and course are used only above this ground speed (m/s)
 * @param gnssSpeedSigmaMps             1-sigma of a GNSS ground speed (m/s)
 * @param gnssCourseSigmaDeg            1-sigma of a GNSS course at gnssVelocityMinSpeedMps, shrinking with 1/speed (deg)
 * @param standstillAfterS              wheel speed must stay zero this long before a standstill update (s)
 * @param headingInitMinDistanceM       displacement between fixes needed to take an initial yaw from them (m)
 * @param initialGyroScaleSigma         1-sigma of the gyro scale factor before calibration (unitless)
 * @param gyroScaleRandomWalkPerSqrtS   random walk of the gyro scale factor (1 per sqrt(s))
 * @param gyroRateProportionalNoise     1-sigma of yaw-rate errors proportional to the rate that no state
 *                                      models: mounting misalignment, body roll and pitch, timing (unitless)
 * @param sideslipRadPerMps2            sideslip angle of the reference point per lateral acceleration, as
 *                                      1-sigma of the unmodelled drift of the velocity off the yaw (rad per m/s^2)
 * @param wheelSpeedZeroBelowMps        wheel-speed sensors read zero below this speed (m/s): the speed of a
 *                                      vehicle creeping while its wheels read zero
 * @param minTurnRadiusM                smallest turn radius of the reference point (m): a vehicle turning at
 *                                      omega moves at least omega times this
 * @param gnssHdopFloorM                a fix's 1-sigma is at least its HDOP times this (m)
 * @param rollingRadiusGrowthAt30Mps    how much the tyres' rolling radius grows from standstill to 30 m/s,
 *                                      growing with the square of the speed (unitless): bounds how far a
 *                                      wheel-speed scale learnt at one speed may be off at another
 */
public record FilterSettings(
        double wheelSpeedNoiseMps,
        double wheelSpeedRateHz,
        double gyroNoiseRadPerS,
        double gyroRateHz,
        double gyroBiasRandomWalkRadPerSPerSqrtS,
        double speedScaleRandomWalkPerSqrtS,
        double initialYawSigmaRad,
        double initialGyroBiasSigmaRadPerS,
        double initialSpeedScaleSigma,
        double gnssFloorM,
        double gnssRangeErrorM,
        double gnssDefaultSigmaM,
        Map<FixType, Double> gnssFixScale,
        double gnssCorrelatedShare,
        double gnssCorrelationTimeS,
        double gnssVelocityMinSpeedMps,
        double gnssSpeedSigmaMps,
        double gnssCourseSigmaDeg,
        double standstillAfterS,
        double headingInitMinDistanceM,
        double initialGyroScaleSigma,
        double gyroScaleRandomWalkPerSqrtS,
        double gyroRateProportionalNoise,
        double sideslipRadPerMps2,
        double wheelSpeedZeroBelowMps,
        double minTurnRadiusM,
        double gnssHdopFloorM,
        double rollingRadiusGrowthAt30Mps) {

    public FilterSettings {
        Check.nonNegative("filter.wheel_speed_noise_mps", wheelSpeedNoiseMps);
        Check.positive("filter.wheel_speed_rate_hz", wheelSpeedRateHz);
        Check.nonNegative("filter.gyro_noise_rad_per_s", gyroNoiseRadPerS);
        Check.positive("filter.gyro_rate_hz", gyroRateHz);
        Check.nonNegative("filter.gyro_bias_random_walk_rad_per_s_per_sqrt_s", gyroBiasRandomWalkRadPerSPerSqrtS);
        Check.nonNegative("filter.speed_scale_random_walk_per_sqrt_s", speedScaleRandomWalkPerSqrtS);
        Check.nonNegative("filter.initial_yaw_sigma_rad", initialYawSigmaRad);
        Check.nonNegative("filter.initial_gyro_bias_sigma_rad_per_s", initialGyroBiasSigmaRadPerS);
        Check.nonNegative("filter.initial_speed_scale_sigma", initialSpeedScaleSigma);
        Check.positive("filter.gnss_floor_m", gnssFloorM);
        Check.positive("filter.gnss_range_error_m", gnssRangeErrorM);
        Check.positive("filter.gnss_default_sigma_m", gnssDefaultSigmaM);
        if (gnssCorrelatedShare < 0.0 || gnssCorrelatedShare >= 1.0 || Double.isNaN(gnssCorrelatedShare)) {
            throw new SettingsException("filter.gnss_correlated_share", "must lie in [0, 1), was " + gnssCorrelatedShare);
        }
        Check.positive("filter.gnss_correlation_time_s", gnssCorrelationTimeS);
        Check.nonNegative("filter.gnss_velocity_min_speed_mps", gnssVelocityMinSpeedMps);
        Check.positive("filter.gnss_speed_sigma_mps", gnssSpeedSigmaMps);
        Check.positive("filter.gnss_course_sigma_deg", gnssCourseSigmaDeg);
        Check.positive("filter.standstill_after_s", standstillAfterS);
        Check.positive("filter.heading_init_min_distance_m", headingInitMinDistanceM);
        Check.nonNegative("filter.initial_gyro_scale_sigma", initialGyroScaleSigma);
        Check.nonNegative("filter.gyro_scale_random_walk_per_sqrt_s", gyroScaleRandomWalkPerSqrtS);
        Check.nonNegative("filter.gyro_rate_proportional_noise", gyroRateProportionalNoise);
        Check.nonNegative("filter.sideslip_rad_per_mps2", sideslipRadPerMps2);
        Check.positive("filter.wheel_speed_zero_below_mps", wheelSpeedZeroBelowMps);
        Check.positive("filter.min_turn_radius_m", minTurnRadiusM);
        Check.nonNegative("filter.gnss_hdop_floor_m", gnssHdopFloorM);
        Check.nonNegative("filter.rolling_radius_growth_at_30_mps", rollingRadiusGrowthAt30Mps);
        EnumMap<FixType, Double> scales = new EnumMap<>(FixType.class);
        scales.putAll(defaultFixScale());
        if (gnssFixScale != null) {
            for (Map.Entry<FixType, Double> e : gnssFixScale.entrySet()) {
                Check.positive("filter.gnss_fix_scale." + e.getKey().wireName(), e.getValue());
                scales.put(e.getKey(), e.getValue());
            }
        }
        gnssFixScale = Map.copyOf(scales);
    }

    /** Multiplier on the horizontal sigma of a fix of this type. */
    public double fixScale(FixType fix) {
        return gnssFixScale.get(fix);
    }

    /**
     * Fix-type multipliers. Common practice, not a published table: a 2D fix is weaker than a 3D fix,
     * differential and RTK solutions are tighter.
     */
    public static Map<FixType, Double> defaultFixScale() {
        EnumMap<FixType, Double> m = new EnumMap<>(FixType.class);
        m.put(FixType.NONE, 10.0);
        m.put(FixType.TWO_D, 2.0);
        m.put(FixType.THREE_D, 1.0);
        m.put(FixType.DGNSS, 0.7);
        m.put(FixType.RTK_FLOAT, 0.5);
        m.put(FixType.RTK_FIXED, 0.5);
        return m;
    }

    /**
     * Built-in defaults, sized for production-grade wheel-speed and yaw-rate sensors of a passenger car
     * and a standalone GNSS receiver (values from common practice): a yaw-rate sensor's scale factor
     * within about 2 %; 1 % of the rate for misalignment and body motion; a 1-sigma of 0.005 rad per
     * m/s^2 for the sideslip the model leaves out, about half of the 0.005-0.01 rad per m/s^2 a
     * passenger car's rear axle slips by (a 1500 kg car with 80-150 kN/rad of rear cornering stiffness,
     * from memory of the single-track model; on the real drives 0.005 and 0.01 cover the heading
     * equally); wheel-speed sensors silent below about 0.3 m/s; a rear-axle
     * turn radius of at least about 4.5 m; and a standalone receiver's error at least about half its HDOP
     * in metres (a user range error of 0.5 m is about the best a standalone receiver reaches); a rolling
     * radius that grows by about 0.6 % from standstill to 30 m/s (radial tyres grow by roughly 0.5-1 %
     * between town and motorway speeds).
     */
    public static FilterSettings defaults() {
        return new FilterSettings(
                0.05, 50.0,
                Math.toRadians(0.1), 100.0,
                Math.toRadians(0.002), 2.0e-5,
                Math.toRadians(5.0), Math.toRadians(0.5), 0.03,
                0.3, 4.0, 3.0, defaultFixScale(),
                0.6, 40.0,
                3.0, 0.15, 3.0,
                0.5, 5.0,
                0.02, 1.0e-5, 0.01,
                0.005, 0.3, 4.5, 0.5,
                0.006);
    }
}
