package org.wayhold.ingest;

import static org.assertj.core.api.Assertions.assertThat;

import java.io.ByteArrayInputStream;
import java.io.IOException;
import java.io.InputStream;
import java.math.BigDecimal;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.SplittableRandom;
import java.util.zip.GZIPInputStream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * The byte-level road for common lines against the careful road through Jackson's parser: for every
 * line, both must give the same sample (records compare doubles bit for bit) or the same rejection with
 * the same reason. The careful road is the reference: it is what every line took before the byte-level
 * road existed, and {@link NdjsonReaderTest} pins its behaviour. Lines come from the demo logs and from
 * a seeded generator that writes numbers in every JSON form (exponents, negative zero, long fractions,
 * subnormals, overflow), reorders fields, adds spaces, nulls, duplicates, unknown fields, escapes and
 * damage.
 */
class FlatLineDecodingTest {

    private static ReadResult read(byte[] body, boolean flatLines) {
        return new NdjsonReader(1 << 20, WideLimits.wide(), flatLines).readAll(new ByteArrayInputStream(body));
    }

    @ParameterizedTest
    @ValueSource(strings = {"open-sky", "two-tunnels", "urban-canyon"})
    void everyLineOfTheDemoLogsTakesTheByteLevelRoadAndGivesTheSameSamples(String log) throws IOException {
        byte[] body;
        try (InputStream in = new GZIPInputStream(Files.newInputStream(Path.of("sample-logs", log + ".ndjson.gz")))) {
            body = in.readAllBytes();
        }
        SampleDecoder decoder = new SampleDecoder();
        int from = 0;
        int lines = 0;
        for (int i = 0; i < body.length; i++) {
            if (body[i] == '\n') {
                assertThat(decoder.decodeFlat(body, from, i)).as("line %d of %s", lines + 1, log).isNotNull();
                lines++;
                from = i + 1;
            }
        }
        assertThat(lines).isGreaterThan(30_000);
        ReadResult flat = read(body, true);
        assertThat(flat.rejected()).isEmpty();
        assertThat(flat).isEqualTo(read(body, false));
    }

    @Test
    void generatedLinesGiveTheSameOutcomeOnBothRoads() {
        SplittableRandom rnd = new SplittableRandom(20_260_401L);
        List<String> lines = new ArrayList<>();
        for (int k = 0; k < 20_000; k++) {
            lines.add(line(rnd));
        }
        byte[] body = String.join("\n", lines).getBytes(StandardCharsets.UTF_8);
        ReadResult flat = read(body, true);
        ReadResult careful = read(body, false);
        // The generator must exercise both outcomes in volume, or the comparison proves little. About 3200
        // of the 20,000 lines are valid: half the generated times are negative, which is never plausible.
        assertThat(flat.samples()).hasSizeGreaterThan(2_500);
        assertThat(flat.rejected()).hasSizeGreaterThan(2_000);
        assertThat(flat.samples()).isEqualTo(careful.samples());
        assertThat(flat.rejected()).isEqualTo(careful.rejected());
    }

    @ParameterizedTest
    @ValueSource(strings = {"-0", "-0.0", "0", "0e0", "-0E-0", "1E400", "-1e999", "1e-400", "4.9e-324",
        "2.2250738585072011e-308", "1.7976931348623157e308", "1.7976931348623159e308", "9007199254740993",
        "123456789012345678", "1234567890123456789", "12345678901234567890123", "0.1000000000000000055511151231257827",
        "1.00000000000000011102230246251565404236316680908203125", "01", "1.", ".5", "+1", "1e", "1e+", "--1",
        "0x10", "1_000", "NaN", "Infinity", "-Infinity", "\"1\"", "true", "null", "[1]", "{}", "1e22", "1e23",
        "1e-22", "1e-23", "9007199254740992.0", "9007199254740993.0", "1234567890123456e-22", "1234567890123456e22",
        "4503599627370497.5", "0.000000000000000000001", "-0.001785207200628319", "1.8000036005E9", "2.5E-0",
        "00.5", "1.5e0001", "7e+22", "1.0000000000000000"})
    void numbersInEveryFormGiveTheSameOutcomeOnBothRoads(String number) {
        String line = "{\"type\":\"wheel_speed\",\"t\":" + number + ",\"speed\":" + number + "}";
        byte[] body = line.getBytes(StandardCharsets.UTF_8);
        assertThat(read(body, true)).as(line).isEqualTo(read(body, false));
    }

    @ParameterizedTest
    @ValueSource(strings = {"0", "8", "-0", "-1", "1.0", "1e1", "999999999", "2147483647", "2147483648", "08", "\"8\"",
        "null"})
    void satelliteCountsGiveTheSameOutcomeOnBothRoads(String sats) {
        String line = "{\"type\":\"gnss\",\"t\":1,\"lat\":1,\"lon\":2,\"sats\":" + sats + "}";
        byte[] body = line.getBytes(StandardCharsets.UTF_8);
        assertThat(read(body, true)).as(line).isEqualTo(read(body, false));
    }

    /** One line: usually a valid sample of a random type, often with something changed. */
    private static String line(SplittableRandom rnd) {
        String type = pick(rnd, "gnss", "wheel_speed", "yaw_rate", "reference", "odometer", "GNSS");
        List<String> fields = new ArrayList<>();
        fields.add(member(rnd, "type", "\"" + type + "\""));
        fields.add(member(rnd, "t", number(rnd, 1.8e9)));
        switch (type) {
            case "wheel_speed" -> fields.add(member(rnd, "speed", number(rnd, 30.0)));
            case "yaw_rate" -> fields.add(member(rnd, "rate", number(rnd, 0.5)));
            default -> {
                fields.add(member(rnd, "lat", number(rnd, 95.0)));
                fields.add(member(rnd, "lon", number(rnd, 185.0)));
                for (String optional : new String[] {"alt", "sigma_h", "sigma_v", "hdop", "speed", "course", "heading"}) {
                    if (rnd.nextInt(3) == 0) {
                        fields.add(member(rnd, optional, number(rnd, 500.0)));
                    }
                }
                if (rnd.nextInt(3) == 0) {
                    fields.add(member(rnd, "fix", "\"" + pick(rnd, "none", "2d", "3d", "dgnss", "rtk_float",
                            "rtk_fixed", "4d", "3D") + "\""));
                }
                if (rnd.nextInt(3) == 0) {
                    fields.add(member(rnd, "sats", pick(rnd, "0", "7", "12", "-1", "3.0", "null", "40")));
                }
            }
        }
        // Damage and rarities, each now and then.
        switch (rnd.nextInt(24)) {
            case 0 -> fields.remove(rnd.nextInt(fields.size()));
            case 1 -> fields.add(fields.get(rnd.nextInt(fields.size())));
            case 2 -> fields.add(member(rnd, "extra", pick(rnd, "1", "\"x\"", "[1,{\"a\":NaN}]", "true", "null")));
            case 3 -> fields.add(member(rnd, pick(rnd, "lat", "speed", "t"), "null"));
            case 4 -> fields.add(member(rnd, "course", pick(rnd, "NaN", "\"12\"", "[]", "{}", "false")));
            case 5 -> fields.set(0, "\"t\\u0079pe\":\"" + type + "\"");
            case 6 -> fields.set(0, "\"type\":\"gn\\u0073s\"");
            case 7 -> fields.add(member(rnd, "note", "\"caf\u00e9\""));
            default -> {
            }
        }
        for (int k = fields.size() - 1; k > 0; k--) {
            int j = rnd.nextInt(k + 1);
            String tmp = fields.get(k);
            fields.set(k, fields.get(j));
            fields.set(j, tmp);
        }
        String object = space(rnd) + "{" + space(rnd) + String.join(space(rnd) + "," + space(rnd), fields) + space(rnd)
                + "}" + space(rnd);
        return switch (rnd.nextInt(40)) {
            case 0 -> object.substring(0, rnd.nextInt(object.length()));
            case 1 -> object + " {}";
            case 2 -> object + "x";
            case 3 -> "[" + object + "]";
            case 4 -> object.replace(":", " : ");
            case 5 -> object.replaceFirst(",", "");
            default -> object;
        };
    }

    private static String member(SplittableRandom rnd, String name, String value) {
        return "\"" + name + "\"" + space(rnd) + ":" + space(rnd) + value;
    }

    private static String space(SplittableRandom rnd) {
        return switch (rnd.nextInt(12)) {
            case 0 -> " ";
            case 1 -> "\t";
            case 2 -> "  \t ";
            default -> "";
        };
    }

    /** A number of roughly the given magnitude in one of the forms JSON allows (and a few it does not). */
    private static String number(SplittableRandom rnd, double scale) {
        double v = (rnd.nextDouble() * 2.0 - 1.0) * scale;
        return switch (rnd.nextInt(14)) {
            case 12, 13 -> {
                // 1 to 17 significant digits with an exponent around the exact-power limit 10^22.
                String digits = Long.toString(Math.abs(rnd.nextLong()) % (long) Math.pow(10, 1 + rnd.nextInt(17)));
                int point = rnd.nextInt(digits.length() + 1);
                String mantissa = digits.substring(0, point) + (point == digits.length() ? "" : "." + digits.substring(point));
                if (mantissa.isEmpty() || mantissa.startsWith(".")) {
                    mantissa = "0" + mantissa;
                }
                int exp = rnd.nextInt(-30, 31);
                yield (rnd.nextBoolean() ? "-" : "") + mantissa + (rnd.nextBoolean() ? "e" + exp : "");
            }
            case 0 -> Double.toString(v);
            case 1 -> String.format(Locale.ROOT, "%.3f", v);
            case 2 -> String.format(Locale.ROOT, "%.6e", v);
            case 3 -> Long.toString(Math.round(v));
            case 4 -> new BigDecimal(v).toPlainString();
            case 5 -> String.format(Locale.ROOT, "%.17E", v).replace("E+", "e");
            case 6 -> pick(rnd, "-0", "-0.0", "0", "1e-400", "4.9e-324", "1e999", "NaN", "Infinity", "01", "1.",
                    ".5", "+3", "-", "1e", "123456789012345678901", "0.30000000000000004");
            default -> Double.toString(v).replace("E", "e");
        };
    }

    private static String pick(SplittableRandom rnd, String... options) {
        return options[rnd.nextInt(options.length)];
    }
}
