package org.wayhold.http;

import java.io.ByteArrayOutputStream;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Locale;
import java.util.Random;
import org.wayhold.settings.IngestSettings;

/**
 * Makers of NDJSON lines for the hostile-input properties: valid samples with values anywhere in their
 * documented ranges (README.md, "Sample format"; openapi.yaml; the plausibility bounds of the {@code ingest} settings), and malformed lines of many kinds, each of which the contract says
 * must be rejected (so the properties can count exactly). Every maker draws from the {@link Random} it
 * is given, which the tests seed.
 */
final class HostileLines {

    /** A line and what the service must do with it. */
    enum Kind { VALID, MALFORMED, BLANK }

    record Line(byte[] bytes, Kind kind) {
    }

    private static final String[] FIX_NAMES = {"none", "2d", "3d", "dgnss", "rtk_float", "rtk_fixed"};
    private static final String[] TYPES = {"gnss", "wheel_speed", "yaw_rate", "reference"};
    /** The service's default plausibility bounds: a valid sample keeps to them. */
    private static final IngestSettings LIMITS = IngestSettings.defaults();

    private HostileLines() {
    }

    // ---------------------------------------------------------------------------------------------
    // Valid samples.

    /** A valid sample at time t: every field within its range, optional fields sometimes, keys shuffled. */
    static byte[] valid(Random r, double t) {
        List<String> fields = new ArrayList<>();
        String type = TYPES[r.nextInt(TYPES.length)];
        fields.add("\"type\":\"" + type + "\"");
        fields.add("\"t\":" + num(t));
        switch (type) {
            case "gnss" -> {
                fields.add("\"lat\":" + num(uniform(r, -90.0, 90.0)));
                fields.add("\"lon\":" + num(uniform(r, -180.0, 180.0)));
                optional(r, fields, "alt", uniform(r, -500.0, 9000.0));
                optional(r, fields, "sigma_h", wild(r, 0.0, 50.0, LIMITS.maxSigmaM()));
                optional(r, fields, "sigma_v", wild(r, 0.0, 80.0, LIMITS.maxSigmaM()));
                if (r.nextBoolean()) {
                    fields.add("\"fix\":\"" + FIX_NAMES[r.nextInt(FIX_NAMES.length)] + "\"");
                }
                if (r.nextBoolean()) {
                    fields.add("\"sats\":" + r.nextInt(64));
                }
                optional(r, fields, "hdop", wild(r, 0.0, 30.0, LIMITS.maxHdop()));
                optional(r, fields, "speed", wild(r, 0.0, 70.0, LIMITS.maxGnssSpeedMps()));
                optional(r, fields, "course", uniform(r, 0.0, 360.0));
            }
            case "wheel_speed" -> fields.add("\"speed\":" + num(signedWild(r, 70.0, LIMITS.maxWheelSpeedMps())));
            case "yaw_rate" -> fields.add("\"rate\":" + num(signedWild(r, 2.0, LIMITS.maxYawRateRadPerS())));
            default -> {
                fields.add("\"lat\":" + num(uniform(r, -90.0, 90.0)));
                fields.add("\"lon\":" + num(uniform(r, -180.0, 180.0)));
                optional(r, fields, "alt", uniform(r, -500.0, 9000.0));
                optional(r, fields, "heading", uniform(r, 0.0, 360.0));
            }
        }
        // Unknown names are skipped whatever their value (openapi.yaml, Sample: unknown fields are ignored).
        if (r.nextInt(4) == 0) {
            fields.add("\"x_" + r.nextInt(1000) + "\":" + junkValue(r));
        }
        // A known field that this type does not use, as null: "not given".
        if (r.nextInt(6) == 0) {
            fields.add("\"heading\":null");
        }
        Collections.shuffle(fields, r);
        String sep = r.nextInt(5) == 0 ? ", " : ",";
        String text = (r.nextInt(5) == 0 ? " " : "") + "{" + String.join(sep, fields) + "}"
                + (r.nextInt(5) == 0 ? " \t" : "");
        return text.getBytes(StandardCharsets.UTF_8);
    }

    private static void optional(Random r, List<String> fields, String name, double value) {
        int pick = r.nextInt(3);
        if (pick == 0) {
            fields.add("\"" + name + "\":" + num(value));
        } else if (pick == 1 && r.nextInt(4) == 0) {
            fields.add("\"" + name + "\":null");
        }
    }

    /** Mostly in [lo, hi], sometimes anywhere up to the plausibility bound {@code max} (still valid). */
    private static double wild(Random r, double lo, double hi, double max) {
        return r.nextInt(20) == 0 ? uniform(r, 0.0, max) : uniform(r, lo, hi);
    }

    /** Mostly about {@code typical} either way, sometimes anywhere within +-{@code max}. */
    private static double signedWild(Random r, double typical, double max) {
        return r.nextInt(20) == 0 ? uniform(r, -max, max) : Math.max(-max, Math.min(max, r.nextGaussian() * typical));
    }

    private static double uniform(Random r, double lo, double hi) {
        return lo + (hi - lo) * r.nextDouble();
    }

    static String num(double v) {
        // Whole numbers sometimes as JSON integers, the rest in Java's shortest round-trip form.
        if (v == Math.rint(v) && Math.abs(v) < 1e15) {
            return Long.toString((long) v);
        }
        return Double.toString(v);
    }

    private static String junkValue(Random r) {
        return switch (r.nextInt(6)) {
            case 0 -> "\"" + asciiText(r, 20).replace("\\", "").replace("\"", "") + "\"";
            case 1 -> "[1,[2,{\"a\":null}],\"b\"]";
            case 2 -> "{\"nested\":{\"deeper\":[true,false]}}";
            case 3 -> "null";
            case 4 -> Integer.toString(r.nextInt());
            default -> "1e999";
        };
    }

    // ---------------------------------------------------------------------------------------------
    // Malformed lines: never blank, never holding CR or LF, and each one rejected by the documented format.

    static byte[] malformed(Random r, double t, int maxLineBytes) {
        byte[] valid = valid(r, t);
        return switch (r.nextInt(12)) {
            case 0 -> notAnObject(r);
            case 1 -> truncated(r, valid);
            case 2 -> concat(valid, pick(r, " x", "}", "{}", ",", " 1", "]", " {\"t\":1}").getBytes(StandardCharsets.UTF_8));
            case 3, 4, 5 -> semanticallyWrong(r, t).getBytes(StandardCharsets.UTF_8);
            case 6 -> overlong(r, valid, maxLineBytes);
            case 7 -> badBytesInType(r, t);
            case 8 -> deepNesting(r, t).getBytes(StandardCharsets.UTF_8);
            case 9 -> braceThenRandomBytes(r);
            case 10 -> ("{\"t\":" + num(t) + ",\"type\":\"wheel_speed\",\"speed\":1" + "0".repeat(400 + r.nextInt(300))
                    + "e" + (300 + r.nextInt(100)) + "}").getBytes(StandardCharsets.UTF_8);
            default -> unicodeGarbage(r);
        };
    }

    private static byte[] notAnObject(Random r) {
        String s = pick(r, "123", "-0.5e3", "\"just a string\"", "[1,2,3]", "[]", "true", "false", "null",
                "[{\"t\":1,\"type\":\"yaw_rate\",\"rate\":0}]", "x", "#comment", "t=1,type=gnss", "<xml/>",
                "NaN", "Infinity", "'single'", "\u00ef\u00bb\u00bf{}");
        return s.getBytes(StandardCharsets.UTF_8);
    }

    private static byte[] truncated(Random r, byte[] valid) {
        // The line's only '}' is its last non-blank byte, so any cut before it leaves the object open.
        int close = lastIndexOf(valid, (byte) '}');
        int cut = 1 + r.nextInt(Math.max(1, close - 1));
        byte[] b = java.util.Arrays.copyOf(valid, cut);
        return isBlank(b) ? "{".getBytes(StandardCharsets.UTF_8) : b;
    }

    private static String semanticallyWrong(Random r, double t) {
        String tt = num(t);
        return switch (r.nextInt(20)) {
            case 0 -> "{\"type\":\"gnss\",\"lat\":1,\"lon\":2}";
            case 1 -> "{\"t\":" + tt + ",\"lat\":1,\"lon\":2}";
            case 2 -> "{\"t\":" + tt + ",\"type\":\"" + unknownType(r) + "\",\"speed\":1}";
            case 3 -> "{\"t\":\"" + tt + "\",\"type\":\"wheel_speed\",\"speed\":1}";
            case 4 -> "{\"t\":" + tt + ",\"type\":\"gnss\",\"lat\":" + num(outOf(r, 90.0)) + ",\"lon\":2}";
            case 5 -> "{\"t\":" + tt + ",\"type\":\"reference\",\"lat\":1,\"lon\":" + num(outOf(r, 180.0)) + "}";
            case 6 -> "{\"t\":" + tt + ",\"type\":\"wheel_speed\",\"speed\":"
                    + pick(r, "NaN", "Infinity", "-Infinity", "1e999", "-1e999", "+1", ".5", "01", "0x10", "1_000")
                    + "}";
            case 7 -> "{\"t\":" + tt + ",\"type\":\"gnss\",\"lat\":1,\"lon\":2,\"sigma_h\":-" + num(0.001 + r.nextDouble() * 10) + "}";
            case 8 -> "{\"t\":" + tt + ",\"type\":\"gnss\",\"lat\":1,\"lon\":2,\"sats\":"
                    + pick(r, "-1", "1.5", "99999999999", "\"7\"", "true", "[]") + "}";
            case 9 -> "{\"t\":" + tt + ",\"type\":\"gnss\",\"lat\":1,\"lon\":2,\"fix\":\"" + pick(r, "4d", "RTK", "", "3D ", "fixed") + "\"}";
            case 10 -> "{\"t\":" + tt + ",\"t\":" + tt + ",\"type\":\"yaw_rate\",\"rate\":0}";
            case 11 -> "{\"t\":" + tt + ",\"type\":\"yaw_rate\"}";
            case 12 -> "{\"t\":{\"a\":1},\"type\":\"yaw_rate\",\"rate\":0}";
            case 13 -> "{\"t\":" + tt + ",\"type\":\"yaw_rate\",\"rate\":" + pick(r, "true", "\"0.1\"", "[0.1]", "{}") + "}";
            case 14 -> "{\"t\":" + tt + ",\"type\":\"gnss\",\"lat\":1,\"lon\":2,\"speed\":-" + num(0.5 + r.nextDouble()) + "}";
            case 15 -> "{\"t\":" + tt + ",\"type\":\"wheel_speed\"}";
            case 16 -> "{\"t\":" + tt + ",\"type\":" + pick(r, "null", "1", "[\"gnss\"]", "{\"gnss\":1}") + ",\"speed\":1}";
            case 17 -> "{\"t\":" + pick(r, "NaN", "-Infinity", "1e400", "null") + ",\"type\":\"yaw_rate\",\"rate\":0}";
            case 18 -> "{\"t\":" + tt + ",\"type\":\"gnss\",\"lat\":1,\"lon\":2,\"alt\":1e999}";
            default -> "{\"t\":" + tt + ",\"type\":\"reference\",\"lat\":1,\"lon\":2,\"heading\":\"north\"}";
        };
    }

    private static String unknownType(Random r) {
        String s = pick(r, "lidar", "GNSS", "wheel-speed", "yawrate", "", " gnss", "reference ", "imu", "odometer");
        return r.nextInt(3) == 0 ? asciiText(r, 12).replaceAll("[\"\\\\]", "") + "_q" : s;
    }

    private static double outOf(Random r, double limit) {
        double beyond = r.nextInt(4) == 0 ? 1e300 * r.nextDouble() + 1.0 : r.nextDouble() * 10.0 + 1e-9;
        return (r.nextBoolean() ? 1 : -1) * (limit + beyond);
    }

    private static byte[] overlong(Random r, byte[] valid, int maxLineBytes) {
        int target = maxLineBytes + 1 + r.nextInt(2 * maxLineBytes);
        String head = "{\"pad\":\"";
        // Two bytes of slack for a leading blank before the valid line's '{', which is dropped.
        int padLength = Math.max(0, target - valid.length - head.length() + 2);
        return concat((head + "a".repeat(padLength) + "\",").getBytes(StandardCharsets.UTF_8),
                java.util.Arrays.copyOfRange(valid, indexOf(valid, (byte) '{') + 1, valid.length));
    }

    private static byte[] badBytesInType(Random r, double t) {
        byte[][] bad = {{(byte) 0xff}, {(byte) 0xc3, 0x28}, {(byte) 0x80}, {(byte) 0xed, (byte) 0xa0, (byte) 0x80},
            {0x00}, {0x01}, {0x1f}, {(byte) 0xf8, (byte) 0x88, (byte) 0x80, (byte) 0x80, (byte) 0x80}, {(byte) 0xc0, (byte) 0xaf}};
        return concat(("{\"t\":" + num(t) + ",\"type\":\"wheel").getBytes(StandardCharsets.UTF_8),
                bad[r.nextInt(bad.length)], "_speed\",\"speed\":1}".getBytes(StandardCharsets.UTF_8));
    }

    private static String deepNesting(Random r, double t) {
        int depth = 2 + r.nextInt(400);
        return "{\"t\":" + num(t) + ",\"type\":\"yaw_rate\",\"rate\":" + "[".repeat(depth) + "]".repeat(depth) + "}";
    }

    private static byte[] braceThenRandomBytes(Random r) {
        byte[] b = new byte[1 + r.nextInt(300)];
        r.nextBytes(b);
        for (int i = 0; i < b.length; i++) {
            if (b[i] == '\n' || b[i] == '\r') {
                b[i] = '?';
            }
        }
        return concat(new byte[] {'{'}, b);
    }

    private static byte[] unicodeGarbage(Random r) {
        StringBuilder sb = new StringBuilder("\u00a7");
        int n = 1 + r.nextInt(80);
        for (int i = 0; i < n; i++) {
            int cp = switch (r.nextInt(4)) {
                case 0 -> 0x20 + r.nextInt(0x5f);
                case 1 -> 0xa0 + r.nextInt(0x700);
                case 2 -> 0x4e00 + r.nextInt(0x5000);
                default -> 0x1f300 + r.nextInt(0x300);
            };
            sb.appendCodePoint(cp);
        }
        return sb.toString().getBytes(StandardCharsets.UTF_8);
    }

    static byte[] blank(Random r) {
        return pick(r, "", " ", "\t", " \t  ").getBytes(StandardCharsets.UTF_8);
    }

    // ---------------------------------------------------------------------------------------------

    static String asciiText(Random r, int maxLength) {
        int n = r.nextInt(maxLength + 1);
        StringBuilder sb = new StringBuilder(n);
        for (int i = 0; i < n; i++) {
            sb.append((char) (0x20 + r.nextInt(0x5f)));
        }
        return sb.toString();
    }

    @SafeVarargs
    static <T> T pick(Random r, T... options) {
        return options[r.nextInt(options.length)];
    }

    static byte[] concat(byte[]... parts) {
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        for (byte[] p : parts) {
            out.writeBytes(p);
        }
        return out.toByteArray();
    }

    private static boolean isBlank(byte[] b) {
        for (byte x : b) {
            if (x != ' ' && x != '\t') {
                return false;
            }
        }
        return true;
    }

    private static int lastIndexOf(byte[] b, byte x) {
        for (int i = b.length - 1; i >= 0; i--) {
            if (b[i] == x) {
                return i;
            }
        }
        return -1;
    }

    private static int indexOf(byte[] b, byte x) {
        for (int i = 0; i < b.length; i++) {
            if (b[i] == x) {
                return i;
            }
        }
        return -1;
    }

    static String lower(String s) {
        return s.toLowerCase(Locale.ROOT);
    }
}
