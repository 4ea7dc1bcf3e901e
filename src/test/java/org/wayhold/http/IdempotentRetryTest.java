package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import java.io.InputStream;
import java.io.OutputStream;
import java.net.InetAddress;
import java.net.Socket;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.session.SessionStats;

/**
 * Retries are harmless and say so. The README promises that sending a batch again is safe; these
 * tests hold the service to it for a batch sent again long after it was acknowledged, when its samples
 * lie far behind the session's reorder window. Expected counts come from the posted batches themselves.
 */
class IdempotentRetryTest {

    private static LiveServer server;

    @BeforeAll
    static void start() {
        server = new LiveServer(LiveServer.settings(s -> s));
    }

    @AfterAll
    static void stop() {
        server.close();
    }

    private static HttpResponse<String> post(String vehicle, List<Sample> batch, String key) {
        HttpRequest.Builder b = server.request("/v1/vehicles/" + vehicle + "/samples")
                .header("Content-Type", "application/x-ndjson");
        if (key != null) {
            b.header("Idempotency-Key", key);
        }
        return server.send(b.POST(HttpRequest.BodyPublishers.ofByteArray(Drives.ndjson(batch))).build());
    }

    private static long applied(String vehicle) {
        SessionStats s = server.sessions.find(vehicle).orElseThrow().session().stats();
        return s.wheelSpeedApplied() + s.yawRateApplied() + s.gnssApplied() + s.referenceApplied();
    }

    /**
     * Rule: a post repeated with the same Idempotency-Key for the same vehicle gets the original reply,
     * byte for byte, marked {@code Idempotency-Replayed: true}, and applies nothing. Without this the
     * retry of a batch acknowledged 40 s earlier came back as thousands of "late by 40 s" rejections.
     */
    @Test
    void aRetryWithTheSameKeyGetsTheOriginalReplyMarkedAsAReplayAndAppliesNothing() {
        List<List<Sample>> batches = Drives.chunks(Drives.openSky(31L, 60.0), 20.0);
        HttpResponse<String> original = post("idem-1", batches.get(0), "3f1c-batch-0");
        assertThat(original.statusCode()).isEqualTo(200);
        assertThat(original.headers().firstValue("Idempotency-Replayed")).isEmpty();
        post("idem-1", batches.get(1), "3f1c-batch-1");
        post("idem-1", batches.get(2), "3f1c-batch-2");
        long before = applied("idem-1");

        HttpResponse<String> retry = post("idem-1", batches.get(0), "3f1c-batch-0");
        assertThat(retry.statusCode()).isEqualTo(200);
        assertThat(retry.headers().firstValue("Idempotency-Replayed")).contains("true");
        assertThat(retry.body()).isEqualTo(original.body());
        assertThat(LiveServer.json(retry).path("rejected_count").asLong()).isZero();
        assertThat(applied("idem-1")).isEqualTo(before);
        // The key belongs to its vehicle: another vehicle's post with it is a post of its own.
        HttpResponse<String> other = post("idem-2", batches.get(0), "3f1c-batch-0");
        assertThat(other.headers().firstValue("Idempotency-Replayed")).isEmpty();
        assertThat(LiveServer.json(other).path("accepted").asLong()).isEqualTo(batches.get(0).size());
    }

    /** Rule: a key sent again with another body is a client error (422), not a retry; nothing is applied. */
    @Test
    void theSameKeyWithAnotherBodyIsRefusedAndAppliesNothing() {
        List<List<Sample>> batches = Drives.chunks(Drives.openSky(32L, 20.0), 10.0);
        assertThat(post("idem-3", batches.get(0), "k-77").statusCode()).isEqualTo(200);
        long before = applied("idem-3");
        HttpResponse<String> r = post("idem-3", batches.get(1), "k-77");
        assertThat(r.statusCode()).isEqualTo(422);
        assertThat(LiveServer.json(r).path("field").asText()).isEqualTo("Idempotency-Key");
        assertThat(applied("idem-3")).isEqualTo(before);
        assertThat(post("idem-3", batches.get(0), "bad key with spaces").statusCode()).isEqualTo(400);
    }

    /**
     * Rule: without a key, a sample older than the reorder window that is identical to one already
     * applied counts as a duplicate wherever the session's records can tell: GNSS fixes still in the fix
     * log. Wheel-speed, yaw-rate and reference samples leave no such record and stay rejected as late,
     * which applies nothing either.
     */
    @Test
    void withoutAKeyFixesStillInTheFixLogAreCountedAsDuplicatesNotRejections() {
        List<List<Sample>> batches = Drives.chunks(Drives.openSky(33L, 60.0), 20.0);
        for (List<Sample> b : batches) {
            assertThat(post("idem-4", b, null).statusCode()).isEqualTo(200);
        }
        long before = applied("idem-4");
        List<Sample> old = batches.get(0);
        long fixes = old.stream().filter(s -> s instanceof GnssFix).count();
        JsonNode reply = LiveServer.json(post("idem-4", old, null));
        assertThat(fixes).isPositive();
        assertThat(reply.path("duplicates").asLong()).isEqualTo(fixes);
        assertThat(reply.path("accepted").asLong()).isEqualTo(fixes);
        assertThat(reply.path("rejected_count").asLong()).isEqualTo(old.size() - fixes);
        List<Long> expectedLines = new ArrayList<>();
        for (int i = 0; i < old.size(); i++) {
            if (!(old.get(i) instanceof GnssFix)) {
                expectedLines.add(i + 1L);
            }
        }
        List<Long> lines = new ArrayList<>();
        for (JsonNode e : reply.path("rejected")) {
            assertThat(e.path("code").asText()).isEqualTo("late");
            lines.add(e.path("line").asLong());
        }
        assertThat(lines).isEqualTo(expectedLines.subList(0, lines.size()));
        assertThat(applied("idem-4")).isEqualTo(before);
    }

    /**
     * Rule: a retry that races its original (the original is still being read) is told so with 409 and
     * applies nothing; the original completes normally.
     */
    @Test
    void aRetryRacingItsOriginalIsRefusedWith409() throws Exception {
        // Long enough that the first chunk of samples is applied from the first part of the body.
        byte[] body = Drives.ndjson(Drives.openSky(34L, 60.0));
        int firstPart = body.length * 3 / 4;
        String head = "POST /v1/vehicles/idem-5/samples HTTP/1.1\r\nHost: x\r\nContent-Type: application/x-ndjson\r\n"
                + "Idempotency-Key: race-1\r\nContent-Length: " + body.length + "\r\nConnection: close\r\n\r\n";
        try (Socket original = new Socket(InetAddress.getLoopbackAddress(), server.service.port())) {
            original.setSoTimeout(20_000);
            OutputStream out = original.getOutputStream();
            out.write(head.getBytes(StandardCharsets.US_ASCII));
            out.write(body, 0, firstPart);
            out.flush();
            awaitSession("idem-5");
            // The original has applied its first chunk, so it holds its key while it waits for the rest.
            HttpResponse<String> racing = server.send(server.request("/v1/vehicles/idem-5/samples")
                    .header("Content-Type", "application/x-ndjson").header("Idempotency-Key", "race-1")
                    .POST(HttpRequest.BodyPublishers.ofByteArray(body)).build());
            assertThat(racing.statusCode()).isEqualTo(409);
            assertThat(LiveServer.json(racing).path("field").asText()).isEqualTo("Idempotency-Key");
            out.write(body, firstPart, body.length - firstPart);
            out.flush();
            InputStream in = original.getInputStream();
            String reply = new String(in.readAllBytes(), StandardCharsets.UTF_8);
            assertThat(reply).startsWith("HTTP/1.1 200");
        }
        HttpResponse<String> after = server.send(server.request("/v1/vehicles/idem-5/samples")
                .header("Content-Type", "application/x-ndjson").header("Idempotency-Key", "race-1")
                .POST(HttpRequest.BodyPublishers.ofByteArray(body)).build());
        assertThat(after.headers().firstValue("Idempotency-Replayed")).contains("true");
    }

    private static void awaitSession(String vehicle) throws InterruptedException {
        long deadline = System.nanoTime() + 20_000_000_000L;
        while (server.sessions.find(vehicle).isEmpty()) {
            assertThat(System.nanoTime()).as("the original's first chunk applied").isLessThan(deadline);
            Thread.sleep(10);
        }
    }
}
