package org.wayhold.settings;

/**
 * What ingest accepts and how much one request may cost. YAML section {@code ingest}.
 *
 * <p>Plausibility bounds: a finite but absurd value (a wheel speed of 1e300 m/s, a sigma of 1e200 m)
 * passes every type and range rule of the contract, yet turns the filter's covariance into infinities
 * and then NaN. A sample with a magnitude beyond these bounds is therefore rejected at the edge, with
 * the field named, before it reaches a session. The defaults are far outside what a road vehicle and
 * its sensors produce (150 m/s is 540 km/h; 10 rad/s is 573 deg/s; the highest road lies below 6 km
 * and the lowest land surface about 430 m below sea level) and far inside what the arithmetic
 * survives; raise them for other vehicles. Bounds that follow from a definition are fixed: {@code t}
 * is not negative, and {@code course} and {@code heading} lie in [0, 360] degrees. A sigma or an HDOP
 * of 0 is accepted: receivers round small values to 0 (and a noise-free simulation reports 0), and the
 * filter never believes less than {@code filter.gnss_floor_m}.
 *
 * @param maxTS                     latest accepted sample time (s on the vehicle's clock; 1e10 s is
 *                                  the year 2286 as UTC epoch seconds)
 * @param maxWheelSpeedMps          largest wheel speed magnitude (m/s)
 * @param maxYawRateRadPerS         largest yaw rate magnitude (rad/s)
 * @param minAltM                   lowest GNSS or reference height (m, ellipsoidal)
 * @param maxAltM                   highest GNSS or reference height (m, ellipsoidal)
 * @param maxSigmaM                 largest GNSS {@code sigma_h} and {@code sigma_v} (m)
 * @param maxHdop                   largest HDOP (unitless)
 * @param maxSats                   most satellites in a fix (count)
 * @param maxGnssSpeedMps           largest GNSS ground speed (m/s)
 * @param maxListedRejections       rejections listed with their line numbers in one reply (count); the
 *                                  rest are only counted, so a body of bad lines cannot exhaust memory
 * @param idempotencyKeysPerVehicle replies kept per vehicle for {@code Idempotency-Key} retries (count)
 * @param idempotencyTtlS           how long a reply is kept for retries (s of wall time)
 * @param idempotencyMaxBytes       all kept replies together (bytes); the oldest go first
 */
public record IngestSettings(double maxTS, double maxWheelSpeedMps, double maxYawRateRadPerS, double minAltM,
                             double maxAltM, double maxSigmaM, double maxHdop, int maxSats, double maxGnssSpeedMps,
                             int maxListedRejections, int idempotencyKeysPerVehicle, double idempotencyTtlS,
                             long idempotencyMaxBytes) {

    public IngestSettings {
        Check.positive("ingest.max_t_s", maxTS);
        Check.positive("ingest.max_wheel_speed_mps", maxWheelSpeedMps);
        Check.positive("ingest.max_yaw_rate_rad_per_s", maxYawRateRadPerS);
        Check.finite("ingest.min_alt_m", minAltM);
        Check.finite("ingest.max_alt_m", maxAltM);
        Check.range("ingest.max_alt_m", minAltM, maxAltM, "m");
        Check.positive("ingest.max_sigma_m", maxSigmaM);
        Check.positive("ingest.max_hdop", maxHdop);
        Check.atLeast("ingest.max_sats", maxSats, 0);
        Check.positive("ingest.max_gnss_speed_mps", maxGnssSpeedMps);
        Check.atLeast("ingest.max_listed_rejections", maxListedRejections, 0);
        Check.atLeast("ingest.idempotency_keys_per_vehicle", idempotencyKeysPerVehicle, 0);
        Check.positive("ingest.idempotency_ttl_s", idempotencyTtlS);
        if (idempotencyMaxBytes < 0) {
            throw new SettingsException("ingest.idempotency_max_bytes", "must be at least 0, was " + idempotencyMaxBytes);
        }
    }

    /**
     * Defaults. Retries: 256 replies per vehicle and a day cover a rig that posts every second and
     * retries within minutes; 16 MiB bounds them all (a typical reply is under 100 bytes, one listing
     * the full 1000 rejections about 100 KB).
     */
    public static IngestSettings defaults() {
        return new IngestSettings(1.0e10, 150.0, 10.0, -1000.0, 100_000.0, 10_000.0, 100.0, 1000, 150.0, 1000,
                256, 86_400.0, 16L * 1024 * 1024);
    }
}
