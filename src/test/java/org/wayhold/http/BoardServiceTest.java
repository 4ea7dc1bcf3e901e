package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.BufferedReader;
import java.io.InputStreamReader;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
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

/**
 * The read service of the fleet mode without Kafka: a {@link PoseBoard} filled by hand with the poses a
 * {@link VehicleSession} gives for a seeded simulated drive (the expected values: the read side passes
 * the JSON through unchanged), served by {@link BoardService}.
 */
class BoardServiceTest {

    private static final ObjectMapper JSON = new ObjectMapper();
    private static final List<byte[]> POSES = new ArrayList<>();
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
        board = new PoseBoard(50);
        // bus-2 has the same poses, for the stream test, which adds one.
        for (byte[] p : POSES.subList(0, POSES.size() - 1)) {
            board.put("bus-1", p);
            board.put("bus-2", p);
        }
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
        assertThat(get("/v1/vehicles/bus-1/pose").body()).isEqualTo(text(newest));
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
        assertThat(get("/v1/vehicles/bus-1/track?format=geojson").statusCode()).isEqualTo(400);
    }

    @Test
    void theListSummarisesTheNewestPose() throws Exception {
        JsonNode list = JSON.readTree(get("/v1/vehicles").body()).get("vehicles");
        assertThat(list).hasSize(2);
        JsonNode v = list.get(0);
        JsonNode newest = JSON.readTree(POSES.get(POSES.size() - 2));
        assertThat(v.get("vehicle").asText()).isEqualTo("bus-1");
        assertThat(v.get("samples").isNull()).isTrue();
        assertThat(v.get("state").asText()).isEqualTo(newest.get("state").asText());
        assertThat(v.get("t").asDouble()).isEqualTo(newest.get("t").asDouble());
        assertThat(v.get("radius95").asDouble()).isEqualTo(newest.get("radius95").asDouble());
        assertThat(v.get("outage_active").asBoolean()).isEqualTo(newest.get("outage").get("active").asBoolean());
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
            assertThat(nextData(in)).isEqualTo(text(POSES.get(POSES.size() - 2)));
            byte[] last = POSES.get(POSES.size() - 1);
            long deadline = System.nanoTime() + Duration.ofSeconds(10).toNanos();
            // The listener is attached once the stream has started; put the pose once it is.
            while (service.streamsOpen() == 0 && System.nanoTime() < deadline) {
                Thread.sleep(10);
            }
            assertThat(board.put("bus-2", last)).isTrue();
            assertThat(nextData(in)).isEqualTo(text(last));
        }
    }

    @Test
    void writesAreRefusedWithoutAProducer() throws Exception {
        HttpResponse<String> post = http.send(HttpRequest.newBuilder(
                URI.create(service.baseUrl() + "/v1/vehicles/bus-1/samples")).header("Content-Type", "application/x-ndjson")
                .POST(HttpRequest.BodyPublishers.ofString("{}")).build(), HttpResponse.BodyHandlers.ofString());
        assertThat(post.statusCode()).isEqualTo(405);
        assertThat(JSON.readTree(post.body()).get("detail").asText()).contains("--to-kafka");
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
