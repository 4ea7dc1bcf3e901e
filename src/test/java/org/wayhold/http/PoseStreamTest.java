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
 * Server-Sent Events: one pose per event with its time as the event id, resumption after a
 * {@code Last-Event-ID}, any Accept that admits event streams, keep-alive comments when idle, and a
 * clean end of the stream (the response completes, it is not cut) when the vehicle is deleted.
 * Keep-alives come every 0.2 s here so that the test sees one quickly. The rules are the HTML Living
 * Standard's for event streams ("Server-sent events": the last event ID a client sends back on
 * reconnection) and RFC 9110 sec. 12.5.1 for Accept.
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
            assertThat(event).containsEntry("event", "pose");
            JsonNode first = LiveServer.JSON.readTree(event.get("data"));
            assertThat(first.get("state").isTextual()).isTrue();
            // The id is the pose's own time, so it means the same on any connection.
            assertThat(Double.parseDouble(event.get("id"))).isEqualTo(first.get("t").asDouble());
            assertThat(first.get("stale").asBoolean()).isFalse();
            assertThat(first.get("received_at").isNumber()).isTrue();

            server.postNdjson("streamed", Drives.ndjson(samples.subList(200, 1000)));
            double lastT = first.get("t").asDouble();
            for (int i = 2; i <= 11; i++) {
                event = sse.nextEvent();
                assertThat(event).containsEntry("event", "pose");
                JsonNode p = LiveServer.JSON.readTree(event.get("data"));
                assertThat(p.get("t").asDouble()).isGreaterThanOrEqualTo(lastT);
                assertThat(Double.parseDouble(event.get("id"))).isEqualTo(p.get("t").asDouble());
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

    /**
     * A client that lost its stream and comes back with the id of the last event it saw gets the poses
     * after that one: exactly the history's poses after it (the track endpoint is the oracle), in order,
     * none twice and none left out, then the live ones.
     */
    @Test
    void aReconnectingClientResumesAfterTheLastEventItSaw() throws Exception {
        int cut = samples.size() - 300;
        server.postNdjson("resumed", Drives.ndjson(samples.subList(0, cut)));
        JsonNode track = LiveServer.json(server.get("/v1/vehicles/resumed/track")).get("poses");
        assertThat(track.size()).isGreaterThan(20);
        double seen = track.get(track.size() - 15).get("t").asDouble();
        String seenId = PoseJson.plain(seen);
        try (SseClientLines sse = new SseClientLines(server, "/v1/vehicles/resumed/stream",
                Map.of("Accept", "text/event-stream", "Last-Event-ID", seenId))) {
            assertThat(sse.status).isEqualTo(200);
            for (int i = track.size() - 14; i < track.size(); i++) {
                Map<String, String> event = sse.nextEvent();
                JsonNode p = LiveServer.JSON.readTree(event.get("data"));
                assertThat(p.get("t").asDouble()).as("event %d after the resumption", i).isEqualTo(
                        track.get(i).get("t").asDouble());
                assertThat(event.get("id")).isEqualTo(PoseJson.plain(track.get(i).get("t").asDouble()));
            }
            server.postNdjson("resumed", Drives.ndjson(samples.subList(cut, samples.size())));
            JsonNode live = LiveServer.JSON.readTree(sse.nextEvent().get("data"));
            assertThat(live.get("t").asDouble()).isGreaterThan(track.get(track.size() - 1).get("t").asDouble());
        }
        // Without the id the stream starts from the current pose, as before.
        try (SseClientLines sse = new SseClientLines(server, "/v1/vehicles/resumed/stream")) {
            JsonNode p = LiveServer.JSON.readTree(sse.nextEvent().get("data"));
            assertThat(p.get("t").asDouble()).isEqualTo(
                    LiveServer.json(server.get("/v1/vehicles/resumed/pose")).get("t").asDouble());
        }
    }

    /** RFC 9110 sec. 12.5.1: no Accept means anything goes, and wildcards admit text/event-stream. */
    @Test
    void wildcardAndMissingAcceptAreServedAStream() throws Exception {
        server.postNdjson("anyone", Drives.ndjson(samples.subList(0, 100)));
        for (Map<String, String> headers : List.of(Map.<String, String>of(), Map.of("Accept", "*/*"),
                Map.of("Accept", "text/*;q=0.5, application/json"))) {
            try (SseClientLines sse = new SseClientLines(server, "/v1/vehicles/anyone/stream", headers)) {
                assertThat(sse.status).as("%s", headers).isEqualTo(200);
                assertThat(sse.contentType).startsWith("text/event-stream");
                assertThat(sse.nextEvent()).as("%s", headers).containsEntry("event", "pose");
            }
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
