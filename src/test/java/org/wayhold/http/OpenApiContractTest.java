package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;

import com.atlassian.oai.validator.OpenApiInteractionValidator;
import com.atlassian.oai.validator.model.Request;
import com.atlassian.oai.validator.model.SimpleRequest;
import com.atlassian.oai.validator.model.SimpleResponse;
import com.atlassian.oai.validator.report.ValidationReport;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.dataformat.yaml.YAMLFactory;
import java.io.IOException;
import java.io.InputStream;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.wayhold.filter.FilterCounter;
import org.wayhold.sample.Sample;

/**
 * The service and its top-level {@code openapi.yaml} describe each other: every registered route is in
 * the spec, every spec operation answers (not 404 or 405), and live responses (bodies, status codes,
 * content types, additionalProperties: false on pose objects) pass Atlassian's
 * swagger-request-validator, an outside OpenAPI 3.0 implementation.
 */
class OpenApiContractTest {

    private static final Path SPEC = Path.of("openapi.yaml");
    private static final String CAR = "spec-car";

    private static LiveServer server;
    private static JsonNode spec;
    private static OpenApiInteractionValidator validator;

    @BeforeAll
    static void start() throws IOException {
        server = new LiveServer(LiveServer.settings(s -> LiveServer.withLimits(s, 256 * 1024, s.maxSessions(),
                s.corsOrigins(), s.sseKeepAliveS())));
        spec = new ObjectMapper(new YAMLFactory()).readTree(SPEC.toFile());
        validator = OpenApiInteractionValidator.createForInlineApiSpecification(Files.readString(SPEC)).build();
        List<Sample> samples = Drives.openSky(3L, 40.0);
        for (List<Sample> chunk : Drives.chunks(samples, 5.0)) {
            assertThat(server.postNdjson(CAR, Drives.ndjson(chunk)).statusCode()).isEqualTo(200);
        }
    }

    @AfterAll
    static void stop() {
        server.close();
    }

    @Test
    void everyRegisteredRouteIsInTheSpec() {
        List<String> routes = server.service.routes();
        assertThat(routes).hasSizeGreaterThanOrEqualTo(9);
        for (String route : routes) {
            String[] parts = route.split(" ", 2);
            JsonNode path = spec.get("paths").get(parts[1]);
            assertThat(path).as("spec path for %s", route).isNotNull();
            assertThat(path.get(parts[0].toLowerCase(Locale.ROOT))).as("spec operation for %s", route).isNotNull();
        }
    }

    @Test
    void everySpecOperationAnswers() throws Exception {
        int checked = 0;
        for (Iterator<Map.Entry<String, JsonNode>> paths = spec.get("paths").fields(); paths.hasNext(); ) {
            Map.Entry<String, JsonNode> p = paths.next();
            for (Iterator<String> methods = p.getValue().fieldNames(); methods.hasNext(); ) {
                String method = methods.next().toUpperCase(Locale.ROOT);
                String vehicle = method.equals("DELETE") ? "spec-doomed" : CAR;
                if (method.equals("DELETE")) {
                    server.postNdjson(vehicle, Drives.ndjson(Drives.openSky(4L, 2.0)));
                }
                String path = p.getKey().replace("{vehicle}", vehicle);
                HttpRequest.Builder b = server.request(path);
                HttpRequest req = switch (method) {
                    case "GET" -> b.GET().build();
                    case "DELETE" -> b.DELETE().build();
                    case "POST" -> b.header("Content-Type", "application/x-ndjson")
                            .POST(HttpRequest.BodyPublishers.ofString("")).build();
                    default -> throw new AssertionError("method " + method + " not covered by this test");
                };
                // Streams never end: read the status line and headers, then hang up.
                HttpResponse<InputStream> r = server.client.send(req, HttpResponse.BodyHandlers.ofInputStream());
                r.body().close();
                assertThat(r.statusCode()).as("%s %s", method, path).isNotIn(404, 405).isLessThan(500);
                checked++;
            }
        }
        assertThat(checked).isEqualTo(server.service.routes().size());
    }

    @Test
    void liveResponsesMatchTheSpec() {
        List<String> errors = new ArrayList<>();
        String ndjson = "{\"type\":\"wheel_speed\",\"t\":1800003700.0,\"speed\":1.0,\"odo_ticks\":12}\n"
                + "{\"type\":\"gnss\",\"t\":1800003700.1,\"lat\":91,\"lon\":10}\n"
                + "{\"type\":\"wheel_speed\",\"t\":1800003000.0,\"speed\":1.0}\n"
                + "not json\n";
        check(errors, "POST", "/v1/vehicles/" + CAR + "/samples", "application/x-ndjson", ndjson, Map.of());
        check(errors, "POST", "/v1/vehicles/" + CAR + "/samples", "application/json",
                "[{\"type\":\"yaw_rate\",\"t\":1800003700.2,\"rate\":0.01},{\"type\":\"nope\",\"t\":1}]", Map.of());
        assertThat(errors).as("only the request half may complain about the unknown type").hasSize(1);
        assertThat(errors.get(0)).contains("validation.request.body");
        errors.clear();
        check(errors, "GET", "/v1/vehicles/" + CAR + "/pose", null, null, Map.of());
        String etag = server.get("/v1/vehicles/" + CAR + "/pose").headers().firstValue("ETag").orElseThrow();
        check(errors, "GET", "/v1/vehicles/" + CAR + "/pose", null, null, Map.of("If-None-Match", etag));
        check(errors, "GET", "/v1/vehicles/" + CAR + "/pose?at=1800003620.0", null, null, Map.of());
        check(errors, "GET", "/v1/vehicles/" + CAR + "/track?from=1800003610&to=1800003615", null, null, Map.of());
        check(errors, "GET", "/v1/vehicles/" + CAR + "/track?from=1800003610&to=1800003615&crs=EPSG:32632",
                null, null, Map.of());
        check(errors, "GET", "/v1/vehicles/" + CAR + "/track?format=geojson&crs=EPSG:32632", null, null, Map.of());
        check(errors, "GET", "/v1/vehicles", null, null, Map.of());
        check(errors, "GET", "/health", null, null, Map.of());
        check(errors, "GET", "/metrics", null, null, Map.of());
        check(errors, "GET", "/openapi.yaml", null, null, Map.of());
        // Problem responses of each kind.
        check(errors, "GET", "/v1/vehicles/" + CAR + "/pose?at=soon", null, null, Map.of());
        check(errors, "GET", "/v1/vehicles/" + CAR + "/track?crs=EPSG:99999", null, null, Map.of());
        check(errors, "GET", "/v1/vehicles/nobody/pose", null, null, Map.of());
        check(errors, "POST", "/v1/vehicles/" + CAR + "/samples", "text/csv", "t,lat\n", Map.of());
        check(errors, "POST", "/v1/vehicles/" + CAR + "/samples", "application/x-ndjson",
                "x".repeat(300 * 1024), Map.of());
        // An implausible value, a kept reply and its replay, a key reused for another body, a coding refused.
        check(errors, "POST", "/v1/vehicles/" + CAR + "/samples", "application/x-ndjson",
                "{\"type\":\"wheel_speed\",\"t\":1800003700.3,\"speed\":1e300}\n", Map.of());
        String keyed = "{\"type\":\"yaw_rate\",\"t\":1800003700.4,\"rate\":0.01}\n";
        check(errors, "POST", "/v1/vehicles/" + CAR + "/samples", "application/x-ndjson", keyed,
                Map.of("Idempotency-Key", "spec-key-1"));
        check(errors, "POST", "/v1/vehicles/" + CAR + "/samples", "application/x-ndjson", keyed,
                Map.of("Idempotency-Key", "spec-key-1"));
        check(errors, "POST", "/v1/vehicles/" + CAR + "/samples", "application/x-ndjson", keyed + keyed,
                Map.of("Idempotency-Key", "spec-key-1"));
        check(errors, "POST", "/v1/vehicles/" + CAR + "/samples", "application/x-ndjson", keyed,
                Map.of("Content-Encoding", "br"));
        server.postNdjson("spec-gone", Drives.ndjson(Drives.openSky(5L, 2.0)));
        check(errors, "DELETE", "/v1/vehicles/spec-gone", null, null, Map.of());
        check(errors, "DELETE", "/v1/vehicles/spec-gone", null, null, Map.of());
        assertThat(errors).isEmpty();
    }

    @Test
    void theValidatorCatchesAPoseWithAFieldTheSpecDoesNotKnow() {
        String pose = server.get("/v1/vehicles/" + CAR + "/pose").body();
        String doctored = pose.substring(0, pose.length() - 1) + ",\"bogus\":1}";
        ValidationReport report = validator.validateResponse("/v1/vehicles/" + CAR + "/pose", Request.Method.GET,
                SimpleResponse.Builder.ok().withContentType("application/json").withBody(doctored).build());
        assertThat(report.hasErrors()).as("a planted extra field must be caught").isTrue();
        ValidationReport clean = validator.validateResponse("/v1/vehicles/" + CAR + "/pose", Request.Method.GET,
                SimpleResponse.Builder.ok().withContentType("application/json").withBody(pose).build());
        assertThat(clean.hasErrors()).as(clean.getMessages().toString()).isFalse();
    }

    /**
     * The vehicle list's {@code filter_events} names every {@link FilterCounter} under its wire name, in
     * the enum's order, and requires them all; a live list passes and one with a counter renamed does not.
     */
    @Test
    void theFilterEventsOfTheListAreTheFiltersCountersByTheirWireNames() {
        JsonNode events = spec.at("/components/schemas/VehicleSummary/properties/filter_events");
        List<String> wireNames = new ArrayList<>();
        for (FilterCounter c : FilterCounter.values()) {
            wireNames.add(c.wireName());
        }
        List<String> described = new ArrayList<>();
        events.get("properties").fieldNames().forEachRemaining(described::add);
        List<String> required = new ArrayList<>();
        events.get("required").forEach(n -> required.add(n.asText()));
        assertThat(described).isEqualTo(wireNames);
        assertThat(required).isEqualTo(wireNames);

        String list = server.get("/v1/vehicles").body();
        assertThat(LiveServer.json(server.get("/v1/vehicles")).at("/vehicles/0/filter_events").size())
                .isEqualTo(wireNames.size());
        ValidationReport clean = validator.validateResponse("/v1/vehicles", Request.Method.GET,
                SimpleResponse.Builder.ok().withContentType("application/json").withBody(list).build());
        assertThat(clean.hasErrors()).as(clean.getMessages().toString()).isFalse();
        String renamed = list.replace("\"fixes_gated\":", "\"gated_fixes\":");
        assertThat(renamed).isNotEqualTo(list);
        assertThat(validator.validateResponse("/v1/vehicles", Request.Method.GET, SimpleResponse.Builder.ok()
                .withContentType("application/json").withBody(renamed).build()).hasErrors())
                .as("a renamed counter must be caught").isTrue();
    }

    @Test
    void theServedSpecIsTheTopLevelFile() throws IOException {
        HttpResponse<String> r = server.get("/openapi.yaml");
        assertThat(r.statusCode()).isEqualTo(200);
        assertThat(r.headers().firstValue("Content-Type").orElse("")).startsWith("application/yaml");
        assertThat(r.body()).isEqualTo(Files.readString(SPEC, StandardCharsets.UTF_8));
    }

    /** Sends one request, validates request and response against the spec, adds any error found. */
    private static void check(List<String> errors, String method, String pathAndQuery, String contentType,
                              String body, Map<String, String> headers) {
        HttpRequest.Builder b = server.request(pathAndQuery);
        headers.forEach(b::header);
        if (contentType != null) {
            b.header("Content-Type", contentType);
        }
        b.method(method, body == null ? HttpRequest.BodyPublishers.noBody() : HttpRequest.BodyPublishers.ofString(body));
        HttpResponse<String> r = server.send(b.build());

        int q = pathAndQuery.indexOf('?');
        String path = q < 0 ? pathAndQuery : pathAndQuery.substring(0, q);
        SimpleRequest.Builder rb = new SimpleRequest.Builder(Request.Method.valueOf(method), path);
        if (q >= 0) {
            for (String pair : pathAndQuery.substring(q + 1).split("&")) {
                String[] kv = pair.split("=", 2);
                rb.withQueryParam(kv[0], kv.length > 1 ? kv[1] : "");
            }
        }
        headers.forEach(rb::withHeader);
        if (contentType != null) {
            rb.withContentType(contentType);
        }
        if (body != null) {
            rb.withBody(body);
        }
        SimpleResponse.Builder resp = SimpleResponse.Builder.status(r.statusCode());
        r.headers().map().forEach((k, v) -> resp.withHeader(k, v));
        if (!r.body().isEmpty()) {
            resp.withBody(r.body());
        }
        ValidationReport report = validator.validate(rb.build(), resp.build());
        for (ValidationReport.Message m : report.getMessages()) {
            if (m.getLevel() == ValidationReport.Level.ERROR && !isExpectedRequestComplaint(m, r.statusCode())) {
                errors.add(method + " " + pathAndQuery + " -> " + r.statusCode() + ": " + m.getKey() + " "
                        + m.getMessage());
            }
        }
    }

    /**
     * Requests built to be wrong (a bad {@code at}, an unknown media type) are rightly flagged by the
     * request half of the validation; only the response half matters for those. A wrong sample inside a
     * body is answered 200 with a rejection, so that case is checked by hand in the test.
     */
    private static boolean isExpectedRequestComplaint(ValidationReport.Message m, int status) {
        return status >= 400 && m.getKey().startsWith("validation.request");
    }

    // The event stream itself is not validated here: its body never ends. PoseStreamTest reads it.
}
