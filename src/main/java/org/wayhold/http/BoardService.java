package org.wayhold.http;

import com.fasterxml.jackson.core.JsonParser;
import com.fasterxml.jackson.core.JsonToken;
import io.javalin.Javalin;
import io.javalin.config.JavalinConfig;
import io.javalin.http.Context;
import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.util.Comparator;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import org.wayhold.settings.ServerSettings;

/**
 * The read side of the fleet mode ({@code serve --from-kafka}): the service's read routes (latest pose
 * and pose at a time, track, vehicle list, pose stream, live view) answered from a {@link PoseBoard}
 * that a reader of the workers' poses topic fills. Nothing is computed here: the pose JSON is the
 * workers', passed through, with the vehicle's liveness ({@code received_at}, {@code stale}: see
 * {@link PoseBoard}) added where the service adds it (the latest pose, the list, stream events). Samples
 * are not taken (they go to the samples topic), so {@code POST} and {@code DELETE} answer 405 with the
 * methods that are answered in {@code Allow}; the fix decisions are not in the poses topic, so
 * {@code /fixes} answers an empty list; a track is JSON only (GeoJSON and {@code crs} need the poses'
 * numbers, which this side does not read), and says what the kept poses span as the service does.
 * {@code /health} is always ready: there is no journal to refuse writes.
 *
 * <p>Tokens, CORS origins, bind address, stream limits and time-outs are the {@code server} section's,
 * as for the full service.
 */
public final class BoardService implements AutoCloseable {

    private final ServerSettings server;
    private final PoseBoard board;
    private final PoseStreams streams;
    private final BearerTokens tokens;
    private final UploadSlots uploads;
    private final byte[] openApiYaml;
    private final String source;
    private final SampleForwarder forwarder;
    private final Javalin app;
    private final long startedNanos = System.nanoTime();
    /** Registered routes, {@code "METHOD /path"}, for {@code Allow}. */
    private final List<String> routes = java.util.Collections.synchronizedList(new java.util.ArrayList<>());
    /** Registered only to say why they are refused: not named in {@code Allow}. */
    private final java.util.Set<String> refused = new java.util.HashSet<>();

    /**
     * @param source where the poses come from, for {@code /health} (for example {@code "kafka topic wayhold.poses"})
     */
    public BoardService(ServerSettings server, PoseBoard board, String source) {
        this(server, board, source, null);
    }

    /**
     * A read service that also takes samples ({@code serve --to-kafka}): a {@code POST .../samples} body
     * is handed to {@code forwarder} and acknowledged once it is stored (202); the workers check its
     * lines, and refused ones go to their dead-letter topic.
     *
     * @param forwarder where samples go, or null to answer {@code POST} with 405
     */
    public BoardService(ServerSettings server, PoseBoard board, String source, SampleForwarder forwarder) {
        this.server = server;
        this.board = board;
        this.source = source;
        this.forwarder = forwarder;
        this.streams = new PoseStreams(server.sseKeepAliveS(), server.maxStreams(), board.staleAfterS());
        this.tokens = new BearerTokens(server);
        this.uploads = new UploadSlots(server.maxConcurrentUploads());
        this.openApiYaml = readOpenApi();
        this.app = Javalin.create(this::configure);
    }

    private void configure(JavalinConfig config) {
        ServerWiring.configure(config, server, streams, routes, List.of("ETag", VehicleRoutes.HELD_FROM,
                VehicleRoutes.HELD_TO, VehicleRoutes.TRUNCATED));
        if (forwarder == null) {
            refused.add("POST /v1/vehicles/{vehicle}/samples");
        }
        refused.add("DELETE /v1/vehicles/{vehicle}");
        ServerWiring.guard(config, server, uploads, tokens, this::allow);
        config.routes.post("/v1/vehicles/{vehicle}/samples", ctx -> {
            if (forwarder == null) {
                throw readOnly(ctx, "samples go to the workers' samples topic; this service only reads their poses"
                        + " (serve --to-kafka forwards them)");
            }
            forward(ctx);
        });
        config.routes.get("/v1/vehicles/{vehicle}/pose", this::getPose);
        config.routes.get("/v1/vehicles/{vehicle}/track", this::getTrack);
        config.routes.get("/v1/vehicles/{vehicle}/fixes", this::getFixes);
        config.routes.get("/v1/vehicles/{vehicle}/stream", ctx -> {
            String id = vehicleId(ctx);
            streams.start(ctx, id, vehicle(id));
        });
        config.routes.delete("/v1/vehicles/{vehicle}", ctx -> {
            throw readOnly(ctx, "vehicles are held by the workers; this service only reads their poses");
        });
        config.routes.get("/v1/vehicles", this::list);
        config.routes.get("/health", this::health);
        config.routes.get("/health/live", ctx -> {
            ctx.header("Cache-Control", "no-store");
            ctx.contentType("application/json").result(PoseJson.document(64, g -> {
                g.writeStartObject();
                g.writeStringField("status", "ok");
                g.writeNumberField("uptime_s", Math.round((System.nanoTime() - startedNanos) / 1e6) / 1e3);
                g.writeEndObject();
            }));
        });
        config.routes.get("/openapi.yaml", ctx -> ctx.contentType("application/yaml").result(openApiYaml));
    }

    /** Most bytes of one forwarded record: Kafka refuses records over 1 MB by default (max.request.size). */
    static final int RECORD_BYTES = 512 * 1024;

    /** How long a reply waits for the broker's acknowledgement (s). */
    static final long FORWARD_TIMEOUT_S = 30;

    /**
     * Forwards a body of samples: NDJSON is cut at line ends into records of at most
     * {@link #RECORD_BYTES}; a JSON body (one object or an array) is one record, as an array. Replies 202
     * with where the records went once the broker acknowledged all of them, in order.
     */
    private void forward(Context ctx) {
        String id = vehicleId(ctx);
        SampleIngest.Format format = SampleIngest.formatOf(ctx.header("Content-Type"));
        SampleIngest.Encoding encoding = SampleIngest.encodingOf(ctx.header("Content-Encoding"));
        byte[] body = ctx.bodyAsBytes();
        if (encoding == SampleIngest.Encoding.GZIP) {
            try (InputStream in = new java.util.zip.GZIPInputStream(new java.io.ByteArrayInputStream(body))) {
                body = in.readNBytes((int) Math.min(Integer.MAX_VALUE - 8, server.maxBodyBytes() + 1));
            } catch (IOException e) {
                throw HttpProblem.invalidParameter("body", "body: not a valid gzip stream: " + e.getMessage());
            }
            if (body.length > server.maxBodyBytes()) {
                throw HttpProblem.bodyTooLarge("body: more than " + server.maxBodyBytes()
                        + " bytes once inflated (server.max_body_bytes)");
            }
        }
        List<byte[]> records = new java.util.ArrayList<>();
        if (format == SampleIngest.Format.JSON) {
            String text = new String(body, java.nio.charset.StandardCharsets.UTF_8).strip();
            byte[] array = (text.startsWith("[") ? text : "[" + text + "]").getBytes(java.nio.charset.StandardCharsets.UTF_8);
            if (array.length > RECORD_BYTES) {
                throw HttpProblem.bodyTooLarge("body: a JSON body forwarded to Kafka may hold at most " + RECORD_BYTES
                        + " bytes; send larger batches as NDJSON, which is cut into records");
            }
            records.add(array);
        } else {
            int from = 0;
            while (from < body.length) {
                int to = Math.min(body.length, from + RECORD_BYTES);
                if (to < body.length) {
                    int cut = to;
                    while (cut > from && body[cut - 1] != '\n') {
                        cut--;
                    }
                    if (cut == from) {
                        throw HttpProblem.invalidParameter("body", "body: a line longer than " + RECORD_BYTES
                                + " bytes cannot be forwarded");
                    }
                    to = cut;
                }
                records.add(java.util.Arrays.copyOfRange(body, from, to));
                from = to;
            }
        }
        if (records.isEmpty() || records.stream().allMatch(r -> new String(r, java.nio.charset.StandardCharsets.UTF_8).isBlank())) {
            throw HttpProblem.invalidParameter("body", "body: no samples");
        }
        List<java.util.concurrent.CompletableFuture<SampleForwarder.Stored>> sent = new java.util.ArrayList<>();
        for (byte[] r : records) {
            sent.add(forwarder.forward(id, r));
        }
        SampleForwarder.Stored last;
        try {
            java.util.concurrent.CompletableFuture.allOf(sent.toArray(new java.util.concurrent.CompletableFuture[0]))
                    .get(FORWARD_TIMEOUT_S, java.util.concurrent.TimeUnit.SECONDS);
            last = sent.get(sent.size() - 1).get();
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            throw HttpProblem.unavailable("samples", "samples: interrupted before the broker acknowledged them");
        } catch (java.util.concurrent.ExecutionException | java.util.concurrent.TimeoutException e) {
            Throwable cause = e.getCause() == null ? e : e.getCause();
            throw HttpProblem.unavailable("samples", "samples: not stored in Kafka (" + cause.getClass().getSimpleName()
                    + "); nothing was acknowledged, send them again");
        }
        int n = records.size();
        byte[] json = PoseJson.document(160, g -> {
            g.writeStartObject();
            g.writeStringField("vehicle", id);
            g.writeNumberField("records", n);
            g.writeStringField("topic", last.topic());
            g.writeNumberField("partition", last.partition());
            g.writeNumberField("offset", last.offset());
            g.writeEndObject();
        });
        ctx.status(202).contentType("application/json").result(json);
    }

    /** The methods answered on a path, as an {@code Allow} value: the refused routes are not. */
    private String allow(String path) {
        List<String> answered;
        synchronized (routes) {
            answered = routes.stream().filter(r -> !refused.contains(r)).toList();
        }
        return HttpService.allowHeader(answered, path);
    }

    /** RFC 9110 sec. 15.5.6: a 405 carries {@code Allow}, here the methods that are answered. */
    private HttpProblem readOnly(Context ctx, String detail) {
        ctx.header("Allow", allow(ctx.path()));
        return new HttpProblem(405, "read-only", "Read-only service", "method", detail);
    }

    private String vehicleId(Context ctx) {
        String id = ctx.pathParam("vehicle");
        int max = server.maxVehicleIdChars();
        if (id.length() > max || !VehicleRoutes.VEHICLE_ID.matcher(id).matches()) {
            throw HttpProblem.invalidParameter("vehicle", "must be 1 to " + max
                    + " letters, digits or . _ : -, starting with a letter or digit (server.max_vehicle_id_chars), was '"
                    + VehicleRoutes.clip(id) + "'");
        }
        return id;
    }

    private PoseBoard.Vehicle vehicle(String id) {
        return board.find(id).orElseThrow(() -> HttpProblem.unknownVehicle(id));
    }

    private void getPose(Context ctx) {
        String id = vehicleId(ctx);
        PoseBoard.Vehicle v = vehicle(id);
        String atText = ctx.queryParam("at");
        if (atText != null) {
            double at = VehicleRoutes.finiteNumber("at", atText);
            PoseBoard.Entry e = v.at(at).orElseThrow(() -> HttpProblem.noPose("at",
                    "no pose of '" + id + "' at or before " + atText + " s in the history"));
            ctx.contentType("application/json").result(e.json());
            return;
        }
        long version = v.version();
        PoseBoard.Entry latest = v.latest().orElseThrow(() -> HttpProblem.noPose("vehicle",
                "'" + id + "' has no pose yet"));
        // As the service does: staleness changes with the wall clock alone, so it is part of the tag.
        org.wayhold.session.Liveness live = v.liveness();
        String etag = "\"k-" + version + (live.stale() ? "-stale" : "") + "\"";
        ctx.header("ETag", etag);
        ctx.header("Cache-Control", "no-cache");
        if (VehicleRoutes.matches(ctx.header("If-None-Match"), etag)) {
            ctx.status(304);
            return;
        }
        ctx.contentType("application/json").result(PoseJson.withLiveness(latest.json(), live));
    }

    private void getTrack(Context ctx) {
        String id = vehicleId(ctx);
        PoseBoard.Vehicle v = vehicle(id);
        String format = ctx.queryParam("format");
        if (format != null && !format.equals("json")) {
            throw HttpProblem.invalidParameter("format", "must be json when poses are read from Kafka (GeoJSON is"
                    + " written by the service that runs the vehicles), was '" + VehicleRoutes.clip(format) + "'");
        }
        if (ctx.queryParam("crs") != null) {
            throw HttpProblem.invalidParameter("crs", "projected coordinates are not available when poses are read"
                    + " from Kafka");
        }
        String fromText = ctx.queryParam("from");
        String toText = ctx.queryParam("to");
        double from = fromText == null ? Double.NEGATIVE_INFINITY : VehicleRoutes.finiteNumber("from", fromText);
        double to = toText == null ? Double.POSITIVE_INFINITY : VehicleRoutes.finiteNumber("to", toText);
        if (from > to) {
            throw HttpProblem.invalidParameter("to", "must not be before from (" + fromText + " s), was " + toText + " s");
        }
        org.wayhold.session.VehicleSession.HeldSpan held = v.held();
        List<PoseBoard.Entry> poses = v.between(from, to);
        TrackJson.Held span = TrackJson.Held.of(held, from);
        if (!Double.isNaN(held.fromT())) {
            ctx.header(VehicleRoutes.HELD_FROM, PoseJson.plain(held.fromT()));
            ctx.header(VehicleRoutes.HELD_TO, PoseJson.plain(held.toT()));
        }
        ctx.header(VehicleRoutes.TRUNCATED, Boolean.toString(span.truncated()));
        byte[] body = PoseJson.document(256 + 800 * poses.size(), g -> {
            g.writeStartObject();
            g.writeStringField("vehicle", id);
            g.writeNumberField("count", poses.size());
            PoseJson.number(g, "held_from", span.fromT());
            PoseJson.number(g, "held_to", span.toT());
            g.writeBooleanField("truncated", span.truncated());
            g.writeArrayFieldStart("poses");
            for (PoseBoard.Entry e : poses) {
                g.writeRawValue(new String(e.json(), java.nio.charset.StandardCharsets.UTF_8));
            }
            g.writeEndArray();
            g.writeEndObject();
        });
        ctx.contentType("application/json").result(body);
    }

    private void getFixes(Context ctx) {
        String id = vehicleId(ctx);
        vehicle(id);
        byte[] json = PoseJson.document(64, g -> {
            g.writeStartObject();
            g.writeStringField("vehicle", id);
            g.writeArrayFieldStart("fixes");
            g.writeEndArray();
            g.writeEndObject();
        });
        ctx.contentType("application/json").result(json);
    }

    /** The vehicle list's fields, read from the newest pose's JSON. */
    private static final List<String> LISTED = List.of("state", "t", "lat", "lon", "radius95", "alert_limit",
            "last_fix_t");

    private void list(Context ctx) {
        List<PoseBoard.Vehicle> all = board.all();
        all = all.stream().sorted(Comparator.comparing(v -> v.id)).toList();
        List<PoseBoard.Vehicle> vehicles = all;
        byte[] json = PoseJson.document(256 + 200 * vehicles.size(), g -> {
            g.writeStartObject();
            g.writeArrayFieldStart("vehicles");
            for (PoseBoard.Vehicle v : vehicles) {
                Map<String, Object> fields = v.latest().map(e -> summary(e.json())).orElse(Map.of());
                g.writeStartObject();
                g.writeStringField("vehicle", v.id);
                // The workers count samples and keep the filter's counts in their stores; their poses
                // carry neither.
                g.writeNullField("samples");
                g.writeNullField("filter_events");
                for (String name : LISTED) {
                    Object value = fields.get(name);
                    if (value instanceof String text) {
                        g.writeStringField(name, text);
                    } else if (value instanceof Double d) {
                        PoseJson.number(g, name, d);
                    } else {
                        g.writeNullField(name);
                    }
                }
                g.writeBooleanField("outage_active", Boolean.TRUE.equals(fields.get("outage_active")));
                PoseJson.liveness(g, v.liveness());
                g.writeEndObject();
            }
            g.writeEndArray();
            g.writeEndObject();
        });
        ctx.contentType("application/json").result(json);
    }

    /** The top-level numbers and state of a pose's JSON, and {@code outage.active} as {@code outage_active}. */
    static Map<String, Object> summary(byte[] json) {
        Map<String, Object> out = new HashMap<>();
        try (JsonParser p = PoseJson.FACTORY.createParser(json)) {
            if (p.nextToken() != JsonToken.START_OBJECT) {
                return out;
            }
            while (p.nextToken() == JsonToken.FIELD_NAME) {
                String name = p.currentName();
                JsonToken value = p.nextToken();
                if (name.equals("outage") && value == JsonToken.START_OBJECT) {
                    while (p.nextToken() == JsonToken.FIELD_NAME) {
                        String inner = p.currentName();
                        JsonToken v = p.nextToken();
                        if (inner.equals("active") && v.isBoolean()) {
                            out.put("outage_active", v == JsonToken.VALUE_TRUE);
                        }
                        p.skipChildren();
                    }
                } else if (value.isNumeric()) {
                    out.put(name, p.getDoubleValue());
                } else if (value == JsonToken.VALUE_STRING) {
                    out.put(name, p.getText());
                } else {
                    p.skipChildren();
                }
            }
        } catch (IOException e) {
            // A pose the service cannot read is listed with nulls.
        }
        return out;
    }

    private void health(Context ctx) {
        ctx.header("Cache-Control", "no-store");
        ctx.contentType("application/json");
        ctx.result(PoseJson.document(256, g -> {
            g.writeStartObject();
            g.writeStringField("status", "ok");
            // No journal here: nothing is refused for want of a device, and no vehicle is quarantined.
            g.writeBooleanField("ready", true);
            g.writeArrayFieldStart("problems");
            g.writeEndArray();
            g.writeNumberField("sessions", board.size());
            g.writeNumberField("streams", streams.openCount());
            g.writeNumberField("uptime_s", Math.round((System.nanoTime() - startedNanos) / 1e6) / 1e3);
            g.writeArrayFieldStart("quarantined");
            g.writeEndArray();
            g.writeObjectFieldStart("poses_from");
            g.writeStringField("source", source);
            g.writeNumberField("poses_read", board.posesRead());
            g.writeBooleanField("caught_up", board.isCaughtUp());
            g.writeEndObject();
            g.writeEndObject();
        }));
    }

    private static byte[] readOpenApi() {
        try (InputStream in = HttpService.class.getResourceAsStream("openapi.yaml")) {
            if (in == null) {
                throw new IllegalStateException("openapi.yaml: missing from the classpath at org/wayhold/http/");
            }
            return in.readAllBytes();
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /** Pose streams open now (count). */
    int streamsOpen() {
        return streams.openCount();
    }

    /** Binds and starts serving; returns this. */
    public BoardService start() {
        app.start();
        return this;
    }

    public int port() {
        return app.port();
    }

    /** {@code http://host:port} of the bound connector. */
    public String baseUrl() {
        return ServerWiring.baseUrl(server, port());
    }

    @Override
    public void close() {
        app.stop();
    }
}
