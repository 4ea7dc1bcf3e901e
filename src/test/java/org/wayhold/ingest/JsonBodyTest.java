package org.wayhold.ingest;

import static org.assertj.core.api.Assertions.assertThat;

import java.io.ByteArrayInputStream;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.RejectionReason;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;

/**
 * {@code application/json} bodies (openapi.yaml and README.md: "one object or an array"); a rejection's line is the
 * 1-based index of the element.
 */
class JsonBodyTest {

    private static ReadResult readJson(String body) throws IOException {
        return new NdjsonReader().readAllJson(new ByteArrayInputStream(body.getBytes(StandardCharsets.UTF_8)));
    }

    @Test
    void aSingleObjectIsOneSample() throws IOException {
        ReadResult r = readJson(" {\"type\":\"wheel_speed\",\"t\":1,\"speed\":2}\n");
        assertThat(r.samples()).containsExactly(new WheelSpeed(1.0, 2.0));
        assertThat(r.rejected()).isEmpty();
    }

    @Test
    void aSingleBadObjectIsRejectedAsLineOne() throws IOException {
        ReadResult r = readJson("{\"type\":\"gnss\",\"t\":1,\"lat\":91,\"lon\":0}");
        assertThat(r.rejected()).containsExactly(new LineError(1, RejectionReason.INVALID, "lat: must be within [-90, 90] degrees, was 91.0"));
    }

    @Test
    void anArrayKeepsItsValidElementsAndNamesTheBadOnesByIndex() throws IOException {
        ReadResult r = readJson("""
                [
                  {"type":"wheel_speed","t":1,"speed":2},
                  {"type":"gnss","t":1,"lat":"north","lon":0,"extra":{"nested":[1,2,3]}},
                  17,
                  [{"type":"yaw_rate","t":1,"rate":0}],
                  {"type":"yaw_rate","t":2,"rate":0.5,"unknown":[{"a":1}]},
                  {"type":"gnss","t":3,"lat":1,"lon":2}
                ]""");
        assertThat(r.samples()).containsExactly(new WheelSpeed(1.0, 2.0), new YawRate(2.0, 0.5),
                GnssFix.position(3.0, 1.0, 2.0, Double.NaN));
        assertThat(r.rejected()).containsExactly(
                new LineError(2, RejectionReason.INVALID, "lat: must be a number of degrees, was 'north'"),
                new LineError(3, RejectionReason.MALFORMED, "not a JSON object: found a number"),
                new LineError(4, RejectionReason.MALFORMED, "not a JSON object: found an array"));
    }

    @Test
    void aSyntaxErrorEndsTheBodyButKeepsWhatCameBefore() throws IOException {
        ReadResult r = readJson("[{\"type\":\"wheel_speed\",\"t\":1,\"speed\":2}, {\"type\":\"wheel_speed\",\"t\":2,");
        assertThat(r.samples()).containsExactly(new WheelSpeed(1.0, 2.0));
        assertThat(r.rejected()).singleElement().satisfies(e -> {
            assertThat(e.line()).isEqualTo(2);
            assertThat(e.detail()).startsWith("malformed JSON");
        });
    }

    /** Regression: a syntax error before the first element of an array was reported as line 0 (a 500). */
    @Test
    void aSyntaxErrorBeforeTheFirstElementIsElementOne() throws IOException {
        for (String body : new String[] {"[}", "[[[[", "[,", "[\u0000"}) {
            ReadResult r = readJson(body);
            assertThat(r.samples()).isEmpty();
            assertThat(r.rejected()).as(body).singleElement().satisfies(e -> {
                assertThat(e.line()).isEqualTo(1);
                assertThat(e.detail()).startsWith("malformed JSON");
            });
        }
    }

    @Test
    void emptyBodiesBodiesOfTheWrongKindAndTrailingContentAreRejected() throws IOException {
        assertThat(readJson("  ").rejected()).containsExactly(new LineError(1, RejectionReason.MALFORMED, "malformed JSON: the body is empty"));
        assertThat(readJson("\"gnss\"").rejected()).containsExactly(new LineError(1, RejectionReason.MALFORMED, "not a JSON object: found a string"));
        assertThat(readJson("[]").rejected()).isEmpty();
        ReadResult trailing = readJson("[{\"type\":\"wheel_speed\",\"t\":1,\"speed\":2}] {}");
        assertThat(trailing.samples()).hasSize(1);
        assertThat(trailing.rejected()).containsExactly(
                new LineError(2, RejectionReason.MALFORMED, "malformed JSON: more content after the end of the body"));
    }

    @Test
    void unknownFieldsOfArrayElementsAreCountedPerElement() throws IOException {
        ReadResult r = readJson("[{\"type\":\"wheel_speed\",\"t\":1,\"speed\":2,\"x\":1},"
                + " {\"type\":\"wheel_speed\",\"t\":2,\"speed\":2}, {\"type\":\"wheel_speed\",\"t\":3,\"speed\":2,\"x\":2}]");
        assertThat(r.samples()).hasSize(3);
        assertThat(r.unknown()).isEqualTo(new UnknownFields(2, List.of("x")));
    }
}
