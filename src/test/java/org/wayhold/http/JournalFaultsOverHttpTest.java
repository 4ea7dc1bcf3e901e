package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;

import com.atlassian.oai.validator.OpenApiInteractionValidator;
import com.atlassian.oai.validator.model.Request;
import com.atlassian.oai.validator.model.SimpleResponse;
import com.fasterxml.jackson.databind.JsonNode;
import java.io.IOException;
import java.io.RandomAccessFile;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.ByteBuffer;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.wayhold.journal.Journal;
import org.wayhold.journal.SessionJournal;
import org.wayhold.sample.Sample;
import org.wayhold.settings.JournalSettings;
import org.wayhold.settings.Settings;
import org.wayhold.testing.FaultyFiles;
import org.wayhold.testing.JournalFixtures;
import org.wayhold.testing.SessionSurgery;

/**
 * What clients and probes see of journal faults, over HTTP, in process: a full disk, a quarantined
 * vehicle and a damaged journal. Replies are checked against openapi.yaml with swagger-request-validator
 * (an outside implementation); expected sessions are in-process sessions fed the acknowledged batches.
 */
class JournalFaultsOverHttpTest {

    private static final Settings SETTINGS = LiveServer.settings(s -> s);
    private static final List<List<Sample>> A = SessionSurgery.batches(101L, 1.0);
    private static final List<List<Sample>> B = SessionSurgery.batches(102L, 1.0);
    private static final OpenApiInteractionValidator SPEC = OpenApiInteractionValidator
            .createForInlineApiSpecification(readSpec()).build();

    @TempDir
    Path dir;

    private final HttpClient http = HttpClient.newHttpClient();

    private static String readSpec() {
        try {
            return Files.readString(Path.of("openapi.yaml"));
        } catch (IOException e) {
            throw new java.io.UncheckedIOException(e);
        }
    }

    private HttpResponse<String> send(HttpRequest.Builder b) throws IOException, InterruptedException {
        return http.send(b.timeout(Duration.ofSeconds(30)).build(), HttpResponse.BodyHandlers.ofString());
    }

    private HttpResponse<String> get(HttpService s, String path) throws IOException, InterruptedException {
        return send(HttpRequest.newBuilder(URI.create(s.baseUrl() + path)).GET());
    }

    private HttpResponse<String> post(HttpService s, String vehicle, List<Sample> batch)
            throws IOException, InterruptedException {
        return send(HttpRequest.newBuilder(URI.create(s.baseUrl() + "/v1/vehicles/" + vehicle + "/samples"))
                .header("Content-Type", "application/x-ndjson").POST(HttpRequest.BodyPublishers.ofByteArray(Drives.ndjson(batch))));
    }

    private HttpResponse<String> delete(HttpService s, String vehicle) throws IOException, InterruptedException {
        return send(HttpRequest.newBuilder(URI.create(s.baseUrl() + "/v1/vehicles/" + vehicle)).DELETE());
    }

    /** The reply matches openapi.yaml for that route and status. */
    private static void matchesSpec(String path, HttpResponse<String> r) {
        String type = r.headers().firstValue("Content-Type").orElse("application/json");
        var report = SPEC.validateResponse(path, Request.Method.GET.name().equals(r.request().method())
                        ? Request.Method.GET : Request.Method.valueOf(r.request().method()),
                SimpleResponse.Builder.status(r.statusCode()).withContentType(type).withBody(r.body()).build());
        assertThat(report.getMessages()).as(r.body()).isEmpty();
    }

    private static void awaitStatus(JournalFaultsOverHttpTest t, HttpService s, int status) throws Exception {
        for (int i = 0; i < 2000 && t.get(s, "/health").statusCode() != status; i++) {
            Thread.sleep(10);
        }
        assertThat(t.get(s, "/health").statusCode()).isEqualTo(status);
    }

    /**
     * Rules: while the journal cannot write, /health answers 503 (readiness) and /health/live 200
     * (liveness); batches are answered 503 and not applied; once the disk has room again the service
     * is ready again without a restart and takes batches.
     */
    @Test
    void aFullDiskMakesTheServiceNotReadyUntilItHasRoomAgain() throws Exception {
        FaultyFiles files = new FaultyFiles();
        try (SessionJournal j = SessionJournal.open(dir, SETTINGS, null, files)) {
            HttpService s = new HttpService(j).start();
            try {
                assertThat(post(s, "van-a", A.get(0)).statusCode()).isEqualTo(200);
                files.fail(FaultyFiles.Fault.DISK_FULL, name -> name.startsWith("segment-"));
                HttpResponse<String> refused = post(s, "van-a", A.get(1));
                assertThat(refused.statusCode()).isEqualTo(503);
                assertThat(LiveServer.JSON.readTree(refused.body()).path("type").asText())
                        .isEqualTo("urn:wayhold:problem:journal-unavailable");
                HttpResponse<String> health = get(s, "/health");
                assertThat(health.statusCode()).isEqualTo(503);
                JsonNode h = LiveServer.JSON.readTree(health.body());
                assertThat(h.path("ready").asBoolean()).isFalse();
                assertThat(h.path("status").asText()).isEqualTo("degraded");
                assertThat(h.path("problems").toString()).contains("journal_not_writable");
                matchesSpec("/health", health);
                HttpResponse<String> live = get(s, "/health/live");
                assertThat(live.statusCode()).isEqualTo(200);
                matchesSpec("/health/live", live);
                // The liveness (received_at, stale) follows the wall clock, not the samples.
                assertThat(LiveServer.withoutLiveness(get(s, "/v1/vehicles/van-a/pose").body()))
                        .as("the refused batch is not applied")
                        .isEqualTo(new String(PoseJson.toBytes(SessionSurgery.fed("van-a", SETTINGS, A, 1)
                                .latest().orElseThrow()), java.nio.charset.StandardCharsets.UTF_8));
                files.heal();
                awaitStatus(this, s, 200);
                HttpResponse<String> ready = get(s, "/health");
                assertThat(LiveServer.JSON.readTree(ready.body()).path("status").asText()).isEqualTo("ok");
                matchesSpec("/health", ready);
                assertThat(post(s, "van-a", A.get(1)).statusCode()).isEqualTo(200);
            } finally {
                s.stop();
            }
        }
    }

    /**
     * Rules: a vehicle whose session is quarantined gets a problem reply (503, vehicle-quarantined, with
     * the reason) on its routes while every other vehicle is served; /health says so; deleting it starts
     * it afresh. Here applying a batch throws: its restored state has a history ahead of its filter.
     */
    @Test
    void aQuarantinedVehicleGets503WhileTheOthersAreServed() throws Exception {
        int n = 30;
        try (Journal j = Journal.open(dir, SETTINGS.journal())) {
            j.recover(JournalFixtures.KEEP_NOTHING);
            j.writeSnapshot(0, List.of(
                    new Journal.SessionSnapshot("van-a", -1, SessionSurgery.historyAheadOfFilter("van-a", SETTINGS, A, n, n + 4)),
                    new Journal.SessionSnapshot("van-b", -1, SessionSurgery.state("van-b", SETTINGS, B, n))));
        }
        try (SessionJournal j = SessionJournal.open(dir, SETTINGS, null)) {
            HttpService s = new HttpService(j).start();
            try {
                assertThat(get(s, "/health").statusCode()).isEqualTo(200);
                HttpResponse<String> failed = post(s, "van-a", A.get(n));
                assertThat(failed.statusCode()).isEqualTo(503);
                JsonNode problem = LiveServer.JSON.readTree(failed.body());
                assertThat(problem.path("type").asText()).isEqualTo("urn:wayhold:problem:vehicle-quarantined");
                assertThat(problem.path("detail").asText()).contains("older than the newest held");
                HttpResponse<String> pose = get(s, "/v1/vehicles/van-a/pose");
                assertThat(pose.statusCode()).isEqualTo(503);
                matchesSpec("/v1/vehicles/van-a/pose", pose);
                assertThat(get(s, "/v1/vehicles/van-a/track").statusCode()).isEqualTo(503);
                assertThat(post(s, "van-a", A.get(n + 1)).statusCode()).isEqualTo(503);
                assertThat(post(s, "van-b", B.get(n)).statusCode()).isEqualTo(200);
                assertThat(get(s, "/v1/vehicles/van-b/pose").statusCode()).isEqualTo(200);
                HttpResponse<String> list = get(s, "/v1/vehicles");
                matchesSpec("/v1/vehicles", list);
                assertThat(LiveServer.JSON.readTree(list.body()).path("vehicles").get(0).path("quarantined").asText())
                        .contains("older than the newest held");
                HttpResponse<String> health = get(s, "/health");
                assertThat(health.statusCode()).as("degraded, but ready").isEqualTo(200);
                JsonNode h = LiveServer.JSON.readTree(health.body());
                assertThat(h.path("status").asText()).isEqualTo("degraded");
                assertThat(h.path("problems").toString()).contains("vehicles_quarantined");
                assertThat(h.path("quarantined").get(0).path("vehicle").asText()).isEqualTo("van-a");
                matchesSpec("/health", health);
                assertThat(delete(s, "van-a").statusCode()).isEqualTo(204);
                assertThat(post(s, "van-a", A.get(0)).statusCode()).isEqualTo(200);
                assertThat(get(s, "/v1/vehicles/van-a/pose").statusCode()).isEqualTo(200);
                assertThat(LiveServer.JSON.readTree(get(s, "/health").body()).path("status").asText()).isEqualTo("ok");
            } finally {
                s.stop();
            }
        }
    }

    /**
     * Rule: after a loss of acknowledged records, /health is not ok: it says degraded (still ready)
     * and lists the lost sequence numbers.
     */
    @Test
    void lostRecordsMakeTheHealthDegradedAndAreListed() throws Exception {
        JournalSettings small = new JournalSettings(true, 0.0, 4096, 3600.0, 1L << 30, 60.0);
        try (Journal j = Journal.open(dir, small)) {
            j.recover(JournalFixtures.KEEP_NOTHING);
            for (List<Sample> b : A) {
                Journal.await(j.append("van-a", b));
            }
        }
        Path second = JournalFixtures.segments(dir).get(1);
        ByteBuffer head = ByteBuffer.wrap(Files.readAllBytes(second));
        long seq = head.getLong(8);
        try (RandomAccessFile f = new RandomAccessFile(second.toFile(), "rw")) {
            f.seek(40);
            int b = f.read();
            f.seek(40);
            f.write(b ^ 0x21);
        }
        try (SessionJournal j = SessionJournal.open(dir, SETTINGS, null)) {
            HttpService s = new HttpService(j).start();
            try {
                HttpResponse<String> health = get(s, "/health");
                assertThat(health.statusCode()).isEqualTo(200);
                matchesSpec("/health", health);
                JsonNode h = LiveServer.JSON.readTree(health.body());
                assertThat(h.path("status").asText()).isEqualTo("degraded");
                assertThat(h.path("problems").toString()).contains("journal_records_lost");
                JsonNode lost = h.path("journal").path("recovery").path("lost");
                assertThat(lost).hasSize(1);
                assertThat(lost.get(0).path("from_seq").asLong()).isEqualTo(seq);
                assertThat(lost.get(0).path("to_seq").asLong()).isEqualTo(seq);
                assertThat(h.path("journal").path("recovery").path("records_replayed").asLong()).isEqualTo(A.size() - 1);
            } finally {
                s.stop();
            }
        }
    }
}
