package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import java.io.ByteArrayInputStream;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.Sample;

/**
 * Every error kind answers RFC 9457 problem JSON: {@code application/problem+json} with type, title,
 * status (equal to the HTTP status), a detail that names the field at fault, and the request path as
 * instance; and never a stack trace. The server has a 4 KiB body limit, room for 3 sessions and one CORS
 * origin, so that each limit is easy to reach.
 */
class ProblemResponsesTest {

    private static final String ORIGIN = "https://dash.example";
    private static final int BODY_LIMIT = 4096;
    private static LiveServer server;
    private static final List<String> problemBodies = new ArrayList<>();

    @BeforeAll
    static void start() {
        server = new LiveServer(LiveServer.settings(s -> LiveServer.withLimits(s, BODY_LIMIT, 3, List.of(ORIGIN),
                s.sseKeepAliveS())));
        assertThat(server.postNdjson("car-1", Drives.ndjson(Drives.openSky(11L, 3.0).subList(0, 40))).statusCode())
                .isEqualTo(200);
    }

    @AfterAll
    static void stop() {
        server.close();
        // RFC 9457 bodies are for clients: no Java class names, no stack frames.
        for (String body : problemBodies) {
            assertThat(body).doesNotContain("Exception", "\tat ", ".java", "org.wayhold", "io.javalin");
        }
    }

    /** Checks the problem shape and returns its JSON. */
    private static JsonNode problem(HttpResponse<String> r, int status, String field) {
        problemBodies.add(r.body());
        assertThat(r.statusCode()).as(r.body()).isEqualTo(status);
        assertThat(r.headers().firstValue("Content-Type").orElse("")).startsWith("application/problem+json");
        JsonNode p = LiveServer.json(r);
        assertThat(p.get("status").asInt()).isEqualTo(status);
        assertThat(p.get("type").asText()).startsWith("urn:wayhold:problem:");
        assertThat(p.get("title").asText()).isNotBlank();
        assertThat(p.get("instance").asText()).isEqualTo(r.uri().getRawPath());
        if (field != null) {
            assertThat(p.get("field").asText()).isEqualTo(field);
            assertThat(p.get("detail").asText()).startsWith(field + ":");
        }
        return p;
    }

    @Test
    void aTimeThatIsNotANumberIs400NamingTheParameter() {
        JsonNode p = problem(server.get("/v1/vehicles/car-1/pose?at=soon"), 400, "at");
        assertThat(p.get("detail").asText()).contains("'soon'");
        problem(server.get("/v1/vehicles/car-1/pose?at=NaN"), 400, "at");
        problem(server.get("/v1/vehicles/car-1/track?from=yesterday"), 400, "from");
    }

    @Test
    void aWindowThatEndsBeforeItStartsIs400() {
        problem(server.get("/v1/vehicles/car-1/track?from=20&to=10"), 400, "to");
    }

    @Test
    void anUnknownEpsgCodeIs400NamingTheCode() {
        JsonNode p = problem(server.get("/v1/vehicles/car-1/track?crs=EPSG:99999"), 400, "crs");
        assertThat(p.get("detail").asText()).contains("EPSG:99999");
        // A geographic CRS is known but not projected: also refused, by code.
        assertThat(problem(server.get("/v1/vehicles/car-1/track?crs=EPSG:4326"), 400, "crs").get("detail").asText())
                .contains("EPSG:4326");
        problem(server.get("/v1/vehicles/car-1/track?crs=utm32"), 400, "crs");
    }

    @Test
    void anUnknownFormatIs400() {
        problem(server.get("/v1/vehicles/car-1/track?format=kml"), 400, "format");
    }

    @Test
    void aVehicleIdWithForbiddenCharactersIs400() {
        problem(server.get("/v1/vehicles/bad%20id/pose"), 400, "vehicle");
        problem(server.get("/v1/vehicles/" + "x".repeat(65) + "/pose"), 400, "vehicle");
    }

    @Test
    void anUnknownVehicleIs404OnEveryVehicleRoute() {
        problem(server.get("/v1/vehicles/ghost/pose"), 404, "vehicle");
        problem(server.get("/v1/vehicles/ghost/track"), 404, "vehicle");
        problem(server.send(server.request("/v1/vehicles/ghost/stream").header("Accept", "text/event-stream")
                .GET().build()), 404, "vehicle");
        problem(server.delete("/v1/vehicles/ghost"), 404, "vehicle");
    }

    /**
     * RFC 9110 sec. 12.5.1: an Accept that rules text/event-stream out (another type only, or a weight
     * of 0 on it that beats the wildcard by being more specific) is 406; wildcards and a missing Accept
     * are served (PoseStreamTest).
     */
    @Test
    void aStreamRequestWhoseAcceptRulesEventsOutIs406() {
        for (String accept : List.of("application/json", "text/event-stream;q=0, */*", "text/html, image/*")) {
            problem(server.send(server.request("/v1/vehicles/car-1/stream").header("Accept", accept).GET().build()),
                    406, "Accept");
        }
    }

    @Test
    void aTimeBeforeTheHistoryIs404() {
        problem(server.get("/v1/vehicles/car-1/pose?at=1000"), 404, "at");
    }

    /** RFC 9110 sec. 15.5.6: a 405 reply must carry Allow with the methods the resource answers. */
    @Test
    void anUnknownPathIs404AndAWrongMethodIs405WithAllow() {
        problem(server.get("/v2/nothing"), 404, "path");
        HttpResponse<String> health = server.send(server.request("/health").DELETE().build());
        problem(health, 405, "method");
        assertThat(health.headers().firstValue("Allow")).contains("GET, HEAD");
        HttpResponse<String> list = server.send(server.request("/v1/vehicles").POST(HttpRequest.BodyPublishers.noBody())
                .build());
        problem(list, 405, "method");
        assertThat(list.headers().firstValue("Allow")).contains("GET, HEAD");
        HttpResponse<String> vehicle = server.send(server.request("/v1/vehicles/car-1").PUT(
                HttpRequest.BodyPublishers.noBody()).build());
        problem(vehicle, 405, "method");
        assertThat(vehicle.headers().firstValue("Allow")).contains("DELETE");
        HttpResponse<String> samples = server.send(server.request("/v1/vehicles/car-1/samples").GET().build());
        problem(samples, 405, "method");
        assertThat(samples.headers().firstValue("Allow")).contains("POST");
        // Every method Allow names is answered (not 405): HEAD included.
        assertThat(server.send(server.request("/health").method("HEAD", HttpRequest.BodyPublishers.noBody()).build())
                .statusCode()).isEqualTo(200);
    }

    @Test
    void aDeclaredLengthOverTheLimitIs413AndNothingIsRead() throws Exception {
        // Only the request head is sent, on a plain socket, declaring a body over twice the limit (up
        // to twice, a refusal reads the body to keep the connection; see ErrorMapping): the reply must
        // come without the body, so nothing was waited for or read. The service then closes the
        // connection (RFC 9110 sec. 15.5.14) and says so, so no client sends its next request on it.
        // (A client that sends the body anyway may lose this reply to the TCP reset that follows a
        // close with unread bytes, RFC 9112 sec. 9.6; "Expect: 100-continue" is the way to ask first.)
        int declared = ErrorMapping.DRAIN_FACTOR * BODY_LIMIT + 1;
        try (java.net.Socket socket = new java.net.Socket("127.0.0.1", server.service.port())) {
            socket.setSoTimeout(20_000);
            socket.getOutputStream().write(("POST /v1/vehicles/car-big/samples HTTP/1.1\r\nHost: 127.0.0.1\r\n"
                    + "Content-Type: application/x-ndjson\r\nContent-Length: " + declared + "\r\n\r\n")
                    .getBytes(java.nio.charset.StandardCharsets.US_ASCII));
            socket.getOutputStream().flush();
            String reply = new String(socket.getInputStream().readAllBytes(), java.nio.charset.StandardCharsets.UTF_8);
            assertThat(reply).startsWith("HTTP/1.1 413 ");
            String head = reply.substring(0, reply.indexOf("\r\n\r\n")).toLowerCase(java.util.Locale.ROOT);
            assertThat(head).contains("\r\nconnection: close").contains("content-type: application/problem+json");
            JsonNode p = LiveServer.JSON.readTree(reply.substring(reply.indexOf("\r\n\r\n") + 4));
            problemBodies.add(p.toString());
            assertThat(p.get("status").asInt()).isEqualTo(413);
            assertThat(p.get("field").asText()).isEqualTo("body");
            assertThat(p.get("detail").asText()).contains("Content-Length " + declared)
                    .contains(Integer.toString(BODY_LIMIT));
        }
        problem(server.get("/v1/vehicles/car-big/pose"), 404, "vehicle");
    }

    @Test
    void aBodyPostedToAnUnknownPathIsDroppedAndThe404Arrives() {
        // Unknown routes and wrong methods take the same care as other refusals: the body is read and
        // dropped, so the reply is not lost to a reset and the connection stays usable.
        byte[] body = new byte[BODY_LIMIT + BODY_LIMIT / 2];
        java.util.Arrays.fill(body, (byte) 'x');
        for (int i = 0; i < 20; i++) {
            HttpResponse<String> r = server.send(server.request(i % 2 == 0 ? "/v1/nowhere" : "/health")
                    .header("Content-Type", "application/x-ndjson")
                    .POST(HttpRequest.BodyPublishers.ofByteArray(body)).build());
            problem(r, i % 2 == 0 ? 404 : 405, i % 2 == 0 ? "path" : "method");
            assertThat(r.headers().firstValue("Connection")).isEmpty();
        }
    }

    @Test
    void aBodyALittleOverTheLimitGetsIts413OnAConnectionThatStaysUsable() {
        // Up to twice the limit the refused body is read and dropped, so a client that sends it whole
        // before reading (as the JDK client does) always gets the reply; repeated to catch a lost one.
        byte[] body = new byte[BODY_LIMIT + BODY_LIMIT / 2];
        java.util.Arrays.fill(body, (byte) 'x');
        for (int i = 0; i < 20; i++) {
            HttpResponse<String> r = server.send(server.request("/v1/vehicles/car-big/samples")
                    .header("Content-Type", "application/x-ndjson")
                    .POST(HttpRequest.BodyPublishers.ofByteArray(body)).build());
            problem(r, 413, "body");
            assertThat(r.headers().firstValue("Connection")).isEmpty();
        }
    }

    @Test
    void aChunkedBodyOverTheLimitIs413AndSaysWhatWasKept() {
        // Between the limit and twice it, so that the refusal reads the rest and the reply arrives.
        List<Sample> samples = Drives.openSky(12L, 10.0);
        int n = 1;
        while (Drives.ndjson(samples.subList(0, n)).length < BODY_LIMIT * 3 / 2) {
            n++;
        }
        byte[] body = Drives.ndjson(samples.subList(0, n));
        assertThat(body.length).isBetween(BODY_LIMIT + 1, 2 * BODY_LIMIT);
        // A body publisher from a stream has no length: the JDK client sends it chunked.
        HttpResponse<String> r = server.send(server.request("/v1/vehicles/car-chunked/samples")
                .header("Content-Type", "application/x-ndjson")
                .POST(HttpRequest.BodyPublishers.ofInputStream(() -> new ByteArrayInputStream(body))).build());
        JsonNode p = problem(r, 413, "body");
        assertThat(p.get("detail").asText()).contains("samples read before the limit were accepted");
    }

    @Test
    void aBodyThatIsNeitherNdjsonNorJsonIs415() {
        JsonNode p = problem(server.post("/v1/vehicles/car-1/samples", "text/csv", "t,lat,lon\n"), 415,
                "Content-Type");
        assertThat(p.get("detail").asText()).contains("text/csv");
        HttpResponse<String> none = server.send(server.request("/v1/vehicles/car-1/samples")
                .POST(HttpRequest.BodyPublishers.ofString("{}")).build());
        problem(none, 415, "Content-Type");
    }

    @Test
    void theSessionLimitIs503() {
        byte[] one = Drives.ndjson(Drives.openSky(13L, 1.0).subList(0, 5));
        int created = 1;
        HttpResponse<String> r = null;
        for (int i = 0; i < 5 && (r == null || r.statusCode() == 200); i++) {
            r = server.postNdjson("fill-" + i, one);
            created++;
        }
        assertThat(created).isLessThanOrEqualTo(5);
        JsonNode p = problem(r, 503, "vehicle");
        assertThat(p.get("detail").asText()).contains("max_sessions");
        // Free the room again so that the other tests of this class find the sessions they create.
        for (int i = 0; i < 5; i++) {
            server.delete("/v1/vehicles/fill-" + i);
        }
        assertThat(server.postNdjson("fill-again", one).statusCode()).isEqualTo(200);
        server.delete("/v1/vehicles/fill-again");
    }

    @Test
    void aCorsPreflightIsAnsweredWithoutAProblemBody() {
        HttpResponse<String> r = server.send(server.request("/v1/vehicles/car-1/samples")
                .method("OPTIONS", HttpRequest.BodyPublishers.noBody())
                .header("Origin", ORIGIN)
                .header("Access-Control-Request-Method", "POST")
                .header("Access-Control-Request-Headers", "content-type")
                .build());
        assertThat(r.statusCode()).as(r.body()).isBetween(200, 204);
        assertThat(r.headers().firstValue("Access-Control-Allow-Origin")).contains(ORIGIN);
        assertThat(r.headers().firstValue("Content-Type").orElse("")).doesNotContain("problem");
    }

    @Test
    void aDashboardOriginMayReadPosesAndTheirTags() {
        HttpResponse<String> r = server.send(server.request("/v1/vehicles/car-1/pose").header("Origin", ORIGIN)
                .GET().build());
        assertThat(r.statusCode()).isEqualTo(200);
        assertThat(r.headers().firstValue("Access-Control-Allow-Origin")).contains(ORIGIN);
        assertThat(r.headers().firstValue("Access-Control-Expose-Headers").orElse("")).containsIgnoringCase("ETag");
        HttpResponse<String> other = server.send(server.request("/v1/vehicles/car-1/pose")
                .header("Origin", "https://elsewhere.example").GET().build());
        assertThat(other.headers().firstValue("Access-Control-Allow-Origin")).isEmpty();
    }
}
