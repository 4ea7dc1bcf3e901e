package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.InputStream;
import java.net.InetAddress;
import java.net.Socket;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.CyclicBarrier;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.Sample;
import org.wayhold.settings.ServerSettings;

/**
 * Faults at the HTTP edge, one rule per test, each stated beside it. The service under test has a small
 * body limit (256 KiB), one session, a CORS origin and four pose streams, so that every limit is within
 * reach; expected values are exact (counts of what was sent, statuses from RFC 9110).
 */
class EdgeFaultsTest {

    private static final int BODY_LIMIT = 256 * 1024;
    private static final int MAX_STREAMS = 4;
    private static final String DASHBOARD = "https://dash.example";
    private static LiveServer server;
    private static RawHttp raw;

    @BeforeAll
    static void start() {
        server = new LiveServer(LiveServer.settings(s -> {
            ServerSettings limited = LiveServer.withLimits(s, BODY_LIMIT, 1, List.of(DASHBOARD), s.sseKeepAliveS());
            return new ServerSettings(limited.port(), limited.bind(), limited.writeTokens(), limited.readTokens(),
                    limited.maxBodyBytes(), limited.maxLineBytes(), limited.maxSamplesPerRequest(), limited.maxSessions(),
                    limited.maxVehicleIdChars(), limited.maxSamplesPerSecondPerVehicle(), limited.rateBurstS(),
                    limited.corsOrigins(), limited.sseKeepAliveS(), limited.idleTimeoutS(), limited.minBodyBytesPerS(),
                    limited.drainTimeoutS(), limited.maxConcurrentUploads(), MAX_STREAMS);
        }));
        raw = new RawHttp(server.service.port());
    }

    @AfterAll
    static void stop() {
        server.close();
    }

    private static HttpResponse<String> post(String vehicle, byte[] body, String... headers) {
        HttpRequest.Builder b = server.request("/v1/vehicles/" + vehicle + "/samples")
                .header("Content-Type", "application/x-ndjson");
        for (int i = 0; i < headers.length; i += 2) {
            b.header(headers[i], headers[i + 1]);
        }
        return server.send(b.POST(HttpRequest.BodyPublishers.ofByteArray(body)).build());
    }

    private static void assertProblem(RawHttp.Reply r, int status) throws IOException {
        assertThat(r.status()).as(r.text()).isEqualTo(status);
        assertThat(r.header("content-type")).as(r.text()).startsWith("application/problem+json");
        JsonNode p = LiveServer.JSON.readTree(r.body());
        assertThat(p.get("status").asInt()).isEqualTo(status);
        assertThat(p.get("type").asText()).startsWith("urn:wayhold:problem:");
        assertThat(p.get("detail").asText()).isNotBlank();
    }

    /**
     * Rule: a vehicle refused at server.max_sessions leaves no rate-limit bucket behind; buckets exist
     * only for vehicles with a session, so their number stays bounded by max_sessions.
     */
    /** The one session the service may hold, present with a pose, whatever the tests before did. */
    private static void ensureEdgeCar() {
        if (server.sessions.find("edge-car").isEmpty()) {
            assertThat(server.postNdjson("edge-car", Drives.ndjson(Drives.openSky(61L, 5.0))).statusCode())
                    .isEqualTo(200);
        }
    }

    @Test
    void vehiclesRefusedAtTheSessionLimitLeaveNoRateBucket() {
        ensureEdgeCar();
        byte[] body = Drives.ndjson(Drives.openSky(62L, 1.0));
        for (int i = 0; i < 25; i++) {
            assertThat(post("refused-" + i, body).statusCode()).isEqualTo(503);
        }
        assertThat(server.service.rateBuckets()).isEqualTo(1);
    }

    /**
     * Rule: with server.cors_origins set, a request from a page of another origin is refused (403)
     * before anything is applied; listed origins and the service's own origin are served.
     */
    @Test
    void aPostFromADisallowedOriginIsRefusedBeforeAnySampleIsApplied() {
        server.delete("/v1/vehicles/edge-car");
        byte[] body = Drives.ndjson(Drives.openSky(63L, 1.0));
        HttpResponse<String> evil = post("edge-car", body, "Origin", "https://evil.example");
        assertThat(evil.statusCode()).isEqualTo(403);
        assertThat(evil.headers().firstValue("Content-Type").orElse("")).startsWith("application/problem+json");
        assertThat(server.sessions.find("edge-car")).as("nothing applied").isEmpty();
        assertThat(post("edge-car", body, "Origin", DASHBOARD).statusCode()).isEqualTo(200);
        assertThat(server.sessions.find("edge-car")).isPresent();
        assertThat(server.send(server.request("/health").header("Origin", "https://evil.example").GET().build())
                .statusCode()).isEqualTo(403);
    }

    /**
     * Rule: Content-Encoding gzip is decoded, with the size limit applied to the inflated bytes (a
     * small compressed body that inflates past the limit is 413, read no further); other codings are
     * 415 naming the coding the service takes.
     */
    @Test
    void gzipBodiesAreInflatedWithinTheLimitAndOtherCodingsAre415() {
        server.delete("/v1/vehicles/edge-car");
        List<Sample> samples = Drives.openSky(64L, 2.0);
        byte[] plain = Drives.ndjson(samples);
        HttpResponse<String> r = post("edge-car", HostileInputPropertyTest.gzip(plain), "Content-Encoding", "gzip");
        assertThat(r.statusCode()).as(r.body()).isEqualTo(200);
        assertThat(LiveServer.json(r).path("accepted").asLong()).isEqualTo(samples.size());
        assertThat(LiveServer.json(r).path("rejected_count").asLong()).isZero();

        byte[] bomb = HostileInputPropertyTest.gzip(new byte[8 * BODY_LIMIT]);
        assertThat(bomb.length).as("compressed far below the limit").isLessThan(BODY_LIMIT / 50);
        HttpResponse<String> big = post("edge-car", bomb, "Content-Encoding", "gzip");
        assertThat(big.statusCode()).isEqualTo(413);

        HttpResponse<String> broken = post("edge-car", "not gzip at all".getBytes(StandardCharsets.US_ASCII),
                "Content-Encoding", "gzip");
        assertThat(broken.statusCode()).isEqualTo(400);
        assertThat(LiveServer.json(broken).path("detail").asText()).contains("gzip");

        HttpResponse<String> brotli = post("edge-car", plain, "Content-Encoding", "br");
        assertThat(brotli.statusCode()).isEqualTo(415);
        assertThat(brotli.headers().firstValue("Accept-Encoding")).contains("gzip");
        assertThat(LiveServer.json(brotli).path("field").asText()).isEqualTo("Content-Encoding");
    }

    /**
     * Rule: errors Jetty answers before any route runs (a request line it cannot parse, a URI or header
     * block over its limits) are problem JSON like every other error, not HTML pages.
     */
    @Test
    void errorsRaisedBeforeRoutingAreProblemJson() throws IOException {
        assertProblem(raw.exchange("THIS IS NOT HTTP\r\n\r\n".getBytes(StandardCharsets.ISO_8859_1)), 400);
        assertProblem(raw.exchange(RawHttp.request("GET /" + "a".repeat(20_000) + " HTTP/1.1",
                List.of(RawHttp.header("Host", "x"), RawHttp.header("Connection", "close")), new byte[0])), 414);
        assertProblem(raw.exchange(RawHttp.request("GET /health HTTP/1.1", List.of(RawHttp.header("Host", "x"),
                RawHttp.header("X-Big", "b".repeat(20_000)), RawHttp.header("Connection", "close")), new byte[0])), 431);
    }

    /**
     * Rule: at most server.max_streams pose streams are open, also when many are asked for at the same
     * instant (the slot is taken before the stream starts, not counted after it has).
     */
    @Test
    void aBurstOfStreamRequestsNeverOpensMoreThanTheLimit() throws Exception {
        ensureEdgeCar();
        int clients = 48;
        CyclicBarrier barrier = new CyclicBarrier(clients);
        ExecutorService pool = Executors.newFixedThreadPool(clients);
        List<Socket> sockets = new ArrayList<>();
        try {
            List<Future<Integer>> statuses = new ArrayList<>();
            for (int i = 0; i < clients; i++) {
                Socket s = new Socket(InetAddress.getLoopbackAddress(), server.service.port());
                s.setSoTimeout(20_000);
                sockets.add(s);
                statuses.add(pool.submit(() -> {
                    barrier.await(20, TimeUnit.SECONDS);
                    s.getOutputStream().write(("GET /v1/vehicles/edge-car/stream HTTP/1.1\r\nHost: x\r\n"
                            + "Accept: text/event-stream\r\n\r\n").getBytes(StandardCharsets.US_ASCII));
                    s.getOutputStream().flush();
                    return statusOf(s.getInputStream());
                }));
            }
            int open = 0;
            for (Future<Integer> f : statuses) {
                int status = f.get(30, TimeUnit.SECONDS);
                assertThat(status).isIn(200, 503);
                open += status == 200 ? 1 : 0;
            }
            assertThat(open).isEqualTo(MAX_STREAMS);
            assertThat(LiveServer.json(server.get("/health")).path("streams").asInt()).isLessThanOrEqualTo(MAX_STREAMS);
        } finally {
            for (Socket s : sockets) {
                s.close();
            }
            pool.shutdownNow();
        }
    }

    private static int statusOf(InputStream in) throws IOException {
        ByteArrayOutputStream line = new ByteArrayOutputStream();
        int b;
        while ((b = in.read()) >= 0 && b != '\n') {
            line.write(b);
        }
        String text = line.toString(StandardCharsets.ISO_8859_1);
        return Integer.parseInt(text.substring(9, 12));
    }
}
