package org.wayhold.tracks;

import java.math.BigDecimal;
import java.math.RoundingMode;
import java.time.Instant;
import java.time.ZoneOffset;
import java.time.format.DateTimeFormatter;
import java.util.ArrayList;
import java.util.List;
import java.util.StringJoiner;
import org.wayhold.filter.Reason;
import org.wayhold.fusion.FusedPoint;

/** Formatting shared by the writers: fixed decimals, UTC date-times, reason codes. */
final class TrackValues {

    /** Degrees to 1e-9 (about 0.1 mm), metres to 0.1 mm, as in the drift report. */
    static final int DEG_DECIMALS = 9;
    static final int M_DECIMALS = 4;

    private static final DateTimeFormatter UTC = DateTimeFormatter.ofPattern("uuuu-MM-dd'T'HH:mm:ss.SSS'Z'")
            .withZone(ZoneOffset.UTC);

    private TrackValues() {
    }

    /** A number rounded half-up to {@code decimals} without an exponent, or null when it does not exist. */
    static BigDecimal decimal(double v, int decimals) {
        if (!Double.isFinite(v)) {
            return null;
        }
        return new BigDecimal(v).setScale(decimals, RoundingMode.HALF_UP).stripTrailingZeros();
    }

    /** As {@link #decimal}, as text; empty when the value does not exist. */
    static String text(double v, int decimals) {
        BigDecimal d = decimal(v, decimals);
        return d == null ? "" : d.toPlainString();
    }

    /**
     * The UTC date-time of a time on the vehicle's clock taken as Unix epoch seconds, to the millisecond
     * (ISO 8601 / XML Schema dateTime, as GPX 1.1 asks).
     */
    static String utc(double tS) {
        long millis = Math.round(tS * 1000.0);
        return UTC.format(Instant.ofEpochMilli(millis));
    }

    /** The reason codes of a point, in the vocabulary's order. */
    static List<String> reasons(FusedPoint p) {
        List<String> out = new ArrayList<>();
        for (Reason r : Reason.values()) {
            if (r.in(p.reasons())) {
                out.add(r.wireName());
            }
        }
        return out;
    }

    /** The reason codes joined with a separator. */
    static String reasons(FusedPoint p, String separator) {
        StringJoiner j = new StringJoiner(separator);
        reasons(p).forEach(j::add);
        return j.toString();
    }
}
