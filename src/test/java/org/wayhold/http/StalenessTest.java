package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import java.net.http.HttpResponse;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.Sample;
import org.wayhold.settings.OutageSettings;
import org.wayhold.settings.Settings;
import org.wayhold.testing.MutableClock;

/**
 * A vehicle that stops sending must look stopped: once nothing has arrived for longer than
 * {@code outage.stale_after_s} of the service's wall clock, its latest pose, the vehicle list, its pose
 * stream (without a new pose) and the metrics say {@code stale}, while its navigation state stays what
 * the filter said; {@code received_at} is when its latest accepted sample arrived. The wall clock is a
 * test clock moved by hand, so nothing here waits for the stale time to pass. The rule is the project's
 * own (the v2 interface contract); the expected times are the test clock's readings.
 */
class StalenessTest {

    private static final double STALE_AFTER_S = 5.0;
    /** 2026-12-05T00:00:00Z in ms: any fixed reading works, the vehicle's clock is unrelated to it. */
    private static final long START_MS = 1_796_428_800_000L;

    private static MutableClock clock;
    private static LiveServer server;
    private static List<Sample> samples;

    @BeforeAll
    static void start() {
        clock = new MutableClock(START_MS);
        Settings d = LiveServer.settings(s -> s);
        Settings settings = new Settings(d.server(), d.filter(), d.gating(),
                new OutageSettings(d.outage().gapS(), d.outage().alertLimitM(), STALE_AFTER_S), d.ordering(),
                d.history(), d.vehicles());
        server = new LiveServer(settings, clock);
        samples = Drives.openSky(71L, 30.0);
    }

    @AfterAll
    static void stop() {
        server.close();
    }

    @Test
    void aVehicleThatStopsSendingTurnsStaleInThePoseTheListAndTheMetricsAndKeepsItsState() {
        double arrivedS = clock.millis() / 1000.0;
        assertThat(server.postNdjson("quiet", Drives.ndjson(samples.subList(0, 500))).statusCode()).isEqualTo(200);
        HttpResponse<String> fresh = server.get("/v1/vehicles/quiet/pose");
        JsonNode pose = LiveServer.json(fresh);
        assertThat(pose.get("received_at").asDouble()).isEqualTo(arrivedS);
        assertThat(pose.get("stale").asBoolean()).isFalse();
        String state = pose.get("state").asText();
        String etag = fresh.headers().firstValue("ETag").orElseThrow();

        clock.advanceS(STALE_AFTER_S - 0.5);
        assertThat(LiveServer.json(server.get("/v1/vehicles/quiet/pose")).get("stale").asBoolean())
                .as("within the stale time").isFalse();

        clock.advanceS(1.0);
        // The pose has not changed, but the old tag must not hide the change of staleness.
        HttpResponse<String> stale = server.send(server.request("/v1/vehicles/quiet/pose")
                .header("If-None-Match", etag).GET().build());
        assertThat(stale.statusCode()).isEqualTo(200);
        JsonNode stalePose = LiveServer.json(stale);
        assertThat(stalePose.get("stale").asBoolean()).isTrue();
        assertThat(stalePose.get("state").asText()).as("the navigation state stays the filter's").isEqualTo(state);
        assertThat(stalePose.get("t").asDouble()).isEqualTo(pose.get("t").asDouble());
        assertThat(stalePose.get("received_at").asDouble()).isEqualTo(arrivedS);

        JsonNode item = vehicle("quiet");
        assertThat(item.get("stale").asBoolean()).isTrue();
        assertThat(item.get("state").asText()).isEqualTo(state);
        assertThat(item.get("received_at").asDouble()).isEqualTo(arrivedS);
        assertThat(server.get("/metrics").body())
                .contains("wayhold_vehicles{stale=\"true\",state=\"" + state + "\"} 1.0");

        // A new sample makes it fresh again, with the new arrival time.
        assertThat(server.postNdjson("quiet", Drives.ndjson(samples.subList(500, 520))).statusCode()).isEqualTo(200);
        JsonNode back = LiveServer.json(server.get("/v1/vehicles/quiet/pose"));
        assertThat(back.get("stale").asBoolean()).isFalse();
        assertThat(back.get("received_at").asDouble()).isEqualTo(clock.millis() / 1000.0);
        assertThat(vehicle("quiet").get("stale").asBoolean()).isFalse();
        server.delete("/v1/vehicles/quiet");
    }

    /** Samples refused as late change nothing, not even the arrival time: only accepted samples count. */
    @Test
    void rejectedSamplesDoNotCountAsArrivals() {
        server.postNdjson("late", Drives.ndjson(samples.subList(0, 400)));
        clock.advanceS(STALE_AFTER_S + 1.0);
        assertThat(vehicle("late").get("stale").asBoolean()).isTrue();
        // Samples far older than the reorder window (ordering.max_lag_s, 2 s): rejected as late.
        double old = samples.get(0).t() - 100.0;
        String late = "{\"type\":\"wheel_speed\",\"t\":" + old + ",\"speed\":3.0}\n"
                + "{\"type\":\"yaw_rate\",\"t\":" + old + ",\"rate\":0.01}\n";
        JsonNode reply = LiveServer.json(server.post("/v1/vehicles/late/samples", "application/x-ndjson", late));
        assertThat(reply.get("accepted").asInt()).isZero();
        assertThat(reply.get("rejected_count").asInt()).isEqualTo(2);
        assertThat(vehicle("late").get("stale").asBoolean()).isTrue();
        server.delete("/v1/vehicles/late");
    }

    /**
     * The stream says so when the vehicle turns stale, with no new pose to carry it: the last pose again,
     * same id, {@code stale} true; and a new pose after new samples is fresh again.
     */
    @Test
    void theStreamSendsTheLastPoseAgainWhenTheVehicleTurnsStale() throws Exception {
        server.postNdjson("streamer", Drives.ndjson(samples.subList(0, 300)));
        try (SseClientLines sse = new SseClientLines(server, "/v1/vehicles/streamer/stream")) {
            Map<String, String> first = sse.nextEvent();
            JsonNode p = LiveServer.JSON.readTree(first.get("data"));
            assertThat(p.get("stale").asBoolean()).isFalse();
            clock.advanceS(STALE_AFTER_S + 1.0);
            Map<String, String> staleEvent = sse.nextEvent();
            JsonNode q = LiveServer.JSON.readTree(staleEvent.get("data"));
            assertThat(q.get("stale").asBoolean()).isTrue();
            assertThat(q.get("t").asDouble()).isEqualTo(p.get("t").asDouble());
            assertThat(staleEvent.get("id")).isEqualTo(first.get("id"));
            assertThat(q.get("state").asText()).isEqualTo(p.get("state").asText());

            server.postNdjson("streamer", Drives.ndjson(samples.subList(300, 450)));
            // The staleness check may say "fresh" with the last pose again just before the new poses come.
            JsonNode r;
            do {
                r = LiveServer.JSON.readTree(sse.nextEvent().get("data"));
                assertThat(r.get("stale").asBoolean()).isFalse();
            } while (r.get("t").asDouble() == p.get("t").asDouble());
            assertThat(r.get("t").asDouble()).isGreaterThan(p.get("t").asDouble());
        }
        server.delete("/v1/vehicles/streamer");
    }

    private static JsonNode vehicle(String id) {
        for (JsonNode v : LiveServer.json(server.get("/v1/vehicles")).get("vehicles")) {
            if (v.get("vehicle").asText().equals(id)) {
                return v;
            }
        }
        throw new AssertionError("vehicle " + id + " is not listed");
    }
}
