package org.wayhold.http;

import com.fasterxml.jackson.core.JsonGenerator;
import io.javalin.Javalin;
import io.javalin.config.JavalinConfig;
import io.javalin.http.Context;
import io.javalin.router.Endpoint;
import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Optional;
import org.wayhold.journal.Journal;
import org.wayhold.journal.SessionJournal;
import org.wayhold.session.SessionRegistry;
import org.wayhold.session.VehicleSession;
import org.wayhold.settings.IngestSettings;
import org.wayhold.settings.ServerSettings;

/**
 * The HTTP service: every route of the contract, wired here in one place as plain lambdas that call
 * small handler classes ({@link VehicleRoutes}, {@link SampleIngest}, {@link PoseStreams}).
 *
 * <p>Lifecycle: {@link #start()} binds {@code server.bind}:{@code server.port} (port 0 picks a free
 * port). {@link #stop()} is graceful: pose streams are ended cleanly first, then the connector stops
 * accepting and requests in flight get up to {@link #STOP_TIMEOUT_MS} to finish.
 */
public final class HttpService implements AutoCloseable {

    /** How long a graceful stop waits for requests in flight (ms). */
    static final long STOP_TIMEOUT_MS = 10_000;

    private final ServerSettings server;
    private final SessionRegistry sessions;
    private final Optional<SessionJournal> journal;
    private final PoseStreams streams;
    private final ServiceMetrics metrics;
    private final byte[] openApiYaml;
    private final BearerTokens tokens;
    private final IngestRate rate;
    private final IdempotentReplies replies;
    private final UploadSlots uploads;
    private final List<String> routes = Collections.synchronizedList(new ArrayList<>());
    private final Javalin app;
    private final long startedNanos = System.nanoTime();

    /**
     * @param sessions the vehicle sessions; their settings' {@code server} section configures this service
     */
    public HttpService(SessionRegistry sessions) {
        this(sessions, Optional.empty());
    }

    /**
     * A service whose sessions are kept in a journal: writes are acknowledged once durable, and
     * {@code /health} shows the journal's state and what the last start recovered.
     */
    public HttpService(SessionJournal journal) {
        this(journal.sessions(), Optional.of(journal));
    }

    private HttpService(SessionRegistry sessions, Optional<SessionJournal> journal) {
        this.server = sessions.settings().server();
        this.sessions = sessions;
        this.journal = journal;
        this.streams = new PoseStreams(server.sseKeepAliveS(), server.maxStreams(),
                sessions.settings().outage().staleAfterS());
        this.metrics = new ServiceMetrics(sessions, streams, journal);
        this.openApiYaml = readOpenApi();
        sessions.addRemovalListener(s -> streams.closeVehicle(s.vehicleId()));
        this.rate = new IngestRate(server.maxSamplesPerSecondPerVehicle(), server.rateBurstS(), System::nanoTime);
        sessions.addRemovalListener(s -> rate.forget(s.vehicleId()));
        this.tokens = new BearerTokens(server);
        IngestSettings ingestSettings = sessions.settings().ingest();
        this.replies = new IdempotentReplies(ingestSettings.idempotencyKeysPerVehicle(),
                ingestSettings.idempotencyTtlS(), ingestSettings.idempotencyMaxBytes(), System::currentTimeMillis);
        sessions.addRemovalListener(s -> replies.forgetVehicle(s.vehicleId()));
        SampleIngest.ReplyLog replyLog = SampleIngest.ReplyLog.NONE;
        if (journal.isPresent()) {
            SessionJournal j = journal.get();
            restoreReplies(j.recoveredReplies());
            replyLog = j::recordReply;
            j.keepRepliesFrom(replies::journaled);
        }
        this.uploads = new UploadSlots(server.maxConcurrentUploads());
        SampleIngest ingest = new SampleIngest(sessions, metrics, rate, uploads, replies, replyLog, System::nanoTime,
                System::currentTimeMillis);
        VehicleRoutes vehicles = new VehicleRoutes(sessions, ingest, streams);
        this.app = Javalin.create(config -> configure(config, vehicles));
    }

    /** Puts the replies the journal kept back in the store; one that cannot be read is left out. */
    private void restoreReplies(List<Journal.KeptReply> recovered) {
        for (Journal.KeptReply r : recovered) {
            try {
                IdempotentReplies.Stored s = IdempotentReplies.Stored.decode(r.reply());
                if (s.vehicleId().equals(r.vehicleId())) {
                    // Still held by its record (or by the snapshots after it): the next snapshot keeps it.
                    replies.put(s.withJournalSeq(r.seq()));
                }
            } catch (IOException e) {
                // Written by another version: a retry with its key is then served like a new request.
                org.slf4j.LoggerFactory.getLogger(HttpService.class).warn("journal: a kept reply of {} is"
                        + " unreadable and left out: {}", r.vehicleId(), e.getMessage());
            }
        }
    }

    /** Rate-limit buckets held (count): one per vehicle with a session. */
    int rateBuckets() {
        return rate.size();
    }

    /** Replies kept for retries (count). */
    int keptReplies() {
        return replies.size();
    }

    private void configure(JavalinConfig config, VehicleRoutes vehicles) {
        config.jetty.host = server.bind();
        config.jetty.port = server.port();
        ServerWiring.configure(config, server, streams, routes, List.of("ETag", VehicleRoutes.IDEMPOTENCY_REPLAYED,
                "Retry-After", VehicleRoutes.HELD_FROM, VehicleRoutes.HELD_TO, VehicleRoutes.TRUNCATED));
        config.requestLogger.http((ctx, ms) -> metrics.request(ctx.method().name(), routeOf(ctx),
                ctx.statusCode(), ms));

        ServerWiring.guard(config, server, uploads, tokens, path -> allowHeader(routes(), path));
        config.routes.post("/v1/vehicles/{vehicle}/samples", vehicles::postSamples);
        config.routes.get("/v1/vehicles/{vehicle}/pose", vehicles::getPose);
        config.routes.get("/v1/vehicles/{vehicle}/track", vehicles::getTrack);
        config.routes.get("/v1/vehicles/{vehicle}/fixes", vehicles::getFixes);
        config.routes.get("/v1/vehicles/{vehicle}/stream", vehicles::stream);
        config.routes.delete("/v1/vehicles/{vehicle}", vehicles::delete);
        config.routes.get("/v1/vehicles", vehicles::list);
        config.routes.get("/health", this::health);
        config.routes.get("/health/live", this::live);
        config.routes.get("/metrics", ctx -> ctx.contentType("text/plain; version=0.0.4; charset=utf-8")
                .result(metrics.scrape()));
        config.routes.get("/openapi.yaml", ctx -> ctx.contentType("application/yaml").result(openApiYaml));
    }

    /**
     * Readiness, and an admin view: 200 while the service takes writes, 503 while the journal cannot
     * write (samples would be refused). {@code status} is {@code ok}, or {@code degraded} when anything
     * needs attention, listed in {@code problems}: {@code journal_not_writable}, {@code journal_records_lost}
     * (the last start could not restore some acknowledged records; which ones is under
     * {@code journal.recovery.lost}), {@code vehicles_quarantined} (listed under {@code quarantined}),
     * {@code snapshot_failing}. A degraded service that is ready still answers 200: it serves, but a
     * person should look.
     */
    private void health(Context ctx) {
        ctx.header("Cache-Control", "no-store");
        ctx.contentType("application/json");
        Optional<SessionJournal.Status> j = journal.map(SessionJournal::status);
        List<VehicleSession> quarantined = new ArrayList<>();
        for (VehicleSession s : sessions.sessions()) {
            if (s.quarantineReason().isPresent()) {
                quarantined.add(s);
            }
        }
        List<String> problems = new ArrayList<>();
        boolean ready = j.map(SessionJournal.Status::writable).orElse(true);
        if (!ready) {
            problems.add("journal_not_writable");
        }
        if (j.isPresent() && !j.get().recovery().lost().isEmpty()) {
            problems.add("journal_records_lost");
        }
        if (!quarantined.isEmpty()) {
            problems.add("vehicles_quarantined");
        }
        if (j.isPresent() && j.get().lastSnapshotError() != null) {
            problems.add("snapshot_failing");
        }
        byte[] json = PoseJson.document(256, g -> {
            g.writeStartObject();
            g.writeStringField("status", problems.isEmpty() ? "ok" : "degraded");
            g.writeBooleanField("ready", ready);
            g.writeArrayFieldStart("problems");
            for (String p : problems) {
                g.writeString(p);
            }
            g.writeEndArray();
            g.writeNumberField("sessions", sessions.size());
            g.writeNumberField("streams", streams.openCount());
            g.writeNumberField("uptime_s", uptimeS());
            g.writeArrayFieldStart("quarantined");
            for (VehicleSession s : quarantined) {
                g.writeStartObject();
                g.writeStringField("vehicle", s.vehicleId());
                g.writeStringField("reason", s.quarantineReason().orElse(""));
                g.writeEndObject();
            }
            g.writeEndArray();
            if (j.isPresent()) {
                writeJournal(g, j.get());
            }
            g.writeEndObject();
        });
        ctx.status(ready ? 200 : 503).result(json);
    }

    /** Liveness: 200 whenever the process answers, whatever the journal's state (restarting cannot help it). */
    private void live(Context ctx) {
        ctx.header("Cache-Control", "no-store");
        ctx.contentType("application/json");
        ctx.result(PoseJson.document(64, g -> {
            g.writeStartObject();
            g.writeStringField("status", "ok");
            g.writeNumberField("uptime_s", uptimeS());
            g.writeEndObject();
        }));
    }

    private double uptimeS() {
        return Math.round((System.nanoTime() - startedNanos) / 1e6) / 1e3;
    }

    private static void writeJournal(JsonGenerator g, SessionJournal.Status s) throws IOException {
        Journal.RecoveryReport r = s.recovery();
        g.writeObjectFieldStart("journal");
        g.writeBooleanField("writable", s.writable());
        g.writeStringField("failure", s.failure());
        PoseJson.number(g, "failed_for_s", s.failedForS());
        g.writeNumberField("write_failures", s.writeFailures());
        g.writeNumberField("next_seq", s.nextSeq());
        g.writeNumberField("snapshots_written", s.snapshotsWritten());
        g.writeNumberField("snapshot_failures", s.snapshotFailures());
        PoseJson.number(g, "last_snapshot_age_s", s.lastSnapshotAgeS());
        g.writeStringField("last_snapshot_error", s.lastSnapshotError());
        g.writeObjectFieldStart("recovery");
        g.writeNumberField("sessions_from_snapshot", r.sessionsFromSnapshot());
        g.writeNumberField("snapshot_floor_seq", r.snapshotFloorSeq());
        g.writeNumberField("records_replayed", r.recordsReplayed());
        g.writeNumberField("samples_replayed", r.samplesReplayed());
        g.writeNumberField("records_skipped", r.recordsSkipped());
        g.writeNumberField("bytes_cut", r.bytesCut());
        g.writeNumberField("damaged_bytes", r.damagedBytes());
        g.writeArrayFieldStart("lost");
        for (Journal.Loss loss : r.lost()) {
            g.writeStartObject();
            g.writeNumberField("from_seq", loss.fromSeq());
            if (loss.toKnown()) {
                g.writeNumberField("to_seq", loss.toSeq());
            } else {
                g.writeNullField("to_seq");
            }
            g.writeStringField("cause", loss.cause());
            g.writeEndObject();
        }
        g.writeEndArray();
        g.writeArrayFieldStart("notes");
        for (String note : r.notes()) {
            g.writeString(note);
        }
        g.writeEndArray();
        g.writeEndObject();
        g.writeEndObject();
    }

    /**
     * The methods registered for a path, as an {@code Allow} value: each route template's
     * {@code {param}} matches one path segment. {@code HEAD} is listed beside {@code GET}, which
     * answers it (RFC 9110 sec. 9.3.2).
     */
    static String allowHeader(List<String> routes, String path) {
        java.util.Set<String> methods = new java.util.LinkedHashSet<>();
        for (String route : routes) {
            String[] parts = route.split(" ", 2);
            String regex = java.util.Arrays.stream(parts[1].split("/", -1))
                    .map(seg -> seg.startsWith("{") && seg.endsWith("}") ? "[^/]+" : java.util.regex.Pattern.quote(seg))
                    .collect(java.util.stream.Collectors.joining("/"));
            if (path.matches(regex)) {
                methods.add(parts[0]);
                if (parts[0].equals("GET")) {
                    methods.add("HEAD");
                }
            }
        }
        return String.join(", ", methods);
    }

    /** The matched route template for metric labels; never the raw path (unbounded label values). */
    private static String routeOf(Context ctx) {
        try {
            Endpoint e = ctx.endpoints().lastHttpEndpoint();
            return e == null ? "unmatched" : e.path;
        } catch (RuntimeException e) {
            return "unmatched";
        }
    }

    private static byte[] readOpenApi() {
        try (InputStream in = HttpService.class.getResourceAsStream("openapi.yaml")) {
            if (in == null) {
                throw new IllegalStateException("openapi.yaml: missing from the classpath at org/wayhold/http/;"
                        + " the build copies it from the top-level openapi.yaml");
            }
            return in.readAllBytes();
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /** Binds and starts serving; returns this. */
    public HttpService start() {
        app.start();
        return this;
    }

    /** The bound port (the chosen one when the settings asked for port 0). */
    public int port() {
        return app.port();
    }

    /** {@code http://host:port} of the bound connector. */
    public String baseUrl() {
        return ServerWiring.baseUrl(server, port());
    }

    /** Every registered route as {@code "METHOD /path/{param}"}, in registration order. */
    public List<String> routes() {
        synchronized (routes) {
            return List.copyOf(routes);
        }
    }

    /** Graceful stop: ends pose streams, stops accepting, lets requests in flight finish. */
    public void stop() {
        app.stop();
        metrics.close();
    }

    @Override
    public void close() {
        stop();
    }
}
