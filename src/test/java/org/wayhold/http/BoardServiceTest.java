package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;

import com.atlassian.oai.validator.OpenApiInteractionValidator;
import com.atlassian.oai.validator.model.Request;
import com.atlassian.oai.validator.model.SimpleResponse;
import com.atlassian.oai.validator.report.ValidationReport;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.BufferedReader;
import java.io.InputStreamReader;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.CompletableFuture;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.wayhold.pose.Pose;
import org.wayhold.session.VehicleSession;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulationSettings;
import org.wayhold.testing.MutableClock;

/**
 * The read service of the fleet mode without Kafka: a {@link PoseBoard} filled by hand with the poses a
 * {@link VehicleSession} gives for a seeded simulated drive (the expected values: the read side passes
 * the JSON through unchanged, adding the vehicle's liveness where the service adds it), served by
 * {@link BoardService}. Arrival times are those of a hand-moved test clock, or given with the pose.
 */
class BoardServiceTest {

    private static final ObjectMapper JSON = new ObjectMapper();
    private static final List<byte[]> POSES = new ArrayList<>();
    private static final long NOW_MS = 1_796_428_800_000L;
    private static final double STALE_AFTER_S = 10.0;
    private static final MutableClock CLOCK = new MutableClock(NOW_MS);
    private static final long STALE_SINCE_MS = NOW_MS - 10_500L;
    private static PoseBoard board;
    private static BoardService service;
    private static HttpClient http;

    @BeforeAll
    static void start() {
        Settings s = Settings.defaults();
        VehicleSession session = new VehicleSession("bus-1", s, null);
        session.addListener(p -> POSES.add(PoseJson.toBytes(p)));
        var drive = DriveSimulator.simulate(SimulationSettings.defaults().withDurationS(60), 4L).samples();
        for (int i = 0; i < drive.size(); i += 100) {
            session.submit(drive.subList(i, Math.min(drive.size(), i + 100)));
        }
        board = new PoseBoard(50, STALE_AFTER_S, CLOCK);
        // bus-2 has the same poses, for the stream test, which adds one.
        for (byte[] p : POSES.subList(0, POSES.size() - 1)) {
            board.put("bus-1", p);
            board.put("bus-2", p);
        }
        // bus-3's only pose came from samples that arrived 10.5 s before now (the record's timestamp),
        // against a stale time of 10 s.
        board.put("bus-3", POSES.get(5), STALE_SINCE_MS);
        service = new BoardService(s.server().withAddress(0, "127.0.0.1"), board, "test").start();
        http = HttpClient.newBuilder().connectTimeout(Duration.ofSeconds(5)).build();
    }

    @AfterAll
    static void stop() {
        service.close();
    }

    private static HttpResponse<String> get(String path) throws Exception {
        return http.send(HttpRequest.newBuilder(URI.create(service.baseUrl() + path)).GET().build(),
                HttpResponse.BodyHandlers.ofString(StandardCharsets.UTF_8));
    }

    private static String text(byte[] json) {
        return new String(json, StandardCharsets.UTF_8);
    }

    @Test
    void theNewestPoseAndThePoseAtATimeAreTheJsonAsItArrived() throws Exception {
        byte[] newest = POSES.get(POSES.size() - 2);
        HttpResponse<String> latest = get("/v1/vehicles/bus-1/pose");
        // The newest pose carries the liveness at its end, as the service writes it; nothing else changes.
        assertThat(LiveServer.withoutLiveness(latest.body())).isEqualTo(text(newest));
        assertThat(JSON.readTree(latest.body()).get("received_at").asDouble()).isEqualTo(NOW_MS / 1000.0);
        assertThat(JSON.readTree(latest.body()).get("stale").asBoolean()).isFalse();
        byte[] earlier = POSES.get(POSES.size() - 10);
        double t = PoseBoard.timeOf(earlier);
        assertThat(get("/v1/vehicles/bus-1/pose?at=" + (t + 1e-6)).body()).isEqualTo(text(earlier));
        // Only the newest 50 are kept: a time before them has no pose.
        double old = PoseBoard.timeOf(POSES.get(0));
        assertThat(get("/v1/vehicles/bus-1/pose?at=" + old).statusCode()).isEqualTo(404);
    }

    @Test
    void aTrackIsTheKeptPosesInTimeOrderAndAnOlderRepetitionIsDropped() throws Exception {
        assertThat(board.put("bus-1", POSES.get(3))).isFalse();
        JsonNode track = JSON.readTree(get("/v1/vehicles/bus-1/track").body());
        assertThat(track.get("count").asInt()).isEqualTo(50);
        List<Double> times = new ArrayList<>();
        track.get("poses").forEach(p -> times.add(p.get("t").asDouble()));
        assertThat(times).isSorted();
        // The whole history was asked for and older poses were let go: the reply says what is kept.
        assertThat(track.get("held_from").asDouble()).isEqualTo(times.get(0));
        assertThat(track.get("held_to").asDouble()).isEqualTo(times.get(times.size() - 1));
        assertThat(track.get("truncated").asBoolean()).isTrue();
        assertThat(get("/v1/vehicles/bus-1/track?format=geojson").statusCode()).isEqualTo(400);
    }

    @Test
    void theListSummarisesTheNewestPose() throws Exception {
        JsonNode list = JSON.readTree(get("/v1/vehicles").body()).get("vehicles");
        assertThat(list).hasSize(3);
        JsonNode v = list.get(0);
        JsonNode newest = JSON.readTree(POSES.get(POSES.size() - 2));
        assertThat(v.get("vehicle").asText()).isEqualTo("bus-1");
        assertThat(v.get("samples").isNull()).isTrue();
        // The poses carry no filter counts: present, and null.
        assertThat(v.has("filter_events")).isTrue();
        assertThat(v.get("filter_events").isNull()).isTrue();
        assertThat(v.get("state").asText()).isEqualTo(newest.get("state").asText());
        assertThat(v.get("t").asDouble()).isEqualTo(newest.get("t").asDouble());
        assertThat(v.get("radius95").asDouble()).isEqualTo(newest.get("radius95").asDouble());
        assertThat(v.get("outage_active").asBoolean()).isEqualTo(newest.get("outage").get("active").asBoolean());
        assertThat(v.get("received_at").asDouble()).isEqualTo(NOW_MS / 1000.0);
        assertThat(v.get("stale").asBoolean()).isFalse();
    }

    /**
     * The read service's list satisfies the full service's schema in openapi.yaml, null counts and all
     * (checked by swagger-request-validator, an outside OpenAPI 3.0 implementation); a count object
     * that leaves out a counter does not.
     */
    @Test
    void theListFollowsTheSpecOfTheFullService() throws Exception {
        OpenApiInteractionValidator validator = OpenApiInteractionValidator.createForInlineApiSpecification(
                Files.readString(Path.of("openapi.yaml"))).build();
        HttpResponse<String> list = get("/v1/vehicles");
        assertThat(validate(validator, list.body()).getMessages()).as(list.body()).isEmpty();
        String partial = list.body().replace("\"filter_events\":null", "\"filter_events\":{\"fixes_used\":3}");
        assertThat(partial).isNotEqualTo(list.body());
        assertThat(validate(validator, partial).hasErrors()).as("a count object without every counter").isTrue();
    }

    private static ValidationReport validate(OpenApiInteractionValidator validator, String body) {
        return validator.validateResponse("/v1/vehicles", Request.Method.GET, SimpleResponse.Builder.ok()
                .withContentType("application/json").withBody(body).build());
    }

    @Test
    void aVehicleWhoseNewestPoseCameFromSamplesLongAgoIsStaleAndItsTagSaysSo() throws Exception {
        long receivedMs = STALE_SINCE_MS;
        HttpResponse<String> r = get("/v1/vehicles/bus-3/pose");
        assertThat(JSON.readTree(r.body()).get("stale").asBoolean()).isTrue();
        assertThat(JSON.readTree(r.body()).get("received_at").asDouble()).isEqualTo(receivedMs / 1000.0);
        assertThat(r.headers().firstValue("ETag").orElseThrow()).endsWith("-stale\"");
        JsonNode listed = null;
        for (JsonNode v : JSON.readTree(get("/v1/vehicles").body()).get("vehicles")) {
            if (v.get("vehicle").asText().equals("bus-3")) {
                listed = v;
            }
        }
        assertThat(listed).isNotNull();
        assertThat(listed.get("stale").asBoolean()).isTrue();
    }

    @Test
    void aStreamStartsWithTheNewestPoseAndGivesEachNewOne() throws Exception {
        HttpRequest req = HttpRequest.newBuilder(URI.create(service.baseUrl() + "/v1/vehicles/bus-2/stream"))
                .header("Accept", "text/event-stream").GET().build();
        CompletableFuture<HttpResponse<java.io.InputStream>> response =
                http.sendAsync(req, HttpResponse.BodyHandlers.ofInputStream());
        HttpResponse<java.io.InputStream> r = response.get();
        assertThat(r.statusCode()).isEqualTo(200);
        try (BufferedReader in = new BufferedReader(new InputStreamReader(r.body(), StandardCharsets.UTF_8))) {
            assertThat(LiveServer.withoutLiveness(nextData(in))).isEqualTo(text(POSES.get(POSES.size() - 2)));
            byte[] last = POSES.get(POSES.size() - 1);
            long deadline = System.nanoTime() + Duration.ofSeconds(10).toNanos();
            // The listener is attached once the stream has started; put the pose once it is.
            while (service.streamsOpen() == 0 && System.nanoTime() < deadline) {
                Thread.sleep(10);
            }
            assertThat(board.put("bus-2", last)).isTrue();
            assertThat(LiveServer.withoutLiveness(nextData(in))).isEqualTo(text(last));
        }
    }

    @Test
    void aStreamResumedWithLastEventIdGivesTheKeptPosesAfterIt() throws Exception {
        // bus-1 keeps the newest 50 of POSES without the last one; resume after the fourth newest kept.
        List<byte[]> kept = POSES.subList(POSES.size() - 51, POSES.size() - 1);
        double afterT = PoseBoard.timeOf(kept.get(kept.size() - 4));
        HttpRequest req = HttpRequest.newBuilder(URI.create(service.baseUrl() + "/v1/vehicles/bus-1/stream"))
                .header("Accept", "text/event-stream")
                .header("Last-Event-ID", PoseJson.plain(afterT)).GET().build();
        HttpResponse<java.io.InputStream> r = http.sendAsync(req, HttpResponse.BodyHandlers.ofInputStream()).get();
        assertThat(r.statusCode()).isEqualTo(200);
        try (BufferedReader in = new BufferedReader(new InputStreamReader(r.body(), StandardCharsets.UTF_8))) {
            for (byte[] expected : kept.subList(kept.size() - 3, kept.size())) {
                String[] event = nextEvent(in);
                assertThat(event[0]).as("the id is the pose's time").isEqualTo(PoseJson.plain(PoseBoard.timeOf(expected)));
                assertThat(LiveServer.withoutLiveness(event[1])).isEqualTo(text(expected));
            }
        }
    }

    @Test
    void writesAreRefusedWithoutAProducer() throws Exception {
        HttpResponse<String> post = http.send(HttpRequest.newBuilder(
                URI.create(service.baseUrl() + "/v1/vehicles/bus-1/samples")).header("Content-Type", "application/x-ndjson")
                .POST(HttpRequest.BodyPublishers.ofString("{}")).build(), HttpResponse.BodyHandlers.ofString());
        assertThat(post.statusCode()).isEqualTo(405);
        // RFC 9110 sec. 15.5.6: the methods the resource does answer; none here without a producer.
        assertThat(post.headers().firstValue("Allow")).isPresent().hasValue("");
        assertThat(JSON.readTree(post.body()).get("detail").asText()).contains("--to-kafka");
    }

    /** The next event's id and data. */
    private static String[] nextEvent(BufferedReader in) throws Exception {
        String id = null;
        String line;
        while ((line = in.readLine()) != null) {
            if (line.startsWith("id:")) {
                id = line.substring(3).strip();
            } else if (line.startsWith("data:")) {
                return new String[] {id, line.substring(5).strip()};
            }
        }
        throw new AssertionError("the stream ended");
    }

    private static String nextData(BufferedReader in) throws Exception {
        String line;
        while ((line = in.readLine()) != null) {
            if (line.startsWith("data:")) {
                return line.substring(5).strip();
            }
        }
        throw new AssertionError("the stream ended");
    }
}
