package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.ByteArrayInputStream;
import java.io.FilterInputStream;
import java.io.IOException;
import java.io.InputStream;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Optional;
import java.util.concurrent.CompletableFuture;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.Sample;
import org.wayhold.session.SessionLog;
import org.wayhold.session.SessionRegistry;
import org.wayhold.settings.IngestSettings;
import org.wayhold.settings.Settings;

/**
 * The ingest reply: accepted and duplicate counts and every rejection with its line number and
 * reason, whether the line was malformed, invalid, or outside the session's time-ordering window. Line
 * numbers are checked by hand against the bodies below (blank lines count, as in the reader).
 */
class SampleIngestTest {

    private static LiveServer server;

    @BeforeAll
    static void start() {
        server = new LiveServer(LiveServer.settings(s -> s));
    }

    @AfterAll
    static void stop() {
        server.close();
    }

    /** A record that becomes durable only when someone waits for it: the journal's write takes as long as that. */
    private static final class DurableWhenAwaited extends CompletableFuture<Long> {
        private final long seq;

        DurableWhenAwaited(long seq) {
            this.seq = seq;
        }

        @Override
        public Long get() throws InterruptedException, java.util.concurrent.ExecutionException {
            complete(seq);
            return super.get();
        }
    }

    /**
     * Rule: a chunk waiting for the journal holds its samples, so a long body must not run ahead of the
     * journal by more than {@link SampleIngest#CHUNKS_IN_FLIGHT} chunks; memory then stays bounded
     * whatever the body's size, and the reply still counts every sample. Records here become durable
     * only when the ingest waits for them, so the count of records still waiting when the body's end is
     * read is exactly how far the ingest ran ahead (exact: counting, no timing).
     */
    @Test
    void aLongBodyRunsAheadOfTheJournalByAFewChunksOnly() throws IOException {
        List<DurableWhenAwaited> records = new ArrayList<>();
        SessionLog log = new SessionLog() {
            @Override
            public synchronized CompletableFuture<Long> batch(String vehicleId, List<? extends Sample> samples) {
                DurableWhenAwaited r = new DurableWhenAwaited(records.size());
                records.add(r);
                return r;
            }

            @Override
            public CompletableFuture<Long> delete(String vehicleId) {
                return SessionLog.DONE;
            }
        };
        Settings settings = LiveServer.settings(s -> s);
        SessionRegistry sessions = new SessionRegistry(settings, null, log);
        int chunks = SampleIngest.CHUNKS_IN_FLIGHT + 6;
        int samples = chunks * SampleIngest.CHUNK_SAMPLES;
        StringBuilder body = new StringBuilder();
        for (int i = 0; i < samples; i++) {
            body.append(String.format(Locale.ROOT, "{\"type\":\"wheel_speed\",\"t\":%.2f,\"speed\":3.0}\n",
                    1_800_000_000.0 + 0.01 * i));
        }
        long[] waitingAtEnd = {-1};
        InputStream in = new FilterInputStream(new ByteArrayInputStream(body.toString().getBytes(StandardCharsets.UTF_8))) {
            @Override
            public int read(byte[] b, int off, int len) throws IOException {
                int n = super.read(b, off, len);
                if (n < 0 && waitingAtEnd[0] < 0) {
                    waitingAtEnd[0] = records.stream().filter(r -> !r.isDone()).count();
                }
                return n;
            }
        };
        PoseStreams streams = new PoseStreams(settings.server().sseKeepAliveS(), settings.server().maxStreams(),
                settings.outage().staleAfterS());
        try (ServiceMetrics metrics = new ServiceMetrics(sessions, streams, Optional.empty())) {
            SampleIngest ingest = new SampleIngest(sessions, metrics,
                    new IngestRate(settings.server().maxSamplesPerSecondPerVehicle(), settings.server().rateBurstS(),
                            System::nanoTime),
                    new UploadSlots(1), new IdempotentReplies(0, 1.0, 0, System::currentTimeMillis),
                    SampleIngest.ReplyLog.NONE, System::nanoTime, System::currentTimeMillis);
            SampleIngest.Outcome outcome = ingest.ingest(new SampleIngest.Post("long", SampleIngest.Format.NDJSON,
                    SampleIngest.Encoding.IDENTITY, -1, in, null));
            assertThat(new ObjectMapper().readTree(outcome.json()).get("accepted").asLong()).isEqualTo(samples);
        }
        // The streams' staleness checker is a thread of its own: stopped, so the test leaves none behind.
        streams.closeAll();
        assertThat(records).hasSize(chunks);
        assertThat(waitingAtEnd[0]).isBetween(1L, (long) SampleIngest.CHUNKS_IN_FLIGHT);
        assertThat(records).allMatch(CompletableFuture::isDone);
    }

    private static JsonNode post(String vehicle, String contentType, String body) {
        HttpResponse<String> r = server.post("/v1/vehicles/" + vehicle + "/samples", contentType, body);
        assertThat(r.statusCode()).as(r.body()).isEqualTo(200);
        assertThat(r.headers().firstValue("Content-Type").orElse("")).startsWith("application/json");
        return LiveServer.json(r);
    }

    @Test
    void badLinesAreRejectedWithTheirNumbersAndTheRestIsKept() {
        String body = """
                {"type":"wheel_speed","t":1800000000.00,"speed":3.0}

                {"type":"gnss","t":1800000000.10,"lat":91.0,"lon":10.0}
                this is not json
                {"type":"teleport","t":1800000000.20}
                {"type":"yaw_rate","t":1800000000.30,"rate":0.01}
                [1, 2]
                {"type":"wheel_speed","t":1800000000.40,"speed":3.1}
                """;
        JsonNode reply = post("lines", "application/x-ndjson", body);
        assertThat(reply.get("accepted").asLong()).isEqualTo(3);
        assertThat(reply.get("duplicates").asLong()).isZero();
        assertThat(reply.get("rejected_count").asLong()).isEqualTo(4);
        JsonNode rejected = reply.get("rejected");
        assertThat(rejected).hasSize(4);
        assertThat(rejected.get(0).get("line").asLong()).isEqualTo(3);
        assertThat(rejected.get(0).get("error").asText()).startsWith("lat:");
        assertThat(rejected.get(1).get("line").asLong()).isEqualTo(4);
        assertThat(rejected.get(1).get("error").asText()).startsWith("malformed JSON");
        assertThat(rejected.get(2).get("line").asLong()).isEqualTo(5);
        assertThat(rejected.get(2).get("error").asText()).startsWith("type:");
        assertThat(rejected.get(3).get("line").asLong()).isEqualTo(7);
        assertThat(rejected.get(3).get("error").asText()).startsWith("not a JSON object");
    }

    @Test
    void fieldsOfNoSampleTypeAreCountedWithTheirFirstNamesAndOnlyThen() {
        String body = """
                {"type":"wheel_speed","t":1800000000.00,"speed":3.0,"odo_ticks":120}
                {"type":"wheel_speed","t":1800000000.02,"speed":3.0}
                {"type":"yaw_rate","t":1800000000.01,"rate":0.01,"rate_dps":0.57,"odo_ticks":121}
                """;
        JsonNode reply = post("unknown-fields", "application/x-ndjson", body);
        assertThat(reply.get("accepted").asLong()).isEqualTo(3);
        assertThat(reply.get("unknown_fields").get("lines").asLong()).isEqualTo(2);
        assertThat(reply.get("unknown_fields").get("names").toString()).isEqualTo("[\"odo_ticks\",\"rate_dps\"]");
        assertThat(post("unknown-fields", "application/x-ndjson",
                "{\"type\":\"wheel_speed\",\"t\":1800000000.04,\"speed\":3.0}\n").has("unknown_fields")).isFalse();
    }

    @Test
    void samplesOutsideTheReorderWindowAreRejectedWithTheirLineNumbers() {
        double maxLagS = Settings.defaults().ordering().maxLagS();
        double maxJumpS = Settings.defaults().ordering().maxForwardJumpS();
        double t = 1_800_000_100.0;
        String first = String.format(java.util.Locale.ROOT, """
                {"type":"wheel_speed","t":%.2f,"speed":3.0}
                {"type":"wheel_speed","t":%.2f,"speed":3.0}
                """, t, t + 10.0);
        assertThat(post("order", "application/x-ndjson", first).get("accepted").asLong()).isEqualTo(2);
        // Line 3 is later than the window allows, line 5 too far ahead; 1, 4 (inside the window, so
        // re-filtered in order) and 6 are applied, and the blank line 2 still counts as a line.
        String second = String.format(java.util.Locale.ROOT, """
                {"type":"yaw_rate","t":%.2f,"rate":0.0}

                {"type":"yaw_rate","t":%.2f,"rate":0.0}
                {"type":"yaw_rate","t":%.2f,"rate":0.0}
                {"type":"yaw_rate","t":%.2f,"rate":0.0}
                {"type":"yaw_rate","t":%.2f,"rate":0.0}
                """, t + 10.5, t + 10.0 - maxLagS - 1.0, t + 10.0 - maxLagS / 2, t + 11.0 + maxJumpS + 1.0, t + 11.0);
        JsonNode reply = post("order", "application/x-ndjson", second);
        assertThat(reply.get("accepted").asLong()).isEqualTo(3);
        JsonNode rejected = reply.get("rejected");
        assertThat(rejected).hasSize(2);
        assertThat(rejected.get(0).get("line").asLong()).isEqualTo(3);
        assertThat(rejected.get(0).get("error").asText()).startsWith("t: late by");
        assertThat(rejected.get(1).get("line").asLong()).isEqualTo(5);
        assertThat(rejected.get(1).get("error").asText()).startsWith("t:").contains("ahead");
    }

    @Test
    void aWrongTimeInAVehiclesFirstPostIsRejectedAndCountedAsOffTimeline() {
        // Line 3 was stamped before the logger's clock was set (seconds since 1970 of a fresh boot).
        String body = """
                {"type":"yaw_rate","t":1800000000.00,"rate":0.0}
                {"type":"wheel_speed","t":1800000000.00,"speed":3.0}
                {"type":"yaw_rate","t":42.00,"rate":0.0}
                {"type":"yaw_rate","t":1800000000.01,"rate":0.0}
                """;
        JsonNode reply = post("clockless", "application/x-ndjson", body);
        assertThat(reply.get("accepted").asLong()).isEqualTo(3);
        JsonNode rejected = reply.get("rejected");
        assertThat(rejected).hasSize(1);
        assertThat(rejected.get(0).get("line").asLong()).isEqualTo(3);
        assertThat(rejected.get(0).get("error").asText()).startsWith("t:").contains("first samples");
        assertThat(server.get("/metrics").body())
                .contains("wayhold_samples_rejected_total{reason=\"off_timeline\",type=\"yaw_rate\"} 1.0");
        // The timeline is the correct one: the next second is accepted whole.
        String next = """
                {"type":"yaw_rate","t":1800000001.00,"rate":0.0}
                {"type":"wheel_speed","t":1800000001.00,"speed":3.0}
                """;
        assertThat(post("clockless", "application/x-ndjson", next).get("accepted").asLong()).isEqualTo(2);
    }

    @Test
    void lineNumbersStayRightAcrossReadBuffersAndSubmissionChunks() {
        // 12 000 lines of about 50 bytes: several 64 KiB read buffers and three submissions of 4096
        // samples. Every 7th line is blank. Line 11 001 is a yaw-rate sample from the drive's first
        // second, long behind the samples already submitted, so the session rejects it as late.
        StringBuilder body = new StringBuilder();
        double t0 = 1_800_000_500.0;
        int lateLine = 11_001;
        int sampleIndex = 0;
        for (int line = 1; line <= 12_000; line++) {
            if (line == lateLine) {
                body.append(String.format(java.util.Locale.ROOT, "{\"type\":\"yaw_rate\",\"t\":%.3f,\"rate\":0.0}%n",
                        t0 + 0.005));
            } else if (line % 7 == 0) {
                body.append("  \n");
            } else {
                body.append(String.format(java.util.Locale.ROOT, "{\"type\":\"wheel_speed\",\"t\":%.2f,\"speed\":5.0}%n",
                        t0 + 0.01 * sampleIndex++));
            }
        }
        JsonNode reply = post("long", "application/x-ndjson", body.toString());
        assertThat(reply.get("rejected_count").asLong()).as(reply.toString()).isEqualTo(1);
        assertThat(reply.get("rejected").get(0).get("line").asLong()).isEqualTo(lateLine);
        assertThat(reply.get("accepted").asLong()).isEqualTo(sampleIndex);
    }

    @Test
    void exactDuplicatesAreAcceptedAndCountedButIgnored() {
        byte[] body = Drives.ndjson(Drives.openSky(21L, 2.0));
        int n = Drives.openSky(21L, 2.0).size();
        JsonNode once = LiveServer.json(server.postNdjson("dup", body));
        assertThat(once.get("accepted").asLong()).isEqualTo(n);
        String pose = server.get("/v1/vehicles/dup/pose").body();
        JsonNode twice = LiveServer.json(server.postNdjson("dup", body));
        assertThat(twice.get("accepted").asLong()).isEqualTo(n);
        assertThat(twice.get("duplicates").asLong()).isEqualTo(n);
        assertThat(twice.get("rejected_count").asLong()).isZero();
        assertThat(server.get("/v1/vehicles/dup/pose").body()).isEqualTo(pose);
    }

    @Test
    void jsonBodiesTakeOneObjectOrAnArrayAndNumberRejectionsByElement() {
        JsonNode one = post("json", "application/json", "{\"type\":\"wheel_speed\",\"t\":1800000200.0,\"speed\":2.0}");
        assertThat(one.get("accepted").asLong()).isEqualTo(1);
        JsonNode array = post("json", "application/json; charset=utf-8", """
                [{"type":"wheel_speed","t":1800000200.1,"speed":2.0},
                 {"type":"wheel_speed","t":1800000200.2},
                 {"type":"yaw_rate","t":1800000200.3,"rate":0.1}]""");
        assertThat(array.get("accepted").asLong()).isEqualTo(2);
        assertThat(array.get("rejected").get(0).get("line").asLong()).isEqualTo(2);
        assertThat(array.get("rejected").get(0).get("error").asText()).startsWith("speed:");
    }

    @Test
    void aBodyWithNoValidSampleCreatesNoSession() {
        JsonNode reply = post("nothing", "application/x-ndjson", "garbage\n{\"type\":\"gnss\"}\n");
        assertThat(reply.get("accepted").asLong()).isZero();
        assertThat(reply.get("rejected_count").asLong()).isEqualTo(2);
        assertThat(server.get("/v1/vehicles/nothing/pose").statusCode()).isEqualTo(404);
    }

    @Test
    void atMostAThousandRejectionsAreListedAndAllAreCounted() {
        String body = "x\n".repeat(1500);
        JsonNode reply = post("flood", "application/x-ndjson", body);
        assertThat(reply.get("rejected")).hasSize(IngestSettings.defaults().maxListedRejections());
        assertThat(reply.get("rejected_count").asLong()).isEqualTo(1500);
        assertThat(reply.get("rejected").get(999).get("line").asLong()).isEqualTo(1000);
    }

    @Test
    void metricsCountSamplesByTypeAndRejectionsByReasonClass() {
        List<Sample> samples = Drives.openSky(22L, 1.0);
        server.postNdjson("metered", Drives.ndjson(samples));
        post("metered", "application/x-ndjson", "not json\n{\"type\":\"gnss\",\"t\":1,\"lat\":0}\n");
        String metrics = server.get("/metrics").body();
        assertThat(metrics).contains("wayhold_samples_accepted_total{type=\"wheel_speed\"}");
        assertThat(metrics).contains("wayhold_samples_accepted_total{type=\"gnss\"}");
        assertThat(metrics).contains("wayhold_samples_rejected_total{reason=\"malformed\",type=\"unknown\"}");
        assertThat(metrics).contains("wayhold_samples_rejected_total{reason=\"invalid\",type=\"unknown\"}");
        assertThat(metrics).contains("wayhold_sessions ");
        assertThat(metrics).contains("wayhold_outages_active ");
        assertThat(metrics).contains("wayhold_http_request_seconds_bucket{method=\"POST\",route=\"/v1/vehicles/{vehicle}/samples\"");
    }
}
