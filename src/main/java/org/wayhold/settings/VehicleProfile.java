package org.wayhold.settings;

/**
 * Geometry of one vehicle. YAML section {@code vehicles.NAME}.
 *
 * @param leverArmForwardM GNSS antenna ahead of the vehicle reference point (m)
 * @param leverArmLeftM    GNSS antenna left of the vehicle reference point (m)
 * @param leverArmUpM      GNSS antenna above the vehicle reference point (m)
 */
public record VehicleProfile(double leverArmForwardM, double leverArmLeftM, double leverArmUpM) {

    public VehicleProfile {
        Check.finite("vehicles.*.lever_arm_forward_m", leverArmForwardM);
        Check.finite("vehicles.*.lever_arm_left_m", leverArmLeftM);
        Check.finite("vehicles.*.lever_arm_up_m", leverArmUpM);
    }

    public static VehicleProfile defaults() {
        return new VehicleProfile(0.0, 0.0, 0.0);
    }
}
