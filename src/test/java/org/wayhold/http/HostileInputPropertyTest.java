package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.PrintStream;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.TreeMap;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.atomic.AtomicLong;
import java.util.zip.GZIPOutputStream;
import java.util.function.Consumer;
import java.util.function.Function;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.wayhold.session.SessionStats;
import org.wayhold.settings.ServerSettings;

/**
 * Hostile input, generated (property-based, each property a seeded stream of inputs checked one by one):
 * over 10,000 requests with malformed bodies, headers and query values
 * go to a real service on loopback. Whatever a client sends, the service answers with a status below
 * 500, logs nothing (the service and Jetty log output is captured for the whole class and must stay
 * empty: no stack trace, no warning), still answers {@code /health}, and in a batch that mixes valid
 * and malformed lines keeps every valid sample and rejects exactly the malformed lines (README.md,
 * "Sample format": "A bad line is rejected with its 1-based line number and a reason naming the field;
 * the valid lines of the same input are kept").
 *
 * <p>The server has write and read tokens, a 256 KiB body limit, 1 KiB lines and 2000 samples per
 * request, so that every limit is within reach of generated input. The count of
 * requests per property and their statuses are written to {@code target/hostile-inputs.txt}.
 */
class HostileInputPropertyTest {

    static final String WRITE_TOKEN = "fuzz-write-0123456789abcdef";
    static final String READ_TOKEN = "fuzz-read-0123456789abcdef";
    static final int MAX_LINE = 1024;
    static final int MAX_BODY = 256 * 1024;
    static final int MAX_SAMPLES = 2000;
    /** Base seed; each property draws from its own stream, {@code SEED + property number}. */
    static final long SEED = 424242L;

    private static LiveServer server;
    private static RawHttp http;
    private static PrintStream savedErr;
    private static PrintStream savedOut;
    private static final ByteArrayOutputStream LOG = new ByteArrayOutputStream();
    private static final Map<String, TreeMap<Integer, Integer>> OUTCOMES = new ConcurrentHashMap<>();
    private static final AtomicLong MIXED_VEHICLES = new AtomicLong();
    private static final AtomicLong MALFORMED_LINES = new AtomicLong();
    private static final AtomicLong VALID_LINES = new AtomicLong();

    @BeforeAll
    static void start() {
        savedErr = System.err;
        savedOut = System.out;
        PrintStream capture = new PrintStream(new SynchronizedSink(), true, StandardCharsets.UTF_8);
        System.setErr(capture);
        System.setOut(capture);
        server = new LiveServer(LiveServer.settings(s -> new ServerSettings(0, "127.0.0.1", List.of(WRITE_TOKEN),
                List.of(READ_TOKEN), MAX_BODY, MAX_LINE, MAX_SAMPLES, 200, 64, s.maxSamplesPerSecondPerVehicle(),
                s.rateBurstS(), List.of("https://dash.example"), s.sseKeepAliveS(), s.idleTimeoutS(), s.minBodyBytesPerS(), s.drainTimeoutS(), s.maxConcurrentUploads(), s.maxStreams())));
        http = new RawHttp(server.service.port());
        // A vehicle with a history for the query properties.
        for (var chunk : Drives.chunks(Drives.openSky(5L, 20.0), 5.0)) {
            RawHttp.Reply r = post("q-car", "application/x-ndjson", Drives.ndjson(chunk), true);
            assertThat(r.status()).as(r.text()).isEqualTo(200);
        }
        String startup = logText();
        assertThat(startup).doesNotContain("Exception", "ERROR", "WARN");
        synchronized (LOG) {
            LOG.reset();
        }
    }

    @AfterAll
    static void stop() throws IOException {
        try {
            server.close();
        } finally {
            System.setErr(savedErr);
            System.setOut(savedOut);
        }
        StringBuilder sb = new StringBuilder("# Requests per property and their statuses (HostileInputPropertyTest, seed "
                + SEED + ")\n");
        long total = 0;
        for (var e : new TreeMap<>(OUTCOMES).entrySet()) {
            long n = e.getValue().values().stream().mapToLong(Integer::longValue).sum();
            total += n;
            sb.append(e.getKey()).append(": ").append(n).append(" requests, statuses ").append(e.getValue()).append('\n');
        }
        sb.append("total: ").append(total).append(" requests; mixed batches held ").append(VALID_LINES.get())
                .append(" valid and ").append(MALFORMED_LINES.get()).append(" malformed lines\n");
        long serverErrors = OUTCOMES.values().stream().flatMap(m -> m.entrySet().stream())
                .filter(e -> e.getKey() >= 500).mapToLong(e -> e.getValue()).sum();
        sb.append("extreme values: ").append(EXTREME_VALUES.get()).append(" values over ")
                .append(ExtremeValues.PAIRS).append(" (type, field) pairs, each tried at least ")
                .append(java.util.Arrays.stream(EXTREME_PAIRS).min().orElse(0)).append(" times; responses with status 5xx")
                .append(" in the whole run: ").append(serverErrors).append('\n');
        Path target = Path.of("target");
        Files.createDirectories(target);
        Files.writeString(target.resolve("hostile-inputs.txt"), sb.toString());
    }

    /** After each property: the service still answers /health and has logged nothing. */
    @AfterEach
    void stillHealthyAndSilent() {
        RawHttp.Reply health = http.exchange(RawHttp.request("GET /health HTTP/1.1",
                List.of(RawHttp.header("Host", "x"), RawHttp.header("Connection", "close")), new byte[0]));
        assertThat(health.status()).isEqualTo(200);
        assertThat(health.text()).contains("\"status\":\"ok\"");
        assertSilent("after the property");
    }

    // ---------------------------------------------------------------------------------------------
    // 1. Mixed batches: every valid sample kept, exactly the malformed lines rejected.

    record MixedBatch(List<HostileLines.Line> lines, String eol, boolean finalEol) {
        byte[] body() {
            ByteArrayOutputStream out = new ByteArrayOutputStream();
            for (int i = 0; i < lines.size(); i++) {
                out.writeBytes(lines.get(i).bytes());
                if (i < lines.size() - 1 || finalEol) {
                    out.writeBytes(eol.getBytes(StandardCharsets.US_ASCII));
                }
            }
            return out.toByteArray();
        }

        long count(HostileLines.Kind kind) {
            return lines.stream().filter(l -> l.kind() == kind).count();
        }
    }

    static MixedBatch mixedBatch(Random r) {
        int n = 1 + r.nextInt(30);
        double t = r.nextBoolean() ? 1.5e9 + r.nextDouble() * 1e8 : r.nextDouble() * 1e6;
        List<HostileLines.Line> lines = new ArrayList<>();
        for (int i = 0; i < n; i++) {
            int pick = r.nextInt(10);
            if (pick < 5) {
                t += 0.001 + r.nextDouble() * 0.5;
                lines.add(new HostileLines.Line(HostileLines.valid(r, t), HostileLines.Kind.VALID));
            } else if (pick < 9) {
                lines.add(new HostileLines.Line(HostileLines.malformed(r, t, MAX_LINE), HostileLines.Kind.MALFORMED));
            } else {
                lines.add(new HostileLines.Line(HostileLines.blank(r), HostileLines.Kind.BLANK));
            }
        }
        return new MixedBatch(lines, r.nextInt(4) == 0 ? "\r\n" : "\n", r.nextBoolean());
    }


    @Test
    void aMixedBatchKeepsEveryValidSampleAndRejectsExactlyTheMalformedLines() {
        forEachTry(3000, 1, HostileInputPropertyTest::mixedBatch, this::checkMixedBatch);
    }

    private void checkMixedBatch(MixedBatch b) {
        String vehicle = "mix-" + MIXED_VEHICLES.incrementAndGet();
        long valid = b.count(HostileLines.Kind.VALID);
        long malformed = b.count(HostileLines.Kind.MALFORMED);
        VALID_LINES.addAndGet(valid);
        MALFORMED_LINES.addAndGet(malformed);

        RawHttp.Reply r = post(vehicle, "application/x-ndjson", b.body(), true);
        record("mixed batches (NDJSON)", r);
        assertThat(r.status()).as(r.text()).isEqualTo(200);
        JsonNode reply = json(r);
        assertThat(reply.get("accepted").asLong()).as(r.text()).isEqualTo(valid);
        assertThat(reply.get("duplicates").asLong()).isZero();
        assertThat(reply.get("rejected_count").asLong()).as(r.text()).isEqualTo(malformed);
        List<Long> expectedLines = new ArrayList<>();
        for (int i = 0; i < b.lines().size(); i++) {
            if (b.lines().get(i).kind() == HostileLines.Kind.MALFORMED) {
                expectedLines.add(i + 1L);
            }
        }
        List<Long> rejectedLines = new ArrayList<>();
        for (JsonNode e : reply.get("rejected")) {
            rejectedLines.add(e.get("line").asLong());
            assertThat(e.get("error").asText()).isNotBlank();
        }
        assertThat(rejectedLines).isEqualTo(expectedLines);

        if (valid > 0) {
            // Kept means applied by the vehicle's session, not only counted in the reply.
            SessionStats stats = server.sessions.find(vehicle).orElseThrow().session().stats();
            assertThat(stats.wheelSpeedApplied() + stats.yawRateApplied() + stats.gnssApplied()
                    + stats.referenceApplied()).isEqualTo(valid);
            RawHttp.Reply d = send("DELETE", "/v1/vehicles/" + vehicle, List.of(bearer(WRITE_TOKEN)), new byte[0]);
            record("mixed batches (NDJSON)", d);
            assertThat(d.status()).isEqualTo(204);
        } else {
            assertThat(server.sessions.find(vehicle)).isEmpty();
        }
        assertSilent("mixed batch to " + vehicle);
    }

    // ---------------------------------------------------------------------------------------------
    // 2. Hostile bodies under many content types and framings.

    record BodyCase(byte[] body, String contentType, boolean chunked, String vehicle) {
    }

    static BodyCase bodyCase(Random r) {
        byte[] body = switch (r.nextInt(10)) {
            case 0 -> randomBytes(r, 1 + r.nextInt(4000));
            case 1, 2 -> mixedBatch(r).body();
            case 3 -> jsonArrayOf(r);
            case 4 -> gzip(mixedBatch(r).body());
            case 5 -> r.nextInt(4) == 0 ? overTheBodyLimit(r) : manyShortLines(r);
            case 6 -> ("[".repeat(1 + r.nextInt(5000)) + "]".repeat(r.nextInt(3))).getBytes(StandardCharsets.UTF_8);
            case 7 -> HostileLines.malformed(r, 1e9, MAX_LINE);
            case 8 -> new byte[0];
            default -> HostileLines.concat(HostileLines.valid(r, 100.0), new byte[] {'\n'}, randomBytes(r, r.nextInt(200)));
        };
        String type = HostileLines.pick(r, "application/x-ndjson", "application/json", "application/ndjson",
                "application/jsonl", "application/x-ndjson; charset=utf-8", "APPLICATION/JSON", "application/json;",
                " application/x-ndjson ", "text/plain", "", "multipart/form-data; boundary=xyz",
                "application/x-www-form-urlencoded", "application/json; charset=latin1", null,
                HostileLines.asciiText(r, 40), "application/x-ndjson;;;;=", "*/*");
        return new BodyCase(body, type, r.nextInt(4) == 0, "body-" + r.nextInt(8));
    }


    @Test
    void aHostileBodyIsAnsweredBelow500AndEveryProblemIsJson() {
        forEachTry(2500, 2, HostileInputPropertyTest::bodyCase, this::checkBody);
    }

    private void checkBody(BodyCase c) {
        List<byte[]> headers = new ArrayList<>();
        headers.add(bearer(WRITE_TOKEN));
        if (c.contentType() != null) {
            headers.add(RawHttp.header("Content-Type", c.contentType()));
        }
        byte[] payload = c.body();
        if (c.chunked()) {
            headers.add(RawHttp.header("Transfer-Encoding", "chunked"));
            payload = chunked(c.body(), new Random(c.body().length));
        } else {
            headers.add(RawHttp.header("Content-Length", Integer.toString(c.body().length)));
        }
        RawHttp.Reply r = send("POST", "/v1/vehicles/" + c.vehicle() + "/samples", headers, payload);
        record("hostile bodies", r);
        assertThat(r.status()).as(r.text()).isIn(200, 400, 413, 415, 429);
        if (r.status() == 200) {
            JsonNode reply = json(r);
            assertThat(reply.get("accepted").asLong()).isNotNegative();
            assertThat(reply.get("rejected_count").asLong()).isNotNegative();
        } else if (r.status() != 400 || "application/problem+json".equals(r.header("content-type"))) {
            assertProblem(r);
        }
        assertSilent("body case " + c.contentType());
    }

    // ---------------------------------------------------------------------------------------------
    // 3. Header chaos: methods, lengths, framings, authorization, odd header bytes.

    static byte[] headerRequest(Random r) {
        String method = HostileLines.pick(r, "GET", "POST", "POST", "DELETE", "PUT", "PATCH", "HEAD", "OPTIONS",
                "TRACE", "BREW", "get");
        String target = randomTarget(r);
        List<byte[]> headers = new ArrayList<>();
        if (r.nextInt(10) != 0) {
            headers.add(RawHttp.header("Host", HostileLines.pick(r, "localhost", "127.0.0.1:1", "", "x".repeat(300))));
        }
        headers.add(RawHttp.header("Connection", "close"));
        if (r.nextInt(3) != 0) {
            headers.add(RawHttp.header("Authorization", authorization(r)));
        }
        if (r.nextBoolean()) {
            headers.add(RawHttp.header("Content-Type", HostileLines.pick(r, "application/x-ndjson", "application/json",
                    "text/html", "application/json; charset=utf-16", HostileLines.asciiText(r, 30))));
        }
        byte[] body = r.nextBoolean() ? HostileLines.concat(HostileLines.valid(r, 2e9 + r.nextInt(1000)), new byte[] {'\n'})
                : randomBytes(r, r.nextInt(300));
        switch (r.nextInt(9)) {
            case 0 -> headers.add(RawHttp.header("Content-Length", Integer.toString(body.length)));
            case 1 -> headers.add(RawHttp.header("Content-Length", Integer.toString(body.length + 1 + r.nextInt(50))));
            case 2 -> headers.add(RawHttp.header("Content-Length", Integer.toString(Math.max(0, body.length - 1 - r.nextInt(20)))));
            case 3 -> headers.add(RawHttp.header("Content-Length", HostileLines.pick(r, "-1", "abc", "99999999999999999999",
                    "1e3", " 12 ", "0x10", "", "9223372036854775807")));
            case 4 -> {
                headers.add(RawHttp.header("Content-Length", Integer.toString(body.length)));
                headers.add(RawHttp.header("Content-Length", Integer.toString(body.length + 3)));
            }
            case 5 -> headers.add(RawHttp.header("Transfer-Encoding", HostileLines.pick(r, "chunked", "gzip", "identity",
                    "chunked, chunked", "CHUNKED", "compress, chunked")));
            case 6 -> {
                headers.add(RawHttp.header("Transfer-Encoding", "chunked"));
                headers.add(RawHttp.header("Content-Length", Integer.toString(body.length)));
            }
            case 7 -> headers.add(RawHttp.header("Content-Encoding", HostileLines.pick(r, "gzip", "br", "deflate")));
            default -> {
            }
        }
        for (int i = r.nextInt(4); i > 0; i--) {
            headers.add(oddHeader(r));
        }
        if (r.nextInt(6) == 0) {
            headers.add(RawHttp.header("If-None-Match", HostileLines.pick(r, "*", "\"1-1\"", "W/\"x\"", ",,,",
                    HostileLines.asciiText(r, 60))));
        }
        if (r.nextInt(8) == 0) {
            headers.add(RawHttp.header("Origin", HostileLines.pick(r, "https://dash.example", "null", "https://evil.example")));
            headers.add(RawHttp.header("Access-Control-Request-Method", HostileLines.pick(r, "POST", "GET", "DELETE")));
        }
        Random shuffle = new Random(r.nextLong());
        java.util.Collections.shuffle(headers, shuffle);
        byte[] payload = body;
        if (r.nextInt(5) == 0) {
            payload = chunked(body, r);
        }
        return RawHttp.request(method + " " + target + " HTTP/1.1", headers, payload);
    }


    @Test
    void anyHeaderSetIsAnsweredBelow500() {
        forEachTry(2000, 3, HostileInputPropertyTest::headerRequest, this::checkHeaders);
    }

    private void checkHeaders(byte[] request) {
        RawHttp.Reply r;
        try {
            r = http.exchange(request);
        } catch (IllegalStateException e) {
            if (!e.getMessage().startsWith("no complete response head (0 bytes)")) {
                throw e;
            }
            // Jetty may close a connection whose framing it cannot trust without answering (here seen,
            // rarely and depending on timing, for an empty Host with an unsupported transfer coding);
            // RFC 9112 sec. 9.6 lets a server close at any time. That is no server error as long as the
            // service goes on answering, which is checked at once.
            OUTCOMES.computeIfAbsent("headers", k -> new TreeMap<>()).merge(0, 1, Integer::sum);
            RawHttp.Reply health = http.exchange(RawHttp.request("GET /health HTTP/1.1",
                    List.of(RawHttp.header("Host", "x"), RawHttp.header("Connection", "close")), new byte[0]));
            assertThat(health.status()).as("health after a connection closed without a reply to: "
                    + preview(request)).isEqualTo(200);
            assertSilent(preview(request));
            return;
        }
        record("headers", r);
        assertThat(r.allStatuses()).as(preview(request) + "\n-> " + r.text()).allMatch(s -> s < 500);
        assertSilent(preview(request));
    }

    // ---------------------------------------------------------------------------------------------
    // 4. Query values on the pose and track routes.

    static String queryTarget(Random r) {
        String vehicle = r.nextInt(8) == 0 ? randomPathSegment(r) : "q-car";
        if (r.nextBoolean()) {
            return "/v1/vehicles/" + vehicle + "/pose" + (r.nextInt(5) == 0 ? "" : "?at=" + queryValue(r, NUMBERS));
        }
        List<String> params = new ArrayList<>();
        for (String name : List.of("from", "to", "format", "crs")) {
            if (r.nextInt(3) != 0) {
                String[] pool = switch (name) {
                    case "format" -> FORMATS;
                    case "crs" -> CRSS;
                    default -> NUMBERS;
                };
                params.add(name + "=" + queryValue(r, pool));
            }
        }
        if (r.nextInt(6) == 0) {
            params.add(HostileLines.pick(r, "from=1&from=2", "&&", "=", "==x", "crs", "format", "%zz=1", "to"));
        }
        java.util.Collections.shuffle(params, new Random(r.nextLong()));
        return "/v1/vehicles/" + vehicle + "/track" + (params.isEmpty() ? "" : "?" + String.join("&", params));
    }

    private static final String[] NUMBERS = {"0", "-1", "1e308", "-1e308", "1e999", "NaN", "Infinity", "-Infinity",
        "1.5e9", "0x10", "1_0", "", " 5", "5 ", "+5", ".5", "5.", "1e-400", "9".repeat(400), "1,5", "soon",
        "2024-01-01T00:00:00Z", "null", "true", "[1]", "%20", "%2B1", "%00", "%FF", "%", "%e2%82%ac", "1.5e9%00"};
    private static final String[] FORMATS = {"json", "geojson", "GEOJSON", "kml", "", "json%00", "geo%6Ason", "%ff"};
    private static final String[] CRSS = {"EPSG:32632", "EPSG:4326", "EPSG:3857", "EPSG:99999", "EPSG:", "EPSG:-1",
        "epsg:32633", "EPSG:00000", "EPSG:1234567890123", "+proj=utm", "EPSG:32632%00", "EPSG%3A32632", "EPSG:2154",
        "EPSG:27700", "EPSG:5514", "EPSG:3035", "EPSG:4978"};

    private static String queryValue(Random r, String[] pool) {
        return switch (r.nextInt(4)) {
            case 0 -> percentEncode(HostileLines.asciiText(r, 30) + new String(Character.toChars(0x80 + r.nextInt(0x3000))));
            case 1 -> percentEncode(Double.toString(r.nextGaussian() * Math.pow(10, r.nextInt(20))));
            default -> HostileLines.pick(r, pool);
        };
    }


    @Test
    void anyQueryValueIsAnsweredWith200Or400Or404() {
        forEachTry(2500, 4, HostileInputPropertyTest::queryTarget, this::checkQuery);
    }

    private void checkQuery(String target) {
        RawHttp.Reply r = send("GET", target, List.of(bearer(READ_TOKEN)), new byte[0]);
        record("query values", r);
        assertThat(r.status()).as(target + " -> " + r.text()).isIn(200, 400, 404);
        if (r.status() != 200 && "application/problem+json".equals(r.header("content-type"))) {
            assertProblem(r);
        }
        assertSilent(target);
    }

    // ---------------------------------------------------------------------------------------------
    // 5. Authorization: nothing but a configured token gets in, and only within its scope.

    record AuthCase(String method, String path, String authorization) {
    }

    static AuthCase authCase(Random r) {
        String[][] routes = {
            {"POST", "/v1/vehicles/auth-car/samples"}, {"DELETE", "/v1/vehicles/auth-none"},
            {"GET", "/v1/vehicles"}, {"GET", "/v1/vehicles/q-car/pose"}, {"GET", "/v1/vehicles/q-car/track"},
            {"GET", "/metrics"}, {"GET", "/v1/vehicles/nobody/pose"}, {"PUT", "/v1/vehicles"}};
        String[] route = routes[r.nextInt(routes.length)];
        return new AuthCase(route[0], route[1], r.nextInt(10) == 0 ? null : authorization(r));
    }


    @Test
    void onlyAConfiguredTokenGetsInAndOnlyWithinItsScope() {
        forEachTry(1500, 5, HostileInputPropertyTest::authCase, this::checkAuth);
    }

    private void checkAuth(AuthCase c) {
        List<byte[]> headers = new ArrayList<>();
        if (c.authorization() != null) {
            headers.add(RawHttp.header("Authorization", c.authorization()));
        }
        byte[] body = new byte[0];
        if (c.method().equals("POST")) {
            headers.add(RawHttp.header("Content-Type", "application/x-ndjson"));
            body = "{\"t\":1,\"type\":\"yaw_rate\",\"rate\":0}\n".getBytes(StandardCharsets.UTF_8);
        }
        RawHttp.Reply r = send(c.method(), c.path(), headers, body);
        record("authorization", r);
        String token = credential(c.authorization());
        boolean write = !c.method().equals("GET");
        boolean hasWrite = WRITE_TOKEN.equals(token);
        boolean hasRead = READ_TOKEN.equals(token);
        if (!hasWrite && !hasRead) {
            // The header holds neither token as its bearer credential: refused, whatever it holds.
            assertThat(r.status()).as(c + " -> " + r.text()).isEqualTo(401);
            assertThat(r.header("www-authenticate")).startsWith("Bearer ");
            assertProblem(r);
        } else if (write && !hasWrite) {
            assertThat(r.status()).as(c + " -> " + r.text()).isEqualTo(403);
            assertProblem(r);
        } else {
            assertThat(r.status()).as(c + " -> " + r.text()).isNotIn(401, 403).isLessThan(500);
        }
        assertSilent(c.toString());
    }

    /**
     * The bearer credential of a header, read independently of the service by the grammar of RFC 6750
     * sec. 2.1 ({@code "Bearer" 1*SP b64token}, scheme case-insensitive per RFC 9110 sec. 11.1, the
     * value's surrounding whitespace trimmed as HTTP does), or null.
     */
    static String credential(String header) {
        if (header == null) {
            return null;
        }
        java.util.regex.Matcher m = java.util.regex.Pattern.compile("(?i)^[ \\t]*Bearer +([A-Za-z0-9\\-._~+/]+=*)[ \\t]*$")
                .matcher(header);
        return m.matches() ? m.group(1) : null;
    }

    /** Authorization values: the real tokens, near misses, other schemes and junk. */
    static String authorization(Random r) {
        String token = r.nextBoolean() ? WRITE_TOKEN : READ_TOKEN;
        return switch (r.nextInt(16)) {
            case 0 -> "Bearer " + token;
            case 1 -> "bearer " + token;
            case 2 -> "Bearer " + token.substring(0, token.length() - 1);
            case 3 -> "Bearer " + token + "x";
            case 4 -> "Bearer " + token.toUpperCase(java.util.Locale.ROOT);
            case 5 -> "Basic " + java.util.Base64.getEncoder().encodeToString(("u:" + token).getBytes(StandardCharsets.UTF_8));
            case 6 -> token;
            case 7 -> "Bearer";
            case 8 -> "Bearer ";
            case 9 -> "Bearer " + token + " " + token;
            case 10 -> "Bearer\t" + token;
            case 11 -> "Bearer " + "A".repeat(1 + r.nextInt(4000));
            case 12 -> "Bearer " + flipOneChar(r, token);
            case 13 -> "  Bearer   " + token + "  ";
            case 14 -> "Bearer " + new String(Character.toChars(0xa0 + r.nextInt(0x2000))) + token;
            default -> HostileLines.asciiText(r, 80);
        };
    }

    private static String flipOneChar(Random r, String s) {
        char[] c = s.toCharArray();
        int i = r.nextInt(c.length);
        c[i] = c[i] == 'a' ? 'b' : 'a';
        return new String(c);
    }

    // ---------------------------------------------------------------------------------------------
    // 6. Extreme finite values: no value in any numeric field breaks a vehicle.

    /** Vehicles fed extreme values, each with a real drive behind it so that its filter is running. */
    private static final int EXTREME_VEHICLES = 16;
    private static final int EXTREME_LINES_PER_REQUEST = 4;
    private static final AtomicLong EXTREME_VALUES = new AtomicLong();
    private static final int[] EXTREME_PAIRS = new int[ExtremeValues.PAIRS];
    private static final double[][] EXTREME_STATE = new double[EXTREME_VEHICLES][];

    record ExtremeBatch(int vehicle, byte[] body) {
    }

    /** Four lines for one vehicle, each with one extreme value, just after the vehicle's newest time. */
    static ExtremeBatch extremeBatch(Random r) {
        int v = r.nextInt(EXTREME_VEHICLES);
        double[] state = EXTREME_STATE[v];
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        for (int i = 0; i < EXTREME_LINES_PER_REQUEST; i++) {
            state[0] += 0.01;
            out.writeBytes(ExtremeValues.line(r, state[0], state[1], state[2], EXTREME_PAIRS));
            out.write('\n');
        }
        return new ExtremeBatch(v, out.toByteArray());
    }

    /**
     * Rule: a finite value, however absurd, in any numeric field of any sample type is answered below
     * 500, and so is every later read of that vehicle: a value beyond the physical bounds is rejected
     * with the field named and never reaches the filter. (Values such as a wheel speed of 1e300 m/s or
     * a sigma of 1e200 m once turned a vehicle's state into NaN: 500 on every read, and a snapshot
     * that could not be read back.) At least 10,000 values, every (type, field) pair many times.
     */
    @Test
    void extremeFiniteValuesInEveryNumericFieldNeverGiveA5xx() throws IOException {
        for (int v = 0; v < EXTREME_VEHICLES; v++) {
            List<org.wayhold.sample.Sample> drive = Drives.openSky(700L + v, 10.0);
            for (var chunk : Drives.chunks(drive, 5.0)) {
                assertThat(post("x-" + v, "application/x-ndjson", Drives.ndjson(chunk), true).status()).isEqualTo(200);
            }
            org.wayhold.sample.GnssFix lastFix = (org.wayhold.sample.GnssFix) drive.stream()
                    .filter(s -> s instanceof org.wayhold.sample.GnssFix).reduce((a, b) -> b).orElseThrow();
            EXTREME_STATE[v] = new double[] {drive.get(drive.size() - 1).t(), lastFix.latDeg(), lastFix.lonDeg()};
        }
        forEachTry(2500, 6, HostileInputPropertyTest::extremeBatch, this::checkExtreme);
        assertThat(EXTREME_VALUES.get()).isGreaterThanOrEqualTo(10_000);
        for (int pair : EXTREME_PAIRS) {
            assertThat(pair).as("every numeric field of every type tried many times").isGreaterThan(100);
        }
        for (int v = 0; v < EXTREME_VEHICLES; v++) {
            RawHttp.Reply pose = send("GET", "/v1/vehicles/x-" + v + "/pose", List.of(bearer(READ_TOKEN)), new byte[0]);
            assertThat(pose.status()).as(pose.text()).isEqualTo(200);
            assertThat(json(pose).path("t").isNumber()).as(pose.text()).isTrue();
        }
    }

    private void checkExtreme(ExtremeBatch b) {
        String vehicle = "x-" + b.vehicle();
        RawHttp.Reply r = post(vehicle, "application/x-ndjson", b.body(), true);
        record("extreme values", r);
        EXTREME_VALUES.addAndGet(EXTREME_LINES_PER_REQUEST);
        assertThat(r.status()).as(r.text()).isEqualTo(200);
        JsonNode reply = json(r);
        assertThat(reply.get("accepted").asLong() + reply.get("rejected_count").asLong())
                .isEqualTo(EXTREME_LINES_PER_REQUEST);
        String[] reads = {"/pose", "/track?from=0", "/fixes"};
        for (String read : reads) {
            RawHttp.Reply q = send("GET", "/v1/vehicles/" + vehicle + read, List.of(bearer(READ_TOKEN)), new byte[0]);
            record("extreme values", q);
            assertThat(q.status()).as(read + " after " + new String(b.body(), StandardCharsets.UTF_8) + " -> " + q.text())
                    .isEqualTo(200);
        }
        assertSilent("extreme values for " + vehicle);
    }

    // ---------------------------------------------------------------------------------------------
    // Request pieces.

    static String randomTarget(Random r) {
        return switch (r.nextInt(10)) {
            case 0 -> "/health";
            case 1 -> "/metrics";
            case 2 -> "/openapi.yaml";
            case 3 -> "/v1/vehicles";
            case 4 -> "/v1/vehicles/" + randomPathSegment(r) + "/samples";
            case 5 -> "/v1/vehicles/" + randomPathSegment(r) + HostileLines.pick(r, "/pose", "/track", "/stream?x=1", "");
            case 6 -> HostileLines.pick(r, "*", "/", "//v1//vehicles", "/v1/vehicles/../health", "/%2e%2e/health",
                    "/v1/vehicles/a%2Fb/pose", "http://127.0.0.1/health", "/health?" + "x".repeat(9000), "/v1/%",
                    "/v1/vehicles/%zz/pose", "/v1/vehicles/%00/pose", "/health#frag", "/v1/vehicles/a;b=c/pose");
            case 7 -> "/" + percentEncode(HostileLines.asciiText(r, 60));
            case 8 -> "/v1/vehicles/q-car/track?" + queryTarget(r).replaceFirst("^[^?]*\\??", "");
            default -> "/v1/vehicles/q-car/pose";
        };
    }

    static String randomPathSegment(Random r) {
        return switch (r.nextInt(6)) {
            case 0 -> "car-" + r.nextInt(10);
            case 1 -> "x".repeat(60 + r.nextInt(10));
            case 2 -> percentEncode(HostileLines.asciiText(r, 20) + new String(Character.toChars(0xa0 + r.nextInt(0x4000))));
            case 3 -> HostileLines.pick(r, "-lead", ".", "..", "a:b", "UPPER_lower.9", "%20", "%", "%c3%28", "%ff");
            case 4 -> "v" + r.nextInt(40);
            default -> "q-car";
        };
    }

    static byte[] oddHeader(Random r) {
        return switch (r.nextInt(7)) {
            case 0 -> RawHttp.header("X-Long", "v".repeat(1 + r.nextInt(12000)));
            case 1 -> HostileLines.concat("X-Bytes: ".getBytes(StandardCharsets.US_ASCII), randomHeaderBytes(r));
            case 2 -> "Bad Header Name: x".getBytes(StandardCharsets.US_ASCII);
            case 3 -> "NoColon".getBytes(StandardCharsets.US_ASCII);
            case 4 -> RawHttp.header("Expect", HostileLines.pick(r, "100-continue", "200-ok", "x"));
            case 5 -> RawHttp.header("Accept", HostileLines.pick(r, "*/*", "text/event-stream", "application/xml", ""));
            default -> RawHttp.header("Range", HostileLines.pick(r, "bytes=0-1", "bytes=-5", "lines=1-2"));
        };
    }

    private static byte[] randomHeaderBytes(Random r) {
        byte[] b = randomBytes(r, 1 + r.nextInt(60));
        for (int i = 0; i < b.length; i++) {
            if (b[i] == '\r' || b[i] == '\n') {
                b[i] = 'x';
            }
        }
        return b;
    }

    static byte[] randomBytes(Random r, int n) {
        byte[] b = new byte[n];
        r.nextBytes(b);
        return b;
    }

    static byte[] jsonArrayOf(Random r) {
        List<String> parts = new ArrayList<>();
        double t = 5e8;
        for (int i = r.nextInt(40); i > 0; i--) {
            t += 0.01;
            byte[] line = r.nextInt(3) == 0 ? HostileLines.malformed(r, t, MAX_LINE) : HostileLines.valid(r, t);
            parts.add(new String(line, StandardCharsets.UTF_8));
        }
        String body = "[" + String.join(HostileLines.pick(r, ",", ", ", ",\n"), parts) + "]";
        if (r.nextInt(4) == 0) {
            body = body.substring(0, r.nextInt(body.length() + 1));
        }
        return body.getBytes(StandardCharsets.UTF_8);
    }

    static byte[] manyShortLines(Random r) {
        StringBuilder sb = new StringBuilder();
        double t = 7e8 + r.nextInt(1000);
        int n = MAX_SAMPLES - 50 + r.nextInt(200);
        for (int i = 0; i < n; i++) {
            t += 0.001;
            sb.append("{\"t\":").append(HostileLines.num(t)).append(",\"type\":\"yaw_rate\",\"rate\":0.01}\n");
        }
        return sb.toString().getBytes(StandardCharsets.UTF_8);
    }

    static byte[] overTheBodyLimit(Random r) {
        byte[] b = new byte[MAX_BODY + 1 + r.nextInt(4096)];
        java.util.Arrays.fill(b, (byte) ' ');
        for (int i = 80; i < b.length; i += 81) {
            b[i] = '\n';
        }
        return b;
    }

    static byte[] gzip(byte[] body) {
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        try (GZIPOutputStream z = new GZIPOutputStream(out)) {
            z.write(body);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        return out.toByteArray();
    }

    /** Chunked transfer coding (RFC 9112 sec. 7.1), sometimes broken: a bad size, or no last chunk. */
    static byte[] chunked(byte[] body, Random r) {
        ByteArrayOutputStream out = new ByteArrayOutputStream(body.length + 64);
        int p = 0;
        while (p < body.length) {
            int n = Math.min(body.length - p, 1 + r.nextInt(8192));
            out.writeBytes((Integer.toHexString(n) + "\r\n").getBytes(StandardCharsets.US_ASCII));
            out.write(body, p, n);
            out.writeBytes("\r\n".getBytes(StandardCharsets.US_ASCII));
            p += n;
        }
        switch (r.nextInt(8)) {
            case 0 -> out.writeBytes("zz\r\n".getBytes(StandardCharsets.US_ASCII));
            case 1 -> {
                // No last chunk: the body ends in EOF.
            }
            case 2 -> out.writeBytes("ffffffffffffffff\r\nabc".getBytes(StandardCharsets.US_ASCII));
            default -> out.writeBytes("0\r\n\r\n".getBytes(StandardCharsets.US_ASCII));
        }
        return out.toByteArray();
    }

    static String percentEncode(String s) {
        StringBuilder sb = new StringBuilder();
        for (byte b : s.getBytes(StandardCharsets.UTF_8)) {
            int c = b & 0xff;
            if ((c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') || c == '-' || c == '.'
                    || c == '_' || c == '~') {
                sb.append((char) c);
            } else {
                sb.append('%').append(String.format("%02X", c));
            }
        }
        return sb.toString();
    }

    // ---------------------------------------------------------------------------------------------
    // Sending and checking.

    /**
     * Runs one property: {@code tries} inputs drawn from a generator seeded with {@code SEED + property},
     * each checked by {@code check}. A failure names the property's seed and the try, so it can be rerun.
     */
    private static <T> void forEachTry(int tries, int property, Function<Random, T> generator, Consumer<T> check) {
        Random r = new Random(SEED + property);
        for (int i = 0; i < tries; i++) {
            T input = generator.apply(r);
            try {
                check.accept(input);
            } catch (AssertionError | RuntimeException e) {
                throw new AssertionError("property " + property + " (seed " + (SEED + property) + "), try " + (i + 1)
                        + " of " + tries + ": " + e.getMessage(), e);
            }
        }
    }

    static byte[] bearer(String token) {
        return RawHttp.header("Authorization", "Bearer " + token);
    }

    static RawHttp.Reply post(String vehicle, String contentType, byte[] body, boolean withToken) {
        List<byte[]> headers = new ArrayList<>();
        if (withToken) {
            headers.add(bearer(WRITE_TOKEN));
        }
        headers.add(RawHttp.header("Content-Type", contentType));
        headers.add(RawHttp.header("Content-Length", Integer.toString(body.length)));
        return send("POST", "/v1/vehicles/" + vehicle + "/samples", headers, body);
    }

    static RawHttp.Reply send(String method, String target, List<byte[]> headers, byte[] body) {
        List<byte[]> all = new ArrayList<>();
        all.add(RawHttp.header("Host", "127.0.0.1"));
        all.add(RawHttp.header("Connection", "close"));
        all.addAll(headers);
        boolean framed = headers.stream().anyMatch(h -> {
            String s = new String(h, StandardCharsets.ISO_8859_1).toLowerCase(java.util.Locale.ROOT);
            return s.startsWith("content-length:") || s.startsWith("transfer-encoding:");
        });
        if (!framed && body.length > 0) {
            all.add(RawHttp.header("Content-Length", Integer.toString(body.length)));
        }
        return http.exchange(RawHttp.request(method + " " + target + " HTTP/1.1", all, body));
    }

    static JsonNode json(RawHttp.Reply r) {
        try {
            return LiveServer.JSON.readTree(r.body());
        } catch (IOException e) {
            throw new AssertionError("not JSON (" + r.status() + "): " + r.text(), e);
        }
    }

    static void assertProblem(RawHttp.Reply r) {
        assertThat(r.header("content-type")).as(r.text()).startsWith("application/problem+json");
        JsonNode p = json(r);
        assertThat(p.get("status").asInt()).isEqualTo(r.status());
        assertThat(p.get("detail").asText()).isNotBlank();
        assertThat(r.text()).doesNotContain("Exception", "\tat ", "org.wayhold", WRITE_TOKEN, READ_TOKEN);
    }

    static void record(String property, RawHttp.Reply r) {
        OUTCOMES.computeIfAbsent(property, k -> new TreeMap<>()).merge(r.status(), 1, Integer::sum);
    }

    private static String logText() {
        synchronized (LOG) {
            return LOG.toString(StandardCharsets.UTF_8);
        }
    }

    private static void assertSilent(String context) {
        String text = logText();
        if (!text.isEmpty()) {
            synchronized (LOG) {
                LOG.reset();
            }
            throw new AssertionError("the service logged while handling " + context + ":\n" + text);
        }
    }

    private static String preview(byte[] request) {
        String s = new String(request, 0, Math.min(request.length, 400), StandardCharsets.ISO_8859_1);
        return s.replace("\r", "\\r").replace("\n", "\\n");
    }

    /** Captured log output; written from any server thread. */
    private static final class SynchronizedSink extends java.io.OutputStream {
        @Override
        public void write(int b) {
            synchronized (LOG) {
                LOG.write(b);
            }
        }

        @Override
        public void write(byte[] b, int off, int len) {
            synchronized (LOG) {
                LOG.write(b, off, len);
            }
        }
    }
}
