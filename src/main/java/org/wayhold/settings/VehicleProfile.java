package org.wayhold.settings;

/**
 * What is known of one vehicle's geometry and sensors. YAML section {@code vehicles.NAME}. The filter
 * starts its lever-arm, latency and scale states from these values with these uncertainties and refines
 * them online; a profile made by {@code calibrate} narrows them.
 *
 * @param leverArmForwardM  GNSS antenna ahead of the vehicle reference point (m)
 * @param leverArmLeftM     GNSS antenna left of the vehicle reference point (m)
 * @param leverArmUpM       GNSS antenna above the vehicle reference point (m)
 * @param leverArmSigmaM    1-sigma of the horizontal lever arm per axis (m): about 1 m when it was not
 *                          measured, a few centimetres when it was
 * @param gnssLatencyS      time from a fix's time of validity to the time it is stamped with (s)
 * @param gnssLatencySigmaS 1-sigma of that latency (s)
 * @param speedScale        wheel-speed scale factor: true speed = scale * wheel speed (unitless, near 1)
 * @param gyroScale         gyro scale factor: true yaw rate = scale * (reading - bias) (unitless, near 1)
 */
public record VehicleProfile(double leverArmForwardM, double leverArmLeftM, double leverArmUpM,
                             double leverArmSigmaM, double gnssLatencyS, double gnssLatencySigmaS,
                             double speedScale, double gyroScale) {

    public VehicleProfile {
        Check.finite("vehicles.*.lever_arm_forward_m", leverArmForwardM);
        Check.finite("vehicles.*.lever_arm_left_m", leverArmLeftM);
        Check.finite("vehicles.*.lever_arm_up_m", leverArmUpM);
        Check.nonNegative("vehicles.*.lever_arm_sigma_m", leverArmSigmaM);
        Check.within("vehicles.*.gnss_latency_s", gnssLatencyS, -1.0, 1.0, "s");
        Check.nonNegative("vehicles.*.gnss_latency_sigma_s", gnssLatencySigmaS);
        Check.within("vehicles.*.speed_scale", speedScale, 0.5, 2.0, "");
        Check.within("vehicles.*.gyro_scale", gyroScale, 0.5, 2.0, "");
    }

    /** A profile with only the lever arm given, the rest at the defaults. */
    public VehicleProfile(double leverArmForwardM, double leverArmLeftM, double leverArmUpM) {
        this(leverArmForwardM, leverArmLeftM, leverArmUpM, DEFAULT_LEVER_ARM_SIGMA_M, 0.0,
                DEFAULT_LATENCY_SIGMA_S, 1.0, 1.0);
    }

    /**
     * Uncertainty of a lever arm nobody measured (m): a roof antenna sits within about 2 m of a
     * rear-axle reference point (common practice).
     */
    public static final double DEFAULT_LEVER_ARM_SIGMA_M = 1.0;

    /**
     * Uncertainty of an unknown GNSS latency (s): receivers that stamp fixes when they are received lag
     * by up to a few hundred milliseconds (common practice).
     */
    public static final double DEFAULT_LATENCY_SIGMA_S = 0.1;

    public static VehicleProfile defaults() {
        return new VehicleProfile(0.0, 0.0, 0.0);
    }
}
