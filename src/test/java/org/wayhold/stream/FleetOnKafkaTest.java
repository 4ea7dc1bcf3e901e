package org.wayhold.stream;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

import com.atlassian.oai.validator.OpenApiInteractionValidator;
import com.atlassian.oai.validator.model.Request;
import com.atlassian.oai.validator.model.SimpleResponse;
import com.atlassian.oai.validator.report.ValidationReport;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
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
import java.util.Map;
import org.apache.kafka.clients.admin.Admin;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.wayhold.http.BoardService;
import org.wayhold.http.PoseBoard;
import org.wayhold.sample.Sample;
import org.wayhold.settings.Settings;
import org.wayhold.settings.WorkerSettings;
import org.wayhold.simulate.SimulationSettings;
import org.wayhold.testing.KafkaBroker;

/**
 * The fleet mode end to end on a real broker (KRaft, in this JVM, 127.0.0.1): records of samples in,
 * a worker, poses, events and dead letters out, and the read service answering from the poses topic.
 * Expected poses are the service's own for the same records ({@code VehicleSession}); the dead letter's
 * code is the contract's.
 */
class FleetOnKafkaTest {

    private static final ObjectMapper JSON = new ObjectMapper();
    private static KafkaBroker broker;

    @BeforeAll
    static void startBroker() throws Exception {
        KafkaBroker.logLevel("off");
        broker = KafkaBroker.start();
    }

    @AfterAll
    static void stopBroker() {
        if (broker != null) {
            broker.close();
        }
    }

    private static Settings settings(String name, boolean create) {
        Settings d = Settings.defaults();
        return d.withWorker(new WorkerSettings(name, name + ".samples", name + ".poses", name + ".events",
                name + ".rejected", 3, 1, create, 3600.0, 1, 0, 0.1, 6.0))
                .withServer(d.server().withAddress(0, "127.0.0.1"));
    }

    @Test
    void posesGoThroughTheWorkerToTheReadServiceAsTheServiceGivesThem() throws Exception {
        Settings settings = settings("roundtrip", true);
        WorkerSettings w = settings.worker();
        List<List<Fleet.Batch>> perVehicle = new ArrayList<>();
        for (int v = 0; v < 5; v++) {
            List<Sample> drive = Fleet.drive(SimulationSettings.defaults().withDurationS(60), 300 + v);
            perVehicle.add(Fleet.batches("van-" + v, drive, 1.0));
        }
        List<Fleet.Batch> records = new ArrayList<>(Fleet.interleave(perVehicle));
        // One record of van-0 again at the end: far older than ordering.max_lag_s, so refused as late.
        Fleet.Batch first = perVehicle.get(0).get(0);
        records.add(new Fleet.Batch("van-0", first.samples().subList(0, 1),
                Fleet.ndjson(first.samples().subList(0, 1))));
        Map<String, List<String>> expected = Fleet.servicePoses(settings, records);
        long expectedTotal = KafkaIo.total(expected);

        try (Worker worker = new Worker(settings, broker.bootstrap())) {
            assertThat(worker.start()).containsExactlyInAnyOrder(w.samplesTopic(), w.posesTopic(), w.eventsTopic(),
                    w.deadLetterTopic());
            assertThat(worker.awaitRunning(Duration.ofSeconds(60))).isTrue();
            long producedFromMs = System.currentTimeMillis();
            KafkaIo.produce(broker.bootstrap(), w.samplesTopic(), records);
            long producedToMs = System.currentTimeMillis();
            Map<String, List<String>> poses = KafkaIo.read(broker.bootstrap(), w.posesTopic(), Duration.ofSeconds(60),
                    Duration.ofSeconds(1), n -> n >= expectedTotal, r -> { });
            assertThat(poses).isEqualTo(expected);
            Map<String, List<String>> letters = KafkaIo.read(broker.bootstrap(), w.deadLetterTopic(),
                    Duration.ofSeconds(30), Duration.ZERO, n -> n >= 1, r -> { });
            JsonNode letter = JSON.readTree(letters.get("van-0").get(0));
            assertThat(letter.get("code").asText()).isEqualTo("late");

            PoseBoard board = new PoseBoard(settings.history().maxPoses(), settings.outage().staleAfterS(),
                    java.time.Clock.systemUTC());
            try (PoseTopicReader reader = new PoseTopicReader(broker.bootstrap(), w, board).start();
                 SampleProducer producer = new SampleProducer(broker.bootstrap(), w);
                 BoardService service = new BoardService(settings.server(), board, "test", producer).start()) {
                HttpClient http = HttpClient.newHttpClient();
                long deadline = System.nanoTime() + Duration.ofSeconds(30).toNanos();
                while (board.size() < 5 && System.nanoTime() < deadline) {
                    Thread.sleep(50);
                }
                JsonNode list = JSON.readTree(get(http, service.baseUrl() + "/v1/vehicles").body());
                assertThat(list.get("vehicles")).hasSize(5);
                String last = expected.get("van-3").get(expected.get("van-3").size() - 1);
                deadline = System.nanoTime() + Duration.ofSeconds(30).toNanos();
                HttpResponse<String> pose = get(http, service.baseUrl() + "/v1/vehicles/van-3/pose");
                while (!withoutLiveness(pose.body()).equals(last) && System.nanoTime() < deadline) {
                    Thread.sleep(50);
                    pose = get(http, service.baseUrl() + "/v1/vehicles/van-3/pose");
                }
                assertThat(pose.statusCode()).isEqualTo(200);
                assertThat(withoutLiveness(pose.body())).isEqualTo(last);
                // received_at is the samples record's timestamp, carried by the pose record: set while they
                // were produced above (producer's clock, ms).
                assertThat(Math.round(JSON.readTree(pose.body()).get("received_at").asDouble() * 1000.0))
                        .isBetween(producedFromMs, producedToMs);
                JsonNode summary = list.get("vehicles").get(3);
                assertThat(summary.get("vehicle").asText()).isEqualTo("van-3");
                assertThat(summary.get("state").asText()).isEqualTo(JSON.readTree(last).get("state").asText());
                JsonNode track = JSON.readTree(get(http, service.baseUrl() + "/v1/vehicles/van-3/track").body());
                assertThat(track.get("count").asInt())
                        .isEqualTo(Math.min(settings.history().maxPoses(), expected.get("van-3").size()));
                assertThat(get(http, service.baseUrl() + "/v1/vehicles/nobody/pose").statusCode()).isEqualTo(404);
                HttpResponse<String> delete = http.send(HttpRequest.newBuilder(
                        URI.create(service.baseUrl() + "/v1/vehicles/van-3")).DELETE().build(),
                        HttpResponse.BodyHandlers.ofString());
                assertThat(delete.statusCode()).isEqualTo(405);

                // HTTP ingest as a producer: a vehicle posted here reaches the worker and comes back as poses,
                // the same as the service gives for the same body.
                List<Sample> drive = Fleet.drive(SimulationSettings.defaults().withDurationS(60), 399);
                List<Sample> part = drive.subList(0, drive.size() / 2);
                long postedFromMs = System.currentTimeMillis();
                HttpResponse<String> post = http.send(HttpRequest.newBuilder(
                        URI.create(service.baseUrl() + "/v1/vehicles/posted-1/samples"))
                        .header("Content-Type", "application/x-ndjson")
                        .POST(HttpRequest.BodyPublishers.ofByteArray(Fleet.ndjson(part))).build(),
                        HttpResponse.BodyHandlers.ofString());
                long postedToMs = System.currentTimeMillis();
                assertThat(post.statusCode()).isEqualTo(202);
                JsonNode forwarded = JSON.readTree(post.body());
                assertThat(forwarded.get("topic").asText()).isEqualTo(w.samplesTopic());
                List<String> postedPoses = Fleet.servicePoses(settings,
                        List.of(new Fleet.Batch("posted-1", part, Fleet.ndjson(part)))).get("posted-1");
                // Under 512 KiB, the most the service puts in one record: the body is one record, one batch.
                assertThat(Fleet.ndjson(part).length).isLessThan(512 * 1024);
                assertThat(forwarded.get("records").asInt()).isEqualTo(1);
                String lastPosted = postedPoses.get(postedPoses.size() - 1);
                deadline = System.nanoTime() + Duration.ofSeconds(30).toNanos();
                HttpResponse<String> posted = get(http, service.baseUrl() + "/v1/vehicles/posted-1/pose");
                while (!withoutLiveness(posted.body()).equals(lastPosted) && System.nanoTime() < deadline) {
                    Thread.sleep(50);
                    posted = get(http, service.baseUrl() + "/v1/vehicles/posted-1/pose");
                }
                assertThat(withoutLiveness(posted.body())).isEqualTo(lastPosted);
                assertThat(Math.round(JSON.readTree(posted.body()).get("received_at").asDouble() * 1000.0))
                        .as("the posted body's arrival").isBetween(postedFromMs, postedToMs);

                // The replies follow openapi.yaml (the read service's list and health included).
                OpenApiInteractionValidator validator = OpenApiInteractionValidator.createForInlineApiSpecification(
                        Files.readString(Path.of("openapi.yaml"))).build();
                for (String path : List.of("/v1/vehicles", "/v1/vehicles/van-3/pose", "/v1/vehicles/van-3/track",
                        "/v1/vehicles/van-3/fixes", "/health", "/v1/vehicles/nobody/pose")) {
                    HttpResponse<String> r = get(http, service.baseUrl() + path);
                    SimpleResponse.Builder resp = SimpleResponse.Builder.status(r.statusCode());
                    r.headers().map().forEach(resp::withHeader);
                    resp.withBody(r.body());
                    ValidationReport report = validator.validateResponse(path, Request.Method.GET, resp.build());
                    assertThat(report.getMessages()).as(path)
                            .noneMatch(m -> m.getLevel() == ValidationReport.Level.ERROR);
                }
            }
        }
    }

    @Test
    void aWorkerThatMayNotCreateTopicsRefusesToStartAndNamesTheMissingOnes() throws Exception {
        Settings settings = settings("absent", false);
        try (Worker worker = new Worker(settings, broker.bootstrap())) {
            assertThatThrownBy(worker::start).isInstanceOf(WorkerTopics.Refused.class)
                    .hasMessage("worker: topics missing: absent.samples, absent.poses, absent.events, absent.rejected;"
                            + " create them (for example 3 partitions, replication factor 1) or set"
                            + " worker.create_topics: true");
        }
        java.util.Properties p = new java.util.Properties();
        p.put("bootstrap.servers", broker.bootstrap());
        try (Admin admin = Admin.create(p)) {
            assertThat(admin.listTopics().names().get()).noneMatch(t -> t.startsWith("absent"));
        }
    }

    /**
     * A latest pose's JSON without the liveness the read service adds ({@code received_at}, {@code stale},
     * at its end): the pose as the worker wrote it.
     */
    private static String withoutLiveness(String poseJson) {
        return poseJson.replaceFirst(",\"received_at\":[^,]*,\"stale\":(true|false)}$", "}");
    }

    private static HttpResponse<String> get(HttpClient http, String url) throws Exception {
        return http.send(HttpRequest.newBuilder(URI.create(url)).GET().build(),
                HttpResponse.BodyHandlers.ofString(StandardCharsets.UTF_8));
    }
}
