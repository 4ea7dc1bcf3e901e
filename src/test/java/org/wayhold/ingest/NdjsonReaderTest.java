package org.wayhold.ingest;

import static org.assertj.core.api.Assertions.assertThat;

import java.io.ByteArrayInputStream;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.junit.jupiter.params.provider.ValueSource;
import org.wayhold.sample.RejectionReason;
import org.wayhold.sample.FixType;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.ReferencePoint;
import org.wayhold.sample.Sample;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;

/**
 * The NDJSON sample format as README.md ("Sample format") and openapi.yaml (schema {@code Sample})
 * define it. Expected values are exact hand cases: each line is typed here and the record it must give
 * is written out field by field.
 */
class NdjsonReaderTest {

    private static ReadResult read(String text) {
        return new NdjsonReader().readAll(new ByteArrayInputStream(text.getBytes(StandardCharsets.UTF_8)));
    }

    /** The single rejection of a one-line input; fails when the line was accepted. */
    private static LineError rejectionOf(String line) {
        ReadResult r = read(line + "\n");
        assertThat(r.samples()).as("samples from %s", line).isEmpty();
        assertThat(r.rejected()).as("rejections of %s", line).hasSize(1);
        assertThat(r.rejected().get(0).line()).isEqualTo(1);
        return r.rejected().get(0);
    }

    private static Sample onlySample(String line) {
        ReadResult r = read(line);
        assertThat(r.rejected()).as("rejections of %s", line).isEmpty();
        assertThat(r.samples()).hasSize(1);
        return r.samples().get(0);
    }

    @Test
    void aFullGnssLineGivesEveryField() {
        Sample s = onlySample("{\"type\":\"gnss\",\"t\":1799999999.25,\"lat\":48.1173,\"lon\":11.5166667,"
                + "\"alt\":592.3,\"sigma_h\":1.5,\"sigma_v\":2.5,\"fix\":\"rtk_float\",\"sats\":8,\"hdop\":0.9,"
                + "\"speed\":11.5,\"course\":84.4}");
        assertThat(s).isEqualTo(new GnssFix(1799999999.25, 48.1173, 11.5166667, 592.3, 1.5, 2.5,
                FixType.RTK_FLOAT, 8, 0.9, 11.5, 84.4));
    }

    @Test
    void aMinimalGnssLineLeavesOptionalFieldsNotGivenAndDefaultsTo3d() {
        GnssFix g = (GnssFix) onlySample("{\"t\":10,\"lat\":-33.5,\"lon\":-70.25,\"type\":\"gnss\"}");
        assertThat(g).isEqualTo(new GnssFix(10.0, -33.5, -70.25, Double.NaN, Double.NaN, Double.NaN,
                FixType.THREE_D, -1, Double.NaN, Double.NaN, Double.NaN));
        assertThat(g.hasAlt() || g.hasSigmaH() || g.hasSats() || g.hasHdop() || g.hasSpeed()).isFalse();
    }

    @Test
    void wheelSpeedYawRateAndReferenceLinesParse() {
        ReadResult r = read("""
                {"type":"wheel_speed","t":1.5,"speed":-2.25}
                {"type":"yaw_rate","t":1.5,"rate":0.125}
                {"type":"reference","t":2,"lat":1,"lon":2,"alt":3.5,"heading":271}
                {"type":"reference","t":3,"lat":1,"lon":2}
                """);
        assertThat(r.rejected()).isEmpty();
        assertThat(r.samples()).containsExactly(
                new WheelSpeed(1.5, -2.25),
                new YawRate(1.5, 0.125),
                new ReferencePoint(2.0, 1.0, 2.0, 3.5, 271.0),
                new ReferencePoint(3.0, 1.0, 2.0, Double.NaN, Double.NaN));
    }

    @Test
    void aNullValueCountsAsNotGiven() {
        GnssFix g = (GnssFix) onlySample("{\"type\":\"gnss\",\"t\":1,\"lat\":1,\"lon\":2,\"alt\":null,\"sats\":null}");
        assertThat(g.hasAlt()).isFalse();
        assertThat(g.hasSats()).isFalse();
    }

    @Test
    void unknownFieldsAreIgnoredWhateverTheirValue() {
        // Forward compatibility: a newer sender may add fields; NaN, nesting and odd types are skipped unread.
        Sample s = onlySample("{\"type\":\"wheel_speed\",\"t\":1,\"speed\":3,\"wheel\":\"rear_left\","
                + "\"raw\":{\"ticks\":[1,2,{\"x\":NaN}]},\"flag\":true,\"v2\":Infinity}");
        assertThat(s).isEqualTo(new WheelSpeed(1.0, 3.0));
    }

    @Test
    void knownFieldsThatTheTypeDoesNotUseAreIgnored() {
        assertThat(onlySample("{\"type\":\"yaw_rate\",\"t\":1,\"rate\":0.5,\"lat\":95,\"speed\":-4}"))
                .isEqualTo(new YawRate(1.0, 0.5));
    }

    @Test
    void malformedJsonIsRejectedWithItsColumn() {
        assertThat(rejectionOf("{\"type\":\"gnss\",\"t\":1,").detail()).startsWith("malformed JSON");
        assertThat(rejectionOf("{\"type\":\"gnss\" \"t\":1}").detail())
                .startsWith("malformed JSON at column 16:");
    }

    @Test
    void contentAfterTheObjectMakesTheLineMalformed() {
        assertThat(rejectionOf("{\"type\":\"wheel_speed\",\"t\":1,\"speed\":3} {\"t\":2}").detail())
                .isEqualTo("malformed JSON: more content after the object");
        assertThat(rejectionOf("{\"type\":\"wheel_speed\",\"t\":1,\"speed\":3} x").detail())
                .startsWith("malformed JSON");
    }

    @Test
    void invalidUtf8IsMalformed() {
        byte[] line = {'{', '"', 't', 'y', 'p', 'e', '"', ':', '"', (byte) 0xC3, (byte) 0x28, '"', '}', '\n'};
        ReadResult r = new NdjsonReader().readAll(new ByteArrayInputStream(line));
        assertThat(r.rejected()).singleElement().extracting(LineError::detail).asString()
                .startsWith("malformed JSON");
    }

    @ParameterizedTest
    @CsvSource(delimiter = '|', value = {
        "[1, 2]            | not a JSON object: found an array",
        "42                | not a JSON object: found a number",
        "\"gnss\"          | not a JSON object: found a string",
        "null              | not a JSON object: found null",
        "true              | not a JSON object: found a boolean"})
    void aLineThatIsNotAnObjectIsRejected(String line, String reason) {
        assertThat(rejectionOf(line).detail()).isEqualTo(reason);
    }

    @Test
    void missingTIsRejected() {
        assertThat(rejectionOf("{\"type\":\"wheel_speed\",\"speed\":3}").detail())
                .isEqualTo("t: missing, required for type wheel_speed");
    }

    @ParameterizedTest
    @ValueSource(strings = {"NaN", "Infinity", "-Infinity", "1e999"})
    void nonFiniteTIsRejected(String t) {
        assertThat(rejectionOf("{\"type\":\"wheel_speed\",\"t\":" + t + ",\"speed\":3}").detail())
                .isEqualTo("t: must be a finite number of seconds, was " + t);
    }

    @ParameterizedTest
    @CsvSource(delimiter = '|', value = {
        "{\"type\":\"gnss\",\"t\":1,\"lat\":NaN,\"lon\":2}                 | lat: must be a finite number of degrees, was NaN",
        "{\"type\":\"gnss\",\"t\":1,\"lat\":1,\"lon\":2,\"alt\":-Infinity} | alt: must be a finite number of metres, was -Infinity",
        "{\"type\":\"gnss\",\"t\":1,\"lat\":1,\"lon\":2,\"hdop\":NaN}      | hdop: must be a finite number, was NaN",
        "{\"type\":\"wheel_speed\",\"t\":1,\"speed\":Infinity}            | speed: must be a finite number of m/s, was Infinity",
        "{\"type\":\"yaw_rate\",\"t\":1,\"rate\":NaN}                     | rate: must be a finite number of rad/s, was NaN",
        "{\"type\":\"reference\",\"t\":1,\"lat\":1,\"lon\":2,\"heading\":NaN} | heading: must be a finite number of degrees, was NaN"})
    void nanAndInfinityAreRejectedNamingTheField(String line, String reason) {
        // Decision: the parser admits NaN/Infinity tokens so the reason can name the field; a NaN must never
        // reach a record, where it would silently mean "not given".
        assertThat(rejectionOf(line).detail()).isEqualTo(reason);
    }

    @Test
    void nanIsRejectedEvenInAKnownFieldTheTypeDoesNotUse() {
        assertThat(rejectionOf("{\"type\":\"wheel_speed\",\"t\":1,\"speed\":3,\"course\":NaN}").detail())
                .isEqualTo("course: must be a finite number of degrees, was NaN");
    }

    @Test
    void latitudeOutsideItsRangeIsRejected() {
        assertThat(rejectionOf("{\"type\":\"gnss\",\"t\":1,\"lat\":91,\"lon\":2}").detail())
                .isEqualTo("lat: must be within [-90, 90] degrees, was 91.0");
        assertThat(rejectionOf("{\"type\":\"reference\",\"t\":1,\"lat\":-90.5,\"lon\":2}").detail())
                .isEqualTo("lat: must be within [-90, 90] degrees, was -90.5");
    }

    @Test
    void longitudeOutsideItsRangeIsRejected() {
        assertThat(rejectionOf("{\"type\":\"gnss\",\"t\":1,\"lat\":1,\"lon\":180.25}").detail())
                .isEqualTo("lon: must be within [-180, 180] degrees, was 180.25");
    }

    @Test
    void theRangeLimitsThemselvesAreAccepted() {
        assertThat(onlySample("{\"type\":\"gnss\",\"t\":1,\"lat\":-90,\"lon\":180}"))
                .isEqualTo(GnssFix.position(1.0, -90.0, 180.0, Double.NaN));
    }

    @ParameterizedTest
    @ValueSource(strings = {"sigma_h", "sigma_v", "hdop"})
    void negativeAccuracyIsRejected(String field) {
        assertThat(rejectionOf("{\"type\":\"gnss\",\"t\":1,\"lat\":1,\"lon\":2,\"" + field + "\":-0.5}").detail())
                .isEqualTo(field + ": must not be negative, was -0.5");
    }

    @Test
    void negativeSatelliteCountIsRejected() {
        // -1 is the records' "not given" marker: on the wire it must be an error, not silently absent.
        assertThat(rejectionOf("{\"type\":\"gnss\",\"t\":1,\"lat\":1,\"lon\":2,\"sats\":-1}").detail())
                .isEqualTo("sats: must be a whole number of satellites >= 0, was -1");
    }

    @Test
    void unknownTypeIsRejected() {
        assertThat(rejectionOf("{\"type\":\"odometer\",\"t\":1,\"speed\":3}").detail())
                .isEqualTo("type: unknown sample type 'odometer', expected one of gnss, wheel_speed, yaw_rate, reference");
    }

    @Test
    void missingTypeIsRejected() {
        assertThat(rejectionOf("{\"t\":1,\"speed\":3}").detail())
                .isEqualTo("type: missing, every sample needs one of gnss, wheel_speed, yaw_rate, reference");
    }

    @Test
    void unknownFixIsRejected() {
        assertThat(rejectionOf("{\"type\":\"gnss\",\"t\":1,\"lat\":1,\"lon\":2,\"fix\":\"4d\"}").detail())
                .isEqualTo("fix: unknown fix type '4d', expected one of none, 2d, 3d, dgnss, rtk_float, rtk_fixed");
    }

    @ParameterizedTest
    @CsvSource(delimiter = '|', value = {
        "{\"type\":\"gnss\",\"t\":1,\"lat\":\"x\",\"lon\":2}              | lat: must be a number of degrees, was 'x'",
        "{\"type\":\"gnss\",\"t\":1,\"lat\":1,\"lon\":2,\"sats\":1.5}     | sats: must be a whole number of satellites >= 0, was 1.5",
        "{\"type\":\"gnss\",\"t\":1,\"lat\":1,\"lon\":2,\"sats\":\"8\"}   | sats: must be a whole number of satellites >= 0, was '8'",
        "{\"type\":\"gnss\",\"t\":1,\"lat\":1,\"lon\":2,\"sats\":99999999999} | sats: must be a whole number of satellites >= 0, was 99999999999",
        "{\"type\":\"gnss\",\"t\":1,\"lat\":1,\"lon\":2,\"fix\":3}        | fix: must be a string, was 3",
        "{\"type\":5,\"t\":1}                                             | type: must be a string, was 5",
        "{\"type\":\"wheel_speed\",\"t\":\"1\",\"speed\":3}               | t: must be a number of seconds, was '1'",
        "{\"type\":\"wheel_speed\",\"t\":1,\"speed\":true}                | speed: must be a number of m/s, was true",
        "{\"type\":\"wheel_speed\",\"t\":1,\"speed\":[3]}                 | speed: must be a number of m/s, was an array",
        "{\"type\":\"gnss\",\"t\":1,\"lat\":{\"deg\":1},\"lon\":2}        | lat: must be a number of degrees, was an object"})
    void wrongFieldTypesAreRejected(String line, String reason) {
        assertThat(rejectionOf(line).detail()).isEqualTo(reason);
    }

    @Test
    void aLongBadStringIsQuotedOnlyInPart() {
        String reason = rejectionOf("{\"type\":\"" + "x".repeat(500) + "\",\"t\":1}").detail();
        assertThat(reason).isEqualTo("type: unknown sample type '" + "x".repeat(40)
                + "...', expected one of gnss, wheel_speed, yaw_rate, reference");
    }

    @ParameterizedTest
    @CsvSource(delimiter = '|', value = {
        "{\"type\":\"wheel_speed\",\"t\":1}                 | speed: missing, required for type wheel_speed",
        "{\"type\":\"yaw_rate\",\"t\":1,\"speed\":2}        | rate: missing, required for type yaw_rate",
        "{\"type\":\"gnss\",\"t\":1,\"lat\":2}              | lon: missing, required for type gnss",
        "{\"type\":\"reference\",\"t\":1,\"lon\":2}         | lat: missing, required for type reference",
        "{\"type\":\"gnss\",\"t\":1,\"lat\":null,\"lon\":2} | lat: missing, required for type gnss"})
    void missingRequiredFieldsAreRejected(String line, String reason) {
        assertThat(rejectionOf(line).detail()).isEqualTo(reason);
    }

    @Test
    void aFieldGivenTwiceIsRejected() {
        assertThat(rejectionOf("{\"type\":\"wheel_speed\",\"t\":1,\"speed\":3,\"speed\":4}").detail())
                .isEqualTo("speed: given more than once");
    }

    @Test
    void theFirstProblemOfALineIsReported() {
        assertThat(rejectionOf("{\"type\":\"gnss\",\"t\":1,\"lat\":\"x\",\"lon\":\"y\"}").detail())
                .startsWith("lat:");
    }

    @Test
    void aMixedBatchKeepsEveryValidLineAndNumbersEveryLine() {
        String text = String.join("\n",
                "{\"type\":\"wheel_speed\",\"t\":1,\"speed\":3}",
                "",
                "{\"type\":\"gnss\",\"t\":1,\"lat\":91,\"lon\":2}",
                "   \t",
                "{\"type\":\"yaw_rate\",\"t\":1,\"rate\":0.5}",
                "not json",
                "{\"type\":\"gnss\",\"t\":2,\"lat\":1,\"lon\":2}",
                "{\"type\":\"teleport\",\"t\":2}",
                "{\"type\":\"wheel_speed\",\"t\":2,\"speed\":3.5}");
        ReadResult r = read(text);
        assertThat(r.samples()).containsExactly(
                new WheelSpeed(1.0, 3.0),
                new YawRate(1.0, 0.5),
                GnssFix.position(2.0, 1.0, 2.0, Double.NaN),
                new WheelSpeed(2.0, 3.5));
        assertThat(r.rejected()).extracting(LineError::line).containsExactly(3L, 6L, 8L);
        assertThat(r.rejected().get(0).detail()).startsWith("lat:");
        assertThat(r.rejected().get(1).detail()).startsWith("malformed JSON");
        assertThat(r.rejected().get(2).detail()).startsWith("type:");
    }

    @Test
    void crLfLineEndsAByteOrderMarkAndAMissingFinalNewlineAreHandled() {
        byte[] body = ("\uFEFF{\"type\":\"wheel_speed\",\"t\":1,\"speed\":3}\r\n\r\n"
                + "{\"type\":\"wheel_speed\",\"t\":2,\"speed\":4}").getBytes(StandardCharsets.UTF_8);
        ReadResult r = new NdjsonReader().readAll(new ByteArrayInputStream(body));
        assertThat(r.rejected()).isEmpty();
        assertThat(r.samples()).containsExactly(new WheelSpeed(1.0, 3.0), new WheelSpeed(2.0, 4.0));
    }

    @Test
    void anOverlongLineIsRejectedAndReadingGoesOnAtTheNextLine() {
        String good = "{\"type\":\"wheel_speed\",\"t\":1,\"speed\":3}";
        String longLine = "{\"type\":\"wheel_speed\",\"t\":1,\"speed\":3,\"pad\":\"" + "p".repeat(200_000) + "\"}";
        NdjsonReader reader = new NdjsonReader(100);
        ReadResult r = reader.readAll(bytes(good + "\n" + longLine + "\n" + good + "\n" + longLine));
        assertThat(r.samples()).containsExactly(new WheelSpeed(1.0, 3.0), new WheelSpeed(1.0, 3.0));
        assertThat(r.rejected()).containsExactly(
                new LineError(2, RejectionReason.MALFORMED, "line longer than 100 bytes"),
                new LineError(4, RejectionReason.MALFORMED, "line longer than 100 bytes"));
    }

    @Test
    void theLineLimitCountsBytesWithoutTheLineTerminator() {
        String line = "{\"type\":\"wheel_speed\",\"t\":1,\"speed\":3}";
        int length = line.getBytes(StandardCharsets.UTF_8).length;
        assertThat(new NdjsonReader(length).readAll(bytes(line + "\r\n")).samples()).hasSize(1);
        assertThat(new NdjsonReader(length - 1).readAll(bytes(line + "\n")).rejected())
                .containsExactly(new LineError(1, RejectionReason.MALFORMED, "line longer than " + (length - 1) + " bytes"));
    }

    @Test
    void howTheInputIsCutIntoReadsDoesNotChangeTheResult() {
        StringBuilder text = new StringBuilder();
        for (int i = 0; i < 300; i++) {
            text.append("{\"type\":\"wheel_speed\",\"t\":").append(i).append(",\"speed\":").append(i * 0.5).append("}\n");
            if (i % 7 == 0) {
                text.append("{\"type\":\"gnss\",\"t\":").append(i).append(",\"lat\":99,\"lon\":1}\r\n\n");
            }
            if (i % 11 == 0) {
                text.append("{\"pad\":\"").append("q".repeat(150)).append("\"}\n");
            }
        }
        byte[] body = text.toString().getBytes(StandardCharsets.UTF_8);
        NdjsonReader reader = new NdjsonReader(120);
        ReadResult whole = reader.readAll(new ByteArrayInputStream(body));
        ReadResult trickled = reader.readAll(new TrickleStream(body, 7));
        assertThat(whole.samples()).hasSize(300);
        assertThat(whole.rejected()).hasSize(43 + 28);
        assertThat(trickled).isEqualTo(whole);
    }

    private static InputStream bytes(String s) {
        return new ByteArrayInputStream(s.getBytes(StandardCharsets.UTF_8));
    }

    /** Hands out at most {@code step} bytes per read, so lines straddle reads at every offset. */
    private static final class TrickleStream extends InputStream {
        private final byte[] data;
        private final int step;
        private int pos;

        TrickleStream(byte[] data, int step) {
            this.data = data;
            this.step = step;
        }

        @Override
        public int read() {
            return pos < data.length ? data[pos++] & 0xFF : -1;
        }

        @Override
        public int read(byte[] b, int off, int len) {
            if (pos >= data.length) {
                return -1;
            }
            int n = Math.min(Math.min(len, step), data.length - pos);
            System.arraycopy(data, pos, b, off, n);
            pos += n;
            return n;
        }
    }

    @Test
    void readAllReturnsImmutableLists() {
        ReadResult r = read("{\"type\":\"yaw_rate\",\"t\":1,\"rate\":0.5}\nx\n");
        assertThat(r.samples()).isUnmodifiable();
        assertThat(r.rejected()).isUnmodifiable();
    }

    @Test
    void fieldsOfNoSampleTypeAreSkippedButCountedWithTheirFirstNames() {
        ReadResult r = read("""
                {"type":"wheel_speed","t":1,"speed":2}
                {"type":"wheel_speed","t":2,"speed":2,"spede":3}
                {"type":"gnss","t":3,"lat":1,"lon":2,"sigma_hz":1,"note":{"a":[1]}}
                {"type":"yaw_rate","t":4,"rate":0.1,"rate_dps":5.7}
                {"type":"yaw_rate","t":5,"rate":"fast","spede":1}
                {"type":"reference","t":6,"lat":1,"lon":2,"a":1,"b":2,"c":3}
                """);
        assertThat(r.samples()).hasSize(5);
        assertThat(r.rejected()).extracting(LineError::line).containsExactly(5L);
        // Five lines carry unknown names (the rejected one too); the first five distinct names are kept.
        assertThat(r.unknown()).isEqualTo(new UnknownFields(5,
                java.util.List.of("spede", "sigma_hz", "note", "rate_dps", "a")));
        assertThat(r.unknown().describe())
                .isEqualTo("5 lines carry fields that no sample type has, ignored: spede, sigma_hz, note, rate_dps, a, ...");
        // A field that another sample type uses is not unknown, only unused here.
        assertThat(read("{\"type\":\"wheel_speed\",\"t\":1,\"speed\":2,\"rate\":0.1}\n").unknown())
                .isEqualTo(UnknownFields.NONE);
    }

    /**
     * Rule: a finite value beyond the physical bounds of the ingest settings is rejected as implausible,
     * with a detail that starts with the field's name and names the key that sets the bound. Each row
     * is a value just past its default bound (IngestSettings.defaults(); fixed bounds from definitions:
     * t >= 0, course and heading within [0, 360] degrees).
     */
    @ParameterizedTest
    @CsvSource(delimiter = '|', value = {
        "{\"type\":\"wheel_speed\",\"t\":1,\"speed\":1e300}|speed: must be within [-150.0, 150.0] m/s (ingest.max_wheel_speed_mps), was 1.0E300",
        "{\"type\":\"wheel_speed\",\"t\":1,\"speed\":-150.00000000000003}|speed: must be within [-150.0, 150.0]",
        "{\"type\":\"yaw_rate\",\"t\":1,\"rate\":10.000000000000002}|rate: must be within [-10.0, 10.0] rad/s (ingest.max_yaw_rate_rad_per_s)",
        "{\"type\":\"gnss\",\"t\":1,\"lat\":1,\"lon\":2,\"alt\":1e300}|alt: must be within [-1000.0, 100000.0] m",
        "{\"type\":\"gnss\",\"t\":1,\"lat\":1,\"lon\":2,\"alt\":-1000.0000000000001}|alt: must be within",
        "{\"type\":\"gnss\",\"t\":1,\"lat\":1,\"lon\":2,\"sigma_h\":1e200}|sigma_h: must be within [0.0, 10000.0] m (ingest.max_sigma_m)",
        "{\"type\":\"gnss\",\"t\":1,\"lat\":1,\"lon\":2,\"sigma_v\":10000.000000000002}|sigma_v: must be within",
        "{\"type\":\"gnss\",\"t\":1,\"lat\":1,\"lon\":2,\"hdop\":1e200}|hdop: must be within [0.0, 100.0] (ingest.max_hdop)",
        "{\"type\":\"gnss\",\"t\":1,\"lat\":1,\"lon\":2,\"sats\":1001}|sats: must be at most 1000 (ingest.max_sats)",
        "{\"type\":\"gnss\",\"t\":1,\"lat\":1,\"lon\":2,\"speed\":150.00000000000003}|speed: must be within [0.0, 150.0] m/s (ingest.max_gnss_speed_mps)",
        "{\"type\":\"gnss\",\"t\":1,\"lat\":1,\"lon\":2,\"course\":360.00000000000006}|course: must be within [0.0, 360.0] degrees",
        "{\"type\":\"gnss\",\"t\":1,\"lat\":1,\"lon\":2,\"course\":-1e-300}|course: must be within [0.0, 360.0] degrees",
        "{\"type\":\"reference\",\"t\":1,\"lat\":1,\"lon\":2,\"alt\":1e7}|alt: must be within",
        "{\"type\":\"reference\",\"t\":1,\"lat\":1,\"lon\":2,\"heading\":720}|heading: must be within [0.0, 360.0] degrees",
        "{\"type\":\"yaw_rate\",\"t\":-0.5,\"rate\":0}|t: must be within [0.0, 1.0E10] s (ingest.max_t_s)",
        "{\"type\":\"yaw_rate\",\"t\":1e300,\"rate\":0}|t: must be within [0.0, 1.0E10] s"})
    void aValueBeyondItsPhysicalBoundIsRejectedAsImplausible(String line, String detail) {
        LineError e = rejectionOf(line);
        assertThat(e.reason()).isEqualTo(RejectionReason.IMPLAUSIBLE);
        assertThat(e.detail()).startsWith(detail);
    }

    /** The bounds themselves are accepted: each is the largest (or smallest) plausible value. */
    @ParameterizedTest
    @ValueSource(strings = {
        "{\"type\":\"wheel_speed\",\"t\":0,\"speed\":-150}",
        "{\"type\":\"yaw_rate\",\"t\":1e10,\"rate\":10}",
        "{\"type\":\"gnss\",\"t\":1,\"lat\":90,\"lon\":-180,\"alt\":-1000,\"sigma_h\":0,\"sigma_v\":10000,"
                + "\"hdop\":100,\"sats\":1000,\"speed\":150,\"course\":360}",
        "{\"type\":\"reference\",\"t\":1,\"lat\":-90,\"lon\":180,\"alt\":100000,\"heading\":0}"})
    void valuesAtTheBoundsAreAccepted(String line) {
        ReadResult r = new NdjsonReader().readAll(new ByteArrayInputStream(line.getBytes(StandardCharsets.UTF_8)));
        assertThat(r.rejected()).isEmpty();
        assertThat(r.samples()).hasSize(1);
    }
}
