package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.Sample;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.settings.ServerSettings;

/**
 * The limits as a client meets them over HTTP: the per-vehicle rate (429 with Retry-After), the vehicle
 * id length, samples per request, and timestamps that jump far on the session's own timeline, which
 * are refused without changing what the session computes.
 *
 * <p>The server allows 1 sample per second per vehicle with a 1 s burst, so one ordinary batch puts a
 * vehicle tens of seconds in debt, far longer than the test takes; vehicle ids of at most 12
 * characters; 500 samples per request.
 */
class LimitsOverHttpTest {

    private static LiveServer slow;
    private static LiveServer normal;

    @BeforeAll
    static void start() {
        slow = new LiveServer(LiveServer.settings(s -> new ServerSettings(0, "127.0.0.1", List.of(), List.of(),
                s.maxBodyBytes(), s.maxLineBytes(), 500, s.maxSessions(), 12, 1.0, 1.0, List.of(), s.sseKeepAliveS(), s.idleTimeoutS(), s.minBodyBytesPerS(), s.drainTimeoutS(), s.maxConcurrentUploads(), s.maxStreams())));
        normal = new LiveServer(LiveServer.settings(s -> s));
    }

    @AfterAll
    static void stop() {
        slow.close();
        normal.close();
    }

    private static JsonNode problem(HttpResponse<String> r, int status, String field) {
        assertThat(r.statusCode()).as(r.body()).isEqualTo(status);
        assertThat(r.headers().firstValue("Content-Type").orElse("")).startsWith("application/problem+json");
        JsonNode p = LiveServer.json(r);
        assertThat(p.get("field").asText()).isEqualTo(field);
        return p;
    }

    @Test
    void aVehicleOverItsRateGets429WithRetryAfterAndOthersAreUnaffected() {
        byte[] batch = Drives.ndjson(Drives.openSky(31L, 0.5));
        assertThat(slow.postNdjson("fast", batch).statusCode()).isEqualTo(200);
        HttpResponse<String> r = slow.postNdjson("fast", batch);
        JsonNode p = problem(r, 429, "vehicle");
        assertThat(p.get("detail").asText()).contains("max_samples_per_second_per_vehicle");
        long retryAfterS = Long.parseLong(r.headers().firstValue("Retry-After").orElseThrow());
        // The batch holds about 80 samples; at 1 sample/s the debt is that many seconds, less what passed.
        assertThat(retryAfterS).isBetween(30L, 200L);
        assertThat(slow.postNdjson("patient", batch).statusCode()).isEqualTo(200);
        // Reads are not rate limited.
        assertThat(slow.get("/v1/vehicles/fast/pose").statusCode()).isEqualTo(200);
    }

    @Test
    void aVehicleIdLongerThanConfiguredIs400NamingTheKey() {
        byte[] one = Drives.ndjson(Drives.openSky(32L, 0.1));
        assertThat(slow.postNdjson("twelve-chars", one).statusCode()).isEqualTo(200);
        JsonNode p = problem(slow.postNdjson("thirteen-char", one), 400, "vehicle");
        assertThat(p.get("detail").asText()).contains("1 to 12", "server.max_vehicle_id_chars", "13 characters");
        assertThat(slow.sessions.find("thirteen-char")).isEmpty();
    }

    @Test
    void moreSamplesThanAllowedInOneRequestIs413() {
        StringBuilder body = new StringBuilder();
        for (int i = 0; i < 501; i++) {
            body.append(String.format(Locale.ROOT, "{\"type\":\"wheel_speed\",\"t\":%.2f,\"speed\":1.0}%n", 100.0 + i * 0.01));
        }
        JsonNode p = problem(normalSessionPost(slow, "many", body.toString()), 413, "body");
        assertThat(p.get("detail").asText()).contains("more than 500 samples", "server.max_samples_per_request");
    }

    private static HttpResponse<String> normalSessionPost(LiveServer server, String vehicle, String body) {
        return server.postNdjson(vehicle, body.getBytes(StandardCharsets.UTF_8));
    }

    /**
     * A sample an hour and more ahead of the session's newest (ordering.max_forward_jump_s, 3600 s) and
     * one far behind its reorder window (ordering.max_lag_s, 2 s) are rejected with their reasons, and
     * the session then computes exactly what a session fed only the good samples computes: the final
     * poses are equal field by field, so the jumps left no trace. No sample time is compared with the
     * server's clock: the drive is dated 2027, and the jumps go back to 1970 and ahead by an hour to
     * months.
     */
    @Test
    void farJumpsOnTheSessionsOwnTimelineAreRejectedAndDoNotPoisonIt() throws Exception {
        List<Sample> drive = Drives.openSky(33L, 30.0);
        List<List<Sample>> chunks = Drives.chunks(drive, 2.0);
        for (List<Sample> c : chunks) {
            assertThat(normal.postNdjson("clean", Drives.ndjson(c)).statusCode()).isEqualTo(200);
        }
        int aheadRejected = 0;
        int lateRejected = 0;
        int expectedAhead = 0;
        int expectedLate = 0;
        for (int k = 0; k < chunks.size(); k++) {
            List<Sample> c = new ArrayList<>(chunks.get(k));
            double newestT = c.get(c.size() - 1).t();
            if (k % 3 == 1) {
                c.add(new WheelSpeed(newestT + 3600.5 + k * 1e6, 10.0));
                expectedAhead++;
            }
            if (k % 3 == 2) {
                c.add(0, new WheelSpeed(1.0 + k, 10.0));
                expectedLate++;
            }
            JsonNode reply = LiveServer.json(normal.postNdjson("jumpy", Drives.ndjson(c)));
            for (JsonNode e : reply.get("rejected")) {
                String error = e.get("error").asText();
                if (error.contains("ahead of the session's newest sample")) {
                    aheadRejected++;
                } else if (error.contains("late by")) {
                    lateRejected++;
                }
            }
            assertThat(reply.get("rejected_count").asLong()).isEqualTo(k % 3 == 0 ? 0 : 1);
        }
        assertThat(aheadRejected).isEqualTo(expectedAhead).isPositive();
        assertThat(lateRejected).isEqualTo(expectedLate).isPositive();
        JsonNode clean = LiveServer.JSON.readTree(LiveServer.withoutLiveness(normal.get("/v1/vehicles/clean/pose").body()));
        JsonNode jumpy = LiveServer.JSON.readTree(LiveServer.withoutLiveness(normal.get("/v1/vehicles/jumpy/pose").body()));
        assertThat(jumpy).isEqualTo(clean);
        assertThat(LiveServer.json(normal.get("/v1/vehicles/jumpy/track")).get("poses"))
                .isEqualTo(LiveServer.json(normal.get("/v1/vehicles/clean/track")).get("poses"));
    }
}
