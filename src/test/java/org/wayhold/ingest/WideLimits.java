package org.wayhold.ingest;

import org.wayhold.settings.IngestSettings;

/**
 * Plausibility bounds as wide as the settings allow, for tests about decoding and round trips whose
 * generated values (heights of several kilometres below the ellipsoid, say) lie beyond the physical
 * defaults on purpose. The bounds that follow from definitions (t not negative, course and heading
 * within [0, 360] degrees) still apply.
 */
final class WideLimits {

    private WideLimits() {
    }

    static IngestSettings wide() {
        IngestSettings d = IngestSettings.defaults();
        return new IngestSettings(Double.MAX_VALUE, Double.MAX_VALUE, Double.MAX_VALUE, -Double.MAX_VALUE,
                Double.MAX_VALUE, Double.MAX_VALUE, Double.MAX_VALUE, Integer.MAX_VALUE, Double.MAX_VALUE,
                d.maxListedRejections(), d.idempotencyKeysPerVehicle(), d.idempotencyTtlS(), d.idempotencyMaxBytes());
    }

    /** A reader with the default line limit and these bounds. */
    static NdjsonReader reader() {
        return new NdjsonReader(org.wayhold.settings.ServerSettings.defaults().maxLineBytes(), wide());
    }
}
