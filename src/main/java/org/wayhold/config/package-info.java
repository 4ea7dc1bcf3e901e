/**
 * {@code config/wayhold.yaml} to the core's {@link org.wayhold.settings.Settings} records.
 *
 * <p>YAML keys are snake_case and carry their unit as a suffix, exactly as the settings records name
 * them in their validation messages ({@code filter.gnss_floor_m} in metres,
 * {@code outage.gap_s} in seconds, {@code filter.gyro_noise_rad_per_s} in radians per second).
 * Angles inside are radians; lever arms are metres in the vehicle frame (forward, left, up from the
 * vehicle reference point). A missing key takes its built-in default; an unknown key or a bad value
 * is a {@link org.wayhold.config.ConfigException} naming the full key path.
 */
package org.wayhold.config;
