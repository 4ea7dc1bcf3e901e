package org.wayhold.http;

import com.fasterxml.jackson.core.JsonGenerator;
import io.javalin.http.Context;
import java.io.IOException;
import java.util.List;
import java.util.Optional;
import java.util.concurrent.ConcurrentHashMap;
import java.util.regex.Pattern;
import org.wayhold.filter.FilterCounter;
import org.wayhold.filter.FilterCounts;
import org.wayhold.geo.ProjectedCrs;
import org.wayhold.pose.Pose;
import org.wayhold.pipeline.FixRecord;
import org.wayhold.session.Liveness;
import org.wayhold.session.SessionRegistry;
import org.wayhold.session.SessionStats;
import org.wayhold.session.VehicleSession;

/**
 * Handlers of the {@code /v1/vehicles} routes. They read the request, call the session layer and write
 * JSON; nothing below this class sees a {@link Context}.
 */
final class VehicleRoutes {

    /**
     * Vehicle ids: letters, digits, {@code . _ : -}, starting with a letter or digit, at most
     * {@code server.max_vehicle_id_chars} characters (64 by default). Enough for fleet numbers, plates and
     * UUIDs, and safe in paths, logs, metric labels and file names.
     */
    static final Pattern VEHICLE_ID = Pattern.compile("[A-Za-z0-9][A-Za-z0-9._:-]*");

    /** {@code EPSG:} followed by a code of 4 or 5 digits (the EPSG dataset's range). */
    private static final Pattern EPSG = Pattern.compile("(?i)EPSG:(\\d{4,5})");

    static final String GEOJSON = "application/geo+json";

    /** Oldest pose time the vehicle's history holds (s, vehicle clock; absent when none is held). */
    static final String HELD_FROM = "Track-Held-From";
    /** Newest pose time the history holds (s, vehicle clock; absent when none is held). */
    static final String HELD_TO = "Track-Held-To";
    /** {@code true} when the requested window starts before what the bounded history still holds. */
    static final String TRUNCATED = "Track-Truncated";

    private final SessionRegistry sessions;
    private final SampleIngest ingest;
    private final PoseStreams streams;
    private final int maxIdChars;

    /**
     * The latest pose's JSON per vehicle, tagged like its ETag: dashboards poll far more often than a
     * session changes, and writing the JSON (about twenty numbers to text) is most of a GET's own work.
     * One entry per held session, dropped with it.
     */
    private final ConcurrentHashMap<String, PoseBytes> latestJson = new ConcurrentHashMap<>();

    private record PoseBytes(long serial, long version, boolean stale, byte[] json) {
    }

    VehicleRoutes(SessionRegistry sessions, SampleIngest ingest, PoseStreams streams) {
        this.sessions = sessions;
        this.ingest = ingest;
        this.streams = streams;
        this.maxIdChars = sessions.settings().server().maxVehicleIdChars();
        sessions.addRemovalListener(s -> latestJson.remove(s.vehicleId()));
    }

    void postSamples(Context ctx) {
        String id = vehicleId(ctx);
        sessions.find(id).ifPresent(e -> refuseIfQuarantined(id, e.session()));
        SampleIngest.Format format = SampleIngest.formatOf(ctx.header("Content-Type"));
        SampleIngest.Encoding encoding = SampleIngest.encodingOf(ctx.header("Content-Encoding"));
        String key = idempotencyKey(ctx.header(IDEMPOTENCY_KEY));
        long length = ctx.req().getContentLengthLong();
        SampleIngest.Outcome outcome = ingest.ingest(new SampleIngest.Post(id, format, encoding, length,
                ctx.bodyInputStream(), key));
        if (outcome.replayed()) {
            ctx.header(IDEMPOTENCY_REPLAYED, "true");
        }
        ctx.contentType("application/json").result(outcome.json());
    }

    static final String IDEMPOTENCY_KEY = "Idempotency-Key";
    static final String IDEMPOTENCY_REPLAYED = "Idempotency-Replayed";
    /** Longest idempotency key (characters): a UUID is 36, so 255 leaves room for any scheme. */
    static final int MAX_IDEMPOTENCY_KEY_CHARS = 255;

    /**
     * The key of an {@code Idempotency-Key} header, or null when there is none: 1 to 255 visible ASCII
     * characters, optionally in double quotes (the header is a Structured Field string in the IETF
     * httpapi draft; many clients send the bare value).
     */
    static String idempotencyKey(String header) {
        if (header == null) {
            return null;
        }
        String key = header.strip();
        if (key.length() >= 2 && key.startsWith("\"") && key.endsWith("\"")) {
            key = key.substring(1, key.length() - 1);
        }
        boolean visible = !key.isEmpty() && key.length() <= MAX_IDEMPOTENCY_KEY_CHARS
                && key.chars().allMatch(c -> c > 0x20 && c < 0x7f && c != '"');
        if (!visible) {
            throw HttpProblem.invalidParameter(IDEMPOTENCY_KEY, "must be 1 to " + MAX_IDEMPOTENCY_KEY_CHARS
                    + " visible ASCII characters (a UUID, say), was '" + clip(header) + "'");
        }
        return key;
    }

    void getPose(Context ctx) {
        String id = vehicleId(ctx);
        SessionRegistry.Entry entry = entry(id);
        VehicleSession session = entry.session();
        String atText = ctx.queryParam("at");
        if (atText != null) {
            double at = finiteNumber("at", atText);
            Pose p = session.at(at).orElseThrow(() -> HttpProblem.noPose("at",
                    "no pose of '" + id + "' at or before " + atText + " s in the history"));
            ctx.contentType("application/json").result(PoseJson.toBytes(p));
            return;
        }
        // Version first, pose second: a pose newer than its tag only costs one extra transfer later,
        // while the other order could pin an old pose to a new tag and hide an update. The cached JSON
        // follows the same rule: bytes filed under a version hold that version's pose or a newer one.
        long version = session.version();
        if (session.latest().isEmpty()) {
            throw HttpProblem.noPose("vehicle", "'" + id + "' has no pose yet");
        }
        // Staleness changes with the wall clock alone, without a new pose: it is part of the tag, so a
        // poll with the old tag learns that the vehicle has turned stale (or fresh) at once.
        Liveness live = session.liveness();
        String etag = "\"" + entry.serial() + "-" + version + (live.stale() ? "-stale" : "") + "\"";
        ctx.header("ETag", etag);
        ctx.header("Cache-Control", "no-cache");
        if (matches(ctx.header("If-None-Match"), etag)) {
            ctx.status(304);
            return;
        }
        PoseBytes cached = latestJson.get(id);
        byte[] json;
        if (cached != null && cached.serial() == entry.serial() && cached.version() == version
                && cached.stale() == live.stale()) {
            json = cached.json();
        } else {
            json = PoseJson.toBytes(session.latest().orElseThrow(), live);
            // Filed only while the session is held. A DELETE racing this GET can still leave an entry
            // behind; it carries the old serial, so it is never served, and the id's next session
            // replaces it.
            if (sessions.find(id).filter(e -> e.serial() == entry.serial()).isPresent()) {
                latestJson.put(id, new PoseBytes(entry.serial(), version, live.stale(), json));
            }
        }
        ctx.contentType("application/json").result(json);
    }

    /** RFC 9110 sec. 13.1.2: If-None-Match uses the weak comparison; {@code *} matches any current pose. */
    static boolean matches(String ifNoneMatch, String etag) {
        if (ifNoneMatch == null) {
            return false;
        }
        for (String candidate : ifNoneMatch.split(",")) {
            String c = candidate.strip();
            if (c.equals("*")) {
                return true;
            }
            if (c.startsWith("W/")) {
                c = c.substring(2);
            }
            if (c.equals(etag)) {
                return true;
            }
        }
        return false;
    }

    /** A query's time window (s, vehicle clock); open-ended sides are infinite. */
    private record TimeWindow(double fromS, double toS) {
    }

    /** The optional {@code from} and {@code to} query values (s, vehicle clock), open-ended when absent. */
    private static TimeWindow timeWindow(Context ctx) {
        String fromText = ctx.queryParam("from");
        String toText = ctx.queryParam("to");
        double from = fromText == null ? Double.NEGATIVE_INFINITY : finiteNumber("from", fromText);
        double to = toText == null ? Double.POSITIVE_INFINITY : finiteNumber("to", toText);
        if (from > to) {
            throw HttpProblem.invalidParameter("to", "must not be before from (" + fromText + " s), was "
                    + toText + " s");
        }
        return new TimeWindow(from, to);
    }

    void getTrack(Context ctx) {
        String id = vehicleId(ctx);
        VehicleSession session = entry(id).session();
        TimeWindow window = timeWindow(ctx);
        String format = ctx.queryParam("format");
        boolean geojson;
        if (format == null || format.equals("json")) {
            geojson = false;
        } else if (format.equals("geojson")) {
            geojson = true;
        } else {
            throw HttpProblem.invalidParameter("format", "must be json or geojson, was '" + format + "'");
        }
        ProjectedCrs crs = crs(ctx.queryParam("crs"));
        VehicleSession.HeldSpan held = session.held();
        List<Pose> poses = session.track(window.fromS(), window.toS());
        TrackJson.Held span = TrackJson.Held.of(held, window.fromS());
        // The history is bounded: a window reaching back past what it holds gets what is held, and
        // says so, in the headers for either format and in the JSON body.
        if (!Double.isNaN(held.fromT())) {
            ctx.header(HELD_FROM, PoseJson.plain(held.fromT()));
            ctx.header(HELD_TO, PoseJson.plain(held.toT()));
        }
        ctx.header(TRUNCATED, Boolean.toString(span.truncated()));
        byte[] body = geojson ? TrackJson.geoJson(id, poses, crs) : TrackJson.json(id, poses, crs, span);
        ctx.contentType(geojson ? GEOJSON : "application/json").result(body);
    }

    /**
     * Fixes received in a window with the filter's decision on each: {@code outcome} is one of
     * initializing, accepted, reacquired, pending, gated, unusable; {@code nis} is the normalised
     * innovation squared (null when not computed); {@code sigma_h} the 1-sigma the filter assumed (m).
     */
    void getFixes(Context ctx) {
        String id = vehicleId(ctx);
        VehicleSession session = entry(id).session();
        TimeWindow window = timeWindow(ctx);
        byte[] json = PoseJson.document(4096, g -> {
            g.writeStartObject();
            g.writeStringField("vehicle", id);
            g.writeArrayFieldStart("fixes");
            for (FixRecord f : session.fixes(window.fromS(), window.toS())) {
                g.writeStartObject();
                PoseJson.number(g, "t", f.t());
                PoseJson.number(g, "lat", f.latDeg());
                PoseJson.number(g, "lon", f.lonDeg());
                PoseJson.number(g, "east", f.eastM());
                PoseJson.number(g, "north", f.northM());
                PoseJson.number(g, "sigma_h", f.sigmaHM());
                g.writeStringField("outcome", f.outcome().name().toLowerCase(java.util.Locale.ROOT));
                PoseJson.number(g, "nis", f.nis());
                g.writeEndObject();
            }
            g.writeEndArray();
            g.writeEndObject();
        });
        ctx.contentType("application/json").result(json);
    }

    static ProjectedCrs crs(String text) {
        if (text == null) {
            return null;
        }
        var m = EPSG.matcher(text.strip());
        if (!m.matches()) {
            throw HttpProblem.invalidParameter("crs", "must be EPSG:NNNN (a projected CRS such as EPSG:32632), was '"
                    + clip(text) + "'");
        }
        int code = Integer.parseInt(m.group(1));
        try {
            return ProjectedCrs.forEpsg(code);
        } catch (IllegalArgumentException e) {
            throw HttpProblem.invalidParameter("crs", "EPSG:" + code
                    + " is not a projected coordinate reference system known to this service");
        }
    }

    void stream(Context ctx) {
        String id = vehicleId(ctx);
        streams.start(ctx, id, entry(id).session());
    }

    void delete(Context ctx) {
        String id = vehicleId(ctx);
        boolean deleted;
        try {
            deleted = sessions.delete(id);
        } catch (IOException e) {
            throw HttpProblem.journalUnavailable();
        }
        if (!deleted) {
            throw HttpProblem.unknownVehicle(id);
        }
        ctx.status(204);
    }

    void list(Context ctx) {
        byte[] json = PoseJson.document(256, g -> {
            g.writeStartObject();
            g.writeArrayFieldStart("vehicles");
            for (VehicleSession s : sessions.sessions()) {
                Optional<Pose> latest = s.latest();
                g.writeStartObject();
                g.writeStringField("vehicle", s.vehicleId());
                Optional<String> quarantined = s.quarantineReason();
                SessionStats stats = s.stats();
                g.writeNumberField("samples", stats.wheelSpeedApplied() + stats.yawRateApplied() + stats.gnssApplied()
                        + stats.referenceApplied());
                filterEvents(g, stats.filter());
                if (quarantined.isPresent()) {
                    // Its state is not to be trusted: no pose, only that it is held apart and why.
                    g.writeStringField("quarantined", quarantined.get());
                }
                Liveness live = s.liveness();
                if (latest.isPresent() && quarantined.isEmpty()) {
                    Pose p = latest.get();
                    g.writeStringField("state", p.state().wireName());
                    PoseJson.number(g, "t", p.t());
                    PoseJson.number(g, "lat", p.latDeg());
                    PoseJson.number(g, "lon", p.lonDeg());
                    PoseJson.number(g, "radius95", p.radius95M());
                    PoseJson.number(g, "alert_limit", p.alertLimitM());
                    PoseJson.number(g, "last_fix_t", p.lastFixT());
                    g.writeBooleanField("outage_active", p.outage().active());
                } else {
                    g.writeNullField("state");
                    g.writeNullField("t");
                    g.writeNullField("lat");
                    g.writeNullField("lon");
                    g.writeNullField("radius95");
                    g.writeNullField("alert_limit");
                    g.writeNullField("last_fix_t");
                    g.writeBooleanField("outage_active", false);
                }
                PoseJson.liveness(g, live);
                g.writeEndObject();
            }
            g.writeEndArray();
            g.writeEndObject();
        });
        ctx.contentType("application/json").result(json);
    }

    /**
     * The vehicle's filter counts as {@code filter_events}, one member per {@link FilterCounter} under its
     * wire name, in the enum's order: the same names as the {@code event} label of
     * {@code wayhold_filter_events_total}. They are the counts of the vehicle's timeline as the service
     * holds it (restored with the session after a restart; a re-filtering after late samples may revise
     * them), also for a quarantined vehicle, whose counts stop where its state was set apart.
     */
    private static void filterEvents(JsonGenerator g, FilterCounts counts) throws IOException {
        g.writeObjectFieldStart("filter_events");
        for (FilterCounter c : FilterCounter.values()) {
            g.writeNumberField(c.wireName(), counts.get(c));
        }
        g.writeEndObject();
    }

    /** The vehicle's session; 404 when it has none, 503 when it is quarantined. */
    private SessionRegistry.Entry entry(String id) {
        SessionRegistry.Entry e = sessions.find(id).orElseThrow(() -> HttpProblem.unknownVehicle(id));
        refuseIfQuarantined(id, e.session());
        return e;
    }

    private static void refuseIfQuarantined(String id, VehicleSession session) {
        Optional<String> reason = session.quarantineReason();
        if (reason.isPresent()) {
            throw HttpProblem.vehicleQuarantined(id, reason.get());
        }
    }

    String vehicleId(Context ctx) {
        String id = ctx.pathParam("vehicle");
        if (id.length() > maxIdChars || !VEHICLE_ID.matcher(id).matches()) {
            throw HttpProblem.invalidParameter("vehicle", "must be 1 to " + maxIdChars
                    + " letters, digits or . _ : -, starting with a letter or digit (server.max_vehicle_id_chars), was '"
                    + clip(id) + "'" + (id.length() > maxIdChars ? " (" + id.length() + " characters)" : ""));
        }
        return id;
    }

    static double finiteNumber(String field, String text) {
        double v;
        try {
            v = Double.parseDouble(text.strip());
        } catch (NumberFormatException e) {
            throw HttpProblem.invalidParameter(field, "must be a number of seconds, was '" + clip(text) + "'");
        }
        if (!Double.isFinite(v)) {
            throw HttpProblem.invalidParameter(field, "must be a finite number of seconds, was '" + clip(text) + "'");
        }
        return v;
    }

    /** A client's text quoted back in a detail, cut so that a huge value cannot bloat the reply. */
    static String clip(String text) {
        return text.length() <= 64 ? text : text.substring(0, 64) + "...";
    }
}
