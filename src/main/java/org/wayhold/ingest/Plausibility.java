package org.wayhold.ingest;

import java.util.Optional;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.ReferencePoint;
import org.wayhold.sample.Sample;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;
import org.wayhold.settings.IngestSettings;

/**
 * The physical bounds of {@link IngestSettings} applied to one sample: the first field beyond them,
 * named with its bound and the key that sets it. A sample is checked after the records' own rules
 * (finite numbers, latitude and longitude ranges, no negative sigma), so only magnitudes remain.
 */
final class Plausibility {

    /** Course and heading are directions clockwise from true north (degrees): 0 to 360 by definition. */
    private static final double FULL_TURN_DEG = 360.0;

    private final IngestSettings limits;

    Plausibility(IngestSettings limits) {
        this.limits = limits;
    }

    /** Why the sample is implausible, starting with the field name; empty when it is within every bound. */
    Optional<String> violation(Sample s) {
        String v = timeViolation(s.t());
        if (v == null) {
            if (s instanceof WheelSpeed w) {
                v = magnitude("speed", w.speedMps(), limits.maxWheelSpeedMps(), "m/s", "ingest.max_wheel_speed_mps");
            } else if (s instanceof YawRate y) {
                v = magnitude("rate", y.yawRateRadPerS(), limits.maxYawRateRadPerS(), "rad/s",
                        "ingest.max_yaw_rate_rad_per_s");
            } else if (s instanceof GnssFix g) {
                v = gnss(g);
            } else if (s instanceof ReferencePoint r) {
                v = r.hasAlt() ? altitude(r.altM()) : null;
                if (v == null && r.hasHeading()) {
                    v = within("heading", r.headingDeg(), 0.0, FULL_TURN_DEG, "degrees", null);
                }
            }
        }
        return Optional.ofNullable(v);
    }

    private String timeViolation(double t) {
        return within("t", t, 0.0, limits.maxTS(), "s", "ingest.max_t_s");
    }

    private String gnss(GnssFix g) {
        String v = g.hasAlt() ? altitude(g.altM()) : null;
        if (v == null && g.hasSigmaH()) {
            v = within("sigma_h", g.sigmaHM(), 0.0, limits.maxSigmaM(), "m", "ingest.max_sigma_m");
        }
        if (v == null && g.hasSigmaV()) {
            v = within("sigma_v", g.sigmaVM(), 0.0, limits.maxSigmaM(), "m", "ingest.max_sigma_m");
        }
        if (v == null && g.hasHdop()) {
            v = within("hdop", g.hdop(), 0.0, limits.maxHdop(), null, "ingest.max_hdop");
        }
        if (v == null && g.hasSats() && g.sats() > limits.maxSats()) {
            v = "sats: must be at most " + limits.maxSats() + " (ingest.max_sats), was " + g.sats();
        }
        if (v == null && g.hasSpeed()) {
            v = within("speed", g.speedMps(), 0.0, limits.maxGnssSpeedMps(), "m/s", "ingest.max_gnss_speed_mps");
        }
        if (v == null && g.hasCourse()) {
            v = within("course", g.courseDeg(), 0.0, FULL_TURN_DEG, "degrees", null);
        }
        return v;
    }

    private String altitude(double altM) {
        return within("alt", altM, limits.minAltM(), limits.maxAltM(), "m", "ingest.min_alt_m, ingest.max_alt_m");
    }

    private static String magnitude(String field, double value, double max, String unit, String key) {
        return within(field, value, -max, max, unit, key);
    }

    private static String within(String field, double value, double min, double max, String unit, String key) {
        if (value >= min && value <= max) {
            return null;
        }
        return field + ": must be within [" + min + ", " + max + "]" + (unit == null ? "" : " " + unit)
                + (key == null ? "" : " (" + key + ")") + ", was " + value;
    }
}
