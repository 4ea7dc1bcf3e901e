package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.Sample;

/**
 * Server-Sent Events: one pose per event, keep-alive comments when idle, and a clean end of the stream
 * (the response completes, it is not cut) when the vehicle is deleted. Keep-alives come every 0.2 s
 * here so that the test sees one quickly.
 */
class PoseStreamTest {

    private static LiveServer server;
    private static List<Sample> samples;

    @BeforeAll
    static void start() {
        server = new LiveServer(LiveServer.settings(s -> LiveServer.withLimits(s, s.maxBodyBytes(), s.maxSessions(),
                s.corsOrigins(), 0.2)));
        samples = Drives.openSky(41L, 20.0);
    }

    @AfterAll
    static void stop() {
        server.close();
    }

    @Test
    void eachPoseArrivesAsOneEventAndTheStreamEndsWhenTheVehicleIsDeleted() throws Exception {
        server.postNdjson("streamed", Drives.ndjson(samples.subList(0, 200)));
        try (SseClientLines sse = new SseClientLines(server, "/v1/vehicles/streamed/stream")) {
            assertThat(sse.status).isEqualTo(200);
            // The current pose comes first.
            Map<String, String> event = sse.nextEvent();
            assertThat(event).containsEntry("event", "pose").containsEntry("id", "1");
            JsonNode first = LiveServer.JSON.readTree(event.get("data"));
            assertThat(first.get("state").isTextual()).isTrue();

            server.postNdjson("streamed", Drives.ndjson(samples.subList(200, 1000)));
            double lastT = first.get("t").asDouble();
            for (int i = 2; i <= 11; i++) {
                event = sse.nextEvent();
                assertThat(event).containsEntry("event", "pose").containsEntry("id", Integer.toString(i));
                JsonNode p = LiveServer.JSON.readTree(event.get("data"));
                assertThat(p.get("t").asDouble()).isGreaterThanOrEqualTo(lastT);
                lastT = p.get("t").asDouble();
            }

            assertThat(server.delete("/v1/vehicles/streamed").statusCode()).isEqualTo(204);
            String end;
            do {
                end = sse.next();
            } while (end != null && !end.equals(SseClientLines.END) && !end.equals(SseClientLines.FAILED));
            assertThat(end).as("the stream completes cleanly").isEqualTo(SseClientLines.END);
        }
    }

    @Test
    void anIdleStreamSendsKeepAliveComments() throws Exception {
        server.postNdjson("idle", Drives.ndjson(samples.subList(0, 100)));
        try (SseClientLines sse = new SseClientLines(server, "/v1/vehicles/idle/stream")) {
            assertThat(sse.nextStartingWith(":")).isEqualTo(": keep-alive");
            assertThat(sse.nextStartingWith(":")).isEqualTo(": keep-alive");
        }
        JsonNode health = LiveServer.json(server.get("/health"));
        assertThat(health.get("status").asText()).isEqualTo("ok");
    }
}
