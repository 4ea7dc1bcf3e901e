package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;

import com.atlassian.oai.validator.OpenApiInteractionValidator;
import com.atlassian.oai.validator.model.Request;
import com.atlassian.oai.validator.model.SimpleResponse;
import com.atlassian.oai.validator.report.ValidationReport;
import com.fasterxml.jackson.databind.JsonNode;
import java.io.IOException;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.wayhold.journal.SessionJournal;
import org.wayhold.sample.Sample;
import org.wayhold.session.VehicleSession;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.SimulatedDrive;

/**
 * The service over a journal, in process: what it acknowledges comes back after a restart on the same
 * directory bit for bit (expected values: an in-process session fed the same batches, the same code),
 * deletions stay deleted, a journal that cannot write never yields a success, and the admin view in
 * {@code /health} matches openapi.yaml (checked by swagger-request-validator, an outside implementation).
 */
class JournaledServiceTest {

    private static final Settings SETTINGS = LiveServer.settings(s -> s);

    @TempDir
    Path dir;

    /** A service over the journal in {@link #dir}, with a plain JDK client. */
    private final class Served implements AutoCloseable {
        final SessionJournal journal;
        final LiveClient client;

        Served() throws IOException {
            journal = SessionJournal.open(dir, SETTINGS, null);
            client = new LiveClient(new HttpService(journal).start());
        }

        @Override
        public void close() throws IOException {
            client.service.stop();
            journal.close();
        }
    }

    /** The request helpers of {@link LiveServer} over a service started elsewhere. */
    private static final class LiveClient {
        final HttpService service;
        final java.net.http.HttpClient http = java.net.http.HttpClient.newHttpClient();

        LiveClient(HttpService service) {
            this.service = service;
        }

        HttpResponse<String> send(HttpRequest.Builder b) {
            try {
                return http.send(b.build(), HttpResponse.BodyHandlers.ofString());
            } catch (IOException e) {
                throw new java.io.UncheckedIOException(e);
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
                throw new IllegalStateException(e);
            }
        }

        HttpRequest.Builder request(String path) {
            return HttpRequest.newBuilder(java.net.URI.create(service.baseUrl() + path))
                    .timeout(java.time.Duration.ofSeconds(30));
        }

        HttpResponse<String> get(String path) {
            return send(request(path).GET());
        }

        HttpResponse<String> post(String vehicle, List<? extends Sample> samples) {
            return send(request("/v1/vehicles/" + vehicle + "/samples").header("Content-Type", "application/x-ndjson")
                    .POST(HttpRequest.BodyPublishers.ofByteArray(Drives.ndjson(samples))));
        }

        HttpResponse<String> postWithKey(String vehicle, List<? extends Sample> samples, String key) {
            return send(request("/v1/vehicles/" + vehicle + "/samples").header("Content-Type", "application/x-ndjson")
                    .header("Idempotency-Key", key).POST(HttpRequest.BodyPublishers.ofByteArray(Drives.ndjson(samples))));
        }

        HttpResponse<String> delete(String vehicle) {
            return send(request("/v1/vehicles/" + vehicle).DELETE());
        }
    }

    @Test
    void aRestartOnTheSameDirectoryRestoresEveryAcknowledgedSessionBitForBit() throws IOException {
        SimulatedDrive drive = Drives.withTunnel(41L, 90.0, 20.0, 60.0);
        List<List<Sample>> batches = Drives.chunks(drive.samples(), 5.0);
        VehicleSession expected = new VehicleSession("van-1", SETTINGS, null);
        String poseBefore;
        String trackBefore;
        try (Served s = new Served()) {
            for (List<Sample> b : batches) {
                assertThat(s.client.post("van-1", b).statusCode()).isEqualTo(200);
                expected.submit(b);
                assertThat(s.client.post("gone", b.subList(0, 1)).statusCode()).isEqualTo(200);
            }
            // Deleted, then started afresh by one more batch: the restart must see only the new session.
            assertThat(s.client.delete("gone").statusCode()).isEqualTo(204);
            assertThat(s.client.post("gone", batches.get(0)).statusCode()).isEqualTo(200);
            assertThat(s.client.post("temp", batches.get(0)).statusCode()).isEqualTo(200);
            assertThat(s.client.delete("temp").statusCode()).isEqualTo(204);
            poseBefore = LiveServer.withoutLiveness(s.client.get("/v1/vehicles/van-1/pose").body());
            trackBefore = s.client.get("/v1/vehicles/van-1/track").body();
        }
        try (Served s = new Served()) {
            JsonNode health = LiveServer.json(s.client.get("/health"));
            assertThat(health.path("journal").path("recovery").path("sessions_from_snapshot").asInt())
                    .as("the shutdown snapshot holds both live sessions").isEqualTo(2);
            assertThat(health.path("journal").path("recovery").path("records_replayed").asLong()).isZero();
            assertThat(LiveServer.withoutLiveness(s.client.get("/v1/vehicles/van-1/pose").body())).isEqualTo(poseBefore)
                    .isEqualTo(new String(PoseJson.toBytes(expected.latest().orElseThrow()),
                            java.nio.charset.StandardCharsets.UTF_8));
            assertThat(s.client.get("/v1/vehicles/van-1/track").body()).isEqualTo(trackBefore);
            assertThat(s.client.get("/v1/vehicles/temp/pose").statusCode()).isEqualTo(404);
            JsonNode list = LiveServer.json(s.client.get("/v1/vehicles"));
            assertThat(list.path("vehicles").findValuesAsText("vehicle")).containsExactly("gone", "van-1");
            assertThat(list.path("vehicles").get(0).path("samples").asLong())
                    .as("only the batch after the deletion").isEqualTo(batches.get(0).size());
            assertThat(list.path("vehicles").get(1).path("samples").asLong())
                    .isEqualTo(drive.samples().size());
        }
    }

    /**
     * /metrics carries the build, the JVM and the journal. Expected values: the build's own
     * {@link org.wayhold.BuildInfo}; the journal's segment files on disk (a fresh directory holds nothing
     * but what this process wrote, records laid end to end); two posts of one chunk each (two records).
     */
    @Test
    void metricsShowTheBuildTheJvmAndTheJournal() throws IOException {
        try (Served s = new Served()) {
            List<Sample> samples = Drives.openSky(8L, 3.0);
            assertThat(s.client.post("van-3", samples.subList(0, 40)).statusCode()).isEqualTo(200);
            assertThat(s.client.post("van-3", samples.subList(40, 80)).statusCode()).isEqualTo(200);
            String before = s.client.get("/metrics").body();
            assertThat(metric(before, "wayhold_journal_last_snapshot_age_seconds")).isNaN();
            s.journal.snapshot();
            String m = s.client.get("/metrics").body();
            org.wayhold.BuildInfo build = org.wayhold.BuildInfo.current();
            assertThat(m).contains("wayhold_build_info{commit=\"" + build.commit() + (build.dirty() ? "-dirty" : "")
                    + "\",version=\"" + build.version() + "\"} 1");
            long onDisk;
            try (var files = Files.list(dir)) {
                onDisk = files.filter(f -> f.getFileName().toString().endsWith(".wal")).mapToLong(f -> {
                    try {
                        return Files.size(f);
                    } catch (IOException e) {
                        throw new java.io.UncheckedIOException(e);
                    }
                }).sum();
            }
            assertThat(onDisk).isPositive();
            assertThat(metric(m, "wayhold_journal_written_bytes_total")).isEqualTo(onDisk);
            assertThat(metric(m, "wayhold_journal_records_written_total")).isEqualTo(2.0);
            assertThat(metric(m, "wayhold_journal_snapshots_total")).isEqualTo(1.0);
            assertThat(metric(m, "wayhold_journal_snapshot_failures_total")).isZero();
            assertThat(metric(m, "wayhold_journal_write_failed")).isZero();
            assertThat(metric(m, "wayhold_journal_last_snapshot_age_seconds")).isBetween(0.0, 60.0);
            assertThat(m).contains("jvm_memory_used_bytes{", "jvm_threads_live_threads ", "jvm_info{",
                    "process_uptime_seconds ", "process_cpu_usage ", "jvm_classes_loaded_classes ");
        }
    }

    /** The value of an unlabelled sample in Prometheus text exposition. */
    private static double metric(String exposition, String name) {
        for (String line : exposition.split("\n")) {
            if (line.startsWith(name + " ")) {
                return Double.parseDouble(line.substring(name.length() + 1).trim());
            }
        }
        throw new AssertionError(name + " not in /metrics");
    }

    /**
     * Rule: a kept reply is in the journal before it is sent, so a retry with the same Idempotency-Key
     * after a restart (a crash, say, that lost the reply on its way) still gets the original reply,
     * marked as a replay, and applies nothing; a deletion of the vehicle voids its kept replies, before
     * and after a restart.
     */
    @Test
    void aKeptReplySurvivesARestartAndADeletionVoidsIt() throws IOException {
        List<List<Sample>> batches = Drives.chunks(Drives.openSky(12L, 30.0), 10.0);
        String first;
        try (Served s = new Served()) {
            HttpResponse<String> r = s.client.postWithKey("van-5", batches.get(0), "batch-0");
            assertThat(r.statusCode()).isEqualTo(200);
            first = r.body();
            assertThat(s.client.postWithKey("van-5", batches.get(1), "batch-1").statusCode()).isEqualTo(200);
            assertThat(s.client.postWithKey("van-6", batches.get(0), "batch-0").statusCode()).isEqualTo(200);
            assertThat(s.client.delete("van-6").statusCode()).isEqualTo(204);
        }
        try (Served s = new Served()) {
            long samples = LiveServer.json(s.client.get("/v1/vehicles")).path("vehicles").get(0).path("samples").asLong();
            HttpResponse<String> again = s.client.postWithKey("van-5", batches.get(0), "batch-0");
            assertThat(again.statusCode()).isEqualTo(200);
            assertThat(again.headers().firstValue("Idempotency-Replayed")).contains("true");
            assertThat(again.body()).isEqualTo(first);
            assertThat(LiveServer.json(s.client.get("/v1/vehicles")).path("vehicles").get(0).path("samples").asLong())
                    .isEqualTo(samples);
            // van-6 was deleted after its post: its key starts afresh on its new session.
            HttpResponse<String> fresh = s.client.postWithKey("van-6", batches.get(0), "batch-0");
            assertThat(fresh.headers().firstValue("Idempotency-Replayed")).isEmpty();
            assertThat(LiveServer.json(fresh).path("accepted").asLong()).isEqualTo(batches.get(0).size());
        }
        // A snapshot between the post and the restart (the graceful stop above wrote one) changes nothing.
        try (Served s = new Served()) {
            assertThat(s.client.postWithKey("van-5", batches.get(0), "batch-0").body()).isEqualTo(first);
        }
    }

    @Test
    void aJournalThatCannotWriteAnswers503AndNeverASuccess() throws IOException {
        try (Served s = new Served()) {
            List<Sample> samples = Drives.openSky(7L, 3.0);
            assertThat(s.client.post("van-2", samples.subList(0, 50)).statusCode()).isEqualTo(200);
            // Closing the journal under the running service: every later append fails as a full disk would.
            s.journal.close();
            HttpResponse<String> r = s.client.post("van-2", samples.subList(50, 100));
            assertThat(r.statusCode()).isEqualTo(503);
            assertThat(r.headers().firstValue("Content-Type").orElse("")).startsWith("application/problem+json");
            assertThat(LiveServer.json(r).path("type").asText()).isEqualTo("urn:wayhold:problem:journal-unavailable");
            assertThat(s.client.delete("van-2").statusCode()).isEqualTo(503);
            JsonNode health = LiveServer.json(s.client.get("/health"));
            assertThat(health.path("status").asText()).isEqualTo("degraded");
            assertThat(health.path("journal").path("writable").asBoolean()).isFalse();
        }
    }

    @Test
    void theHealthViewOfTheJournalMatchesTheSpec() throws IOException {
        OpenApiInteractionValidator validator = OpenApiInteractionValidator
                .createForInlineApiSpecification(Files.readString(Path.of("openapi.yaml"))).build();
        try (Served s = new Served()) {
            s.client.post("van-3", Drives.openSky(9L, 2.0));
            s.journal.snapshot();
            HttpResponse<String> health = s.client.get("/health");
            JsonNode j = LiveServer.json(health).path("journal");
            assertThat(j.path("snapshots_written").asLong()).isEqualTo(1);
            assertThat(j.path("next_seq").asLong()).isEqualTo(1);
            ValidationReport report = validator.validateResponse("/health", Request.Method.GET,
                    SimpleResponse.Builder.ok().withContentType("application/json").withBody(health.body()).build());
            assertThat(report.getMessages()).as(health.body()).isEmpty();
            String doctored = health.body().replace("\"bytes_cut\"", "\"bytes_lost\"");
            assertThat(validator.validateResponse("/health", Request.Method.GET, SimpleResponse.Builder.ok()
                    .withContentType("application/json").withBody(doctored).build()).hasErrors())
                    .as("a renamed field must be caught").isTrue();
        }
    }
}
