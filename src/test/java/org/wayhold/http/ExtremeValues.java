package org.wayhold.http;

import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.Random;

/**
 * Sample lines with one extreme but finite value each, for the properties that no value, however
 * absurd, can break a vehicle: every numeric field of every sample type in turn takes a value from a
 * pool of magnitudes (the largest doubles, 1e300, 1e200, subnormals, signed zeros, values just beyond
 * each plausibility bound, random powers of ten across the whole double range); the other fields are
 * ordinary. Every draw comes from the {@link Random} given, which the tests seed.
 */
final class ExtremeValues {

    /** The numeric fields of each sample type (contract.md's sample table). */
    static final String[][] FIELDS = {
        {"gnss", "t", "lat", "lon", "alt", "sigma_h", "sigma_v", "sats", "hdop", "speed", "course"},
        {"wheel_speed", "t", "speed"},
        {"yaw_rate", "t", "rate"},
        {"reference", "t", "lat", "lon", "alt", "heading"}};

    /** Every (type, field) pair, for counting what a run covered. */
    static final int PAIRS;

    static {
        int n = 0;
        for (String[] f : FIELDS) {
            n += f.length - 1;
        }
        PAIRS = n;
    }

    private static final double[] FIXED = {
        Double.MAX_VALUE, -Double.MAX_VALUE, 1e308, -1e308, 1e300, -1e300, 1e200, -1e200, 1e100, -1e100, 1e20,
        -1e20, 1e12, -1e12, 1e10, 1e9, -1e9, 1e6, -1e6, 1e4, -1e4, Double.MIN_VALUE, -Double.MIN_VALUE,
        Double.MIN_NORMAL, 1e-300, -1e-300, 0.0, -0.0,
        // Just beyond (and at) the default bounds of the ingest settings and the contract's ranges.
        150.0, Math.nextUp(150.0), -Math.nextUp(150.0), 10.0, Math.nextUp(10.0), -Math.nextUp(10.0), -1000.0,
        Math.nextDown(-1000.0), 100_000.0, Math.nextUp(100_000.0), 10_000.0, Math.nextUp(10_000.0), 100.0,
        Math.nextUp(100.0), 360.0, Math.nextUp(360.0), -Double.MIN_VALUE, 90.0, Math.nextUp(90.0), -90.0, 180.0,
        Math.nextUp(180.0), -180.0, 1.0e10, Math.nextUp(1.0e10)};

    private static final long[] FIXED_COUNTS = {0, 1, 999, 1000, 1001, 65_535, 2_147_483_647L, 9_999_999_999L,
        99_999_999_999_999_999L};

    private ExtremeValues() {
    }

    /** One extreme value for a numeric field, as JSON text. */
    static String value(Random r, String field) {
        if (field.equals("sats")) {
            return r.nextInt(3) == 0 ? Long.toString((long) Math.pow(10, r.nextInt(19)))
                    : Long.toString(FIXED_COUNTS[r.nextInt(FIXED_COUNTS.length)]);
        }
        double v;
        if (r.nextInt(3) == 0) {
            // A random power of ten across the whole range of doubles, normal and subnormal, either sign.
            v = (r.nextBoolean() ? 1 : -1) * (1.0 + 9.0 * r.nextDouble()) * Math.pow(10, r.nextInt(631) - 323);
            if (!Double.isFinite(v)) {
                v = Double.MAX_VALUE;
            }
        } else {
            v = FIXED[r.nextInt(FIXED.length)];
        }
        return Double.toString(v);
    }

    /**
     * A line of a random type whose chosen field holds an extreme value and whose other fields are
     * ordinary, at time {@code t} and the given position (unless the chosen field is one of them).
     *
     * @param tried counts the (type, field) pairs, indexed as in {@link #FIELDS} flattened
     */
    static byte[] line(Random r, double t, double latDeg, double lonDeg, int[] tried) {
        int type = r.nextInt(FIELDS.length);
        String[] fields = FIELDS[type];
        int pick = 1 + r.nextInt(fields.length - 1);
        int flat = 0;
        for (int k = 0; k < type; k++) {
            flat += FIELDS[k].length - 1;
        }
        tried[flat + pick - 1]++;
        List<String> members = new ArrayList<>();
        members.add("\"type\":\"" + fields[0] + "\"");
        for (int k = 1; k < fields.length; k++) {
            String name = fields[k];
            String value = k == pick ? value(r, name) : ordinary(name, t, latDeg, lonDeg);
            if (value != null) {
                members.add("\"" + name + "\":" + value);
            }
        }
        return ("{" + String.join(",", members) + "}").getBytes(StandardCharsets.UTF_8);
    }

    /** An ordinary value of a field: the given position, moderate speeds, null when optional. */
    private static String ordinary(String field, double t, double latDeg, double lonDeg) {
        return switch (field) {
            case "t" -> Double.toString(t);
            case "lat" -> Double.toString(latDeg);
            case "lon" -> Double.toString(lonDeg);
            case "speed" -> "12.5";
            case "rate" -> "0.02";
            case "sigma_h" -> "1.5";
            default -> null;
        };
    }
}
