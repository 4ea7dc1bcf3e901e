package org.wayhold.http;

import com.fasterxml.jackson.core.JsonFactory;
import com.fasterxml.jackson.core.JsonGenerator;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.UncheckedIOException;
import org.wayhold.geo.Geodetic;
import org.wayhold.geo.ProjectedCrs;
import org.wayhold.pose.Pose;
import org.wayhold.session.Liveness;

/**
 * Writes poses as the contract's pose JSON.
 *
 * <p>Field names and units: {@code t} (s, vehicle clock), {@code lat}/{@code lon} (degrees WGS-84),
 * {@code alt} (m ellipsoidal), {@code east}/{@code north}/{@code up} (m in the session's ENU frame),
 * {@code heading_deg} (degrees clockwise from true north), {@code speed} (m/s), {@code yaw_rate} (rad/s,
 * counter-clockwise positive, gyro bias removed), {@code cov} {@code ee, en, nn} (m^2),
 * {@code ellipse95} {@code semi_major, semi_minor} (m) and {@code orientation_deg} (degrees clockwise
 * from true north, [0, 180)), {@code state} (wire name), {@code outage} {@code active, since (s or
 * null), seconds, meters}, {@code gyro_bias} (rad/s), {@code speed_scale} (unitless), {@code origin}
 * {@code lat, lon, alt} (null before the first fix). Additions beyond the contract's list:
 * {@code radius95} (m, the radius of the circle holding the position with 95% probability, computed from
 * {@code cov}; the alert limit is checked against it), {@code reasons} (codes of
 * {@link org.wayhold.filter.Reason}, empty when there is nothing to say), {@code heading_sigma_deg} (degrees, 1-sigma of the heading),
 * {@code last_fix_t} (s, vehicle clock, the last fix that corrected the estimate; null before one) and
 * {@code alert_limit} (m, the radius beyond which the state turns unreliable without a fix). In a
 * track requested with {@code crs}, {@code x} and {@code y} give the position in that CRS's units.
 * The latest pose and the stream's events end with the vehicle's liveness: {@code received_at} (UTC
 * epoch seconds of the service's clock when its latest accepted sample arrived; null when none has
 * arrived since the service restored the session) and {@code stale} (true once nothing has arrived for
 * longer than {@code outage.stale_after_s}); poses from the history have neither.
 *
 * <p>JSON has no NaN: a number that is not finite (for example the latitude before the first fix) is
 * written as {@code null}.
 */
public final class PoseJson {

    static final JsonFactory FACTORY = new JsonFactory();

    private PoseJson() {
    }

    /** Writes the content of one JSON document. */
    @FunctionalInterface
    public interface Content {
        void write(JsonGenerator g) throws IOException;
    }

    /**
     * One JSON document (UTF-8) in memory: every reply the service writes is built this way.
     *
     * @param sizeHint expected size (bytes), to size the buffer
     */
    public static byte[] document(int sizeHint, Content content) {
        ByteArrayOutputStream out = new ByteArrayOutputStream(sizeHint);
        try (JsonGenerator g = FACTORY.createGenerator(out)) {
            content.write(g);
        } catch (IOException e) {
            // A ByteArrayOutputStream does not fail; a generator error is a bug, not a client's fault.
            throw new UncheckedIOException(e);
        }
        return out.toByteArray();
    }

    /**
     * One pose as a JSON document (UTF-8): the body of {@code GET /pose}, and the value of a pose record
     * the stream worker writes, so both carry the same fields.
     */
    public static byte[] toBytes(Pose p) {
        return document(768, g -> write(g, p, null));
    }

    /** The vehicle's latest pose with its liveness, as a JSON document (UTF-8). */
    static byte[] toBytes(Pose p, Liveness live) {
        return document(800, g -> write(g, p, null, live));
    }

    /**
     * Writes one pose object.
     *
     * @param crs when not null, adds {@code x} and {@code y} projected into it (null when the pose has no
     *            position yet)
     */
    static void write(JsonGenerator g, Pose p, ProjectedCrs crs) throws IOException {
        write(g, p, crs, null);
    }

    /**
     * Writes one pose object, followed by the vehicle's liveness when {@code live} is not null.
     *
     * @param crs when not null, adds {@code x} and {@code y} projected into it
     */
    static void write(JsonGenerator g, Pose p, ProjectedCrs crs, Liveness live) throws IOException {
        g.writeStartObject();
        number(g, "t", p.t());
        number(g, "lat", p.latDeg());
        number(g, "lon", p.lonDeg());
        number(g, "alt", p.altM());
        number(g, "east", p.eastM());
        number(g, "north", p.northM());
        number(g, "up", p.upM());
        if (crs != null) {
            double[] xy = projectOrNull(crs, p);
            number(g, "x", xy == null ? Double.NaN : xy[0]);
            number(g, "y", xy == null ? Double.NaN : xy[1]);
        }
        number(g, "heading_deg", p.headingDeg());
        number(g, "heading_sigma_deg", p.headingSigmaDeg());
        number(g, "speed", p.speedMps());
        number(g, "yaw_rate", p.yawRateRadPerS());
        g.writeObjectFieldStart("cov");
        number(g, "ee", p.covEastEastM2());
        number(g, "en", p.covEastNorthM2());
        number(g, "nn", p.covNorthNorthM2());
        g.writeEndObject();
        g.writeObjectFieldStart("ellipse95");
        number(g, "semi_major", p.ellipse95().semiMajorM());
        number(g, "semi_minor", p.ellipse95().semiMinorM());
        number(g, "orientation_deg", p.ellipse95().orientationDeg());
        g.writeEndObject();
        number(g, "radius95", p.radius95M());
        g.writeStringField("state", p.state().wireName());
        g.writeArrayFieldStart("reasons");
        for (org.wayhold.filter.Reason r : p.reasonList()) {
            g.writeString(r.wireName());
        }
        g.writeEndArray();
        g.writeObjectFieldStart("outage");
        g.writeBooleanField("active", p.outage().active());
        number(g, "since", p.outage().active() ? p.outage().sinceT() : Double.NaN);
        number(g, "seconds", p.outage().seconds());
        number(g, "meters", p.outage().meters());
        g.writeEndObject();
        number(g, "gyro_bias", p.gyroBiasRadPerS());
        number(g, "speed_scale", p.speedScale());
        number(g, "last_fix_t", p.lastFixT());
        number(g, "alert_limit", p.alertLimitM());
        Geodetic o = p.origin();
        if (o == null) {
            g.writeNullField("origin");
        } else {
            g.writeObjectFieldStart("origin");
            number(g, "lat", o.latDeg());
            number(g, "lon", o.lonDeg());
            number(g, "alt", o.altM());
            g.writeEndObject();
        }
        if (live != null) {
            liveness(g, live);
        }
        g.writeEndObject();
    }

    /** The fields {@code received_at} (s, UTC epoch, null when unknown) and {@code stale}. */
    static void liveness(JsonGenerator g, Liveness live) throws IOException {
        number(g, "received_at", live.receivedAtS());
        g.writeBooleanField("stale", live.stale());
    }

    /**
     * A pose's JSON as another process wrote it ({@link #toBytes(Pose)}) with the vehicle's liveness
     * added at its end, as {@link #toBytes(Pose, Liveness)} writes it. Anything that is not a JSON object
     * is returned as it is.
     */
    static byte[] withLiveness(byte[] poseJson, Liveness live) {
        int end = poseJson.length - 1;
        while (end >= 0 && Character.isWhitespace(poseJson[end])) {
            end--;
        }
        int start = 0;
        while (start < end && Character.isWhitespace(poseJson[start])) {
            start++;
        }
        if (end <= start || poseJson[start] != '{' || poseJson[end] != '}') {
            return poseJson;
        }
        boolean empty = true;
        for (int i = start + 1; i < end && empty; i++) {
            empty = Character.isWhitespace(poseJson[i]);
        }
        // {"received_at":...,"stale":...}: its fields follow the pose's.
        byte[] fields = document(64, g -> {
            g.writeStartObject();
            liveness(g, live);
            g.writeEndObject();
        });
        ByteArrayOutputStream out = new ByteArrayOutputStream(end + fields.length + 1);
        out.write(poseJson, 0, end);
        if (!empty) {
            out.write(',');
        }
        out.write(fields, 1, fields.length - 1);
        return out.toByteArray();
    }

    /** {x, y} of the pose in the CRS, or null when the pose has no valid position yet. */
    static double[] projectOrNull(ProjectedCrs crs, Pose p) {
        if (!hasPosition(p)) {
            return null;
        }
        return crs.project(p.latDeg(), p.lonDeg());
    }

    static boolean hasPosition(Pose p) {
        return Double.isFinite(p.latDeg()) && Double.isFinite(p.lonDeg());
    }

    /**
     * A number as text the way {@link #value} writes it (plain decimal for epoch times), or the empty
     * string when it is not finite: for headers.
     */
    static String plain(double v) {
        if (!Double.isFinite(v)) {
            return "";
        }
        if (Math.abs(v) >= 1e7 && Math.abs(v) < 1e21) {
            return new java.math.BigDecimal(Double.toString(v)).toPlainString();
        }
        return Double.toString(v);
    }

    /** A number, or null when it is not finite (JSON has no NaN or infinity). */
    public static void number(JsonGenerator g, String name, double value) throws IOException {
        g.writeFieldName(name);
        value(g, value);
    }

    /**
     * One number. Epoch times such as 1.8e9 s would come out of {@link Double#toString} in exponent form
     * ({@code 1.80000365898E9}); valid JSON, but hard to read in a terminal, so numbers from 1e7 up are
     * written in plain decimal with the same shortest digits (exactly the same double when parsed).
     */
    static void value(JsonGenerator g, double value) throws IOException {
        if (!Double.isFinite(value)) {
            g.writeNull();
        } else if (Math.abs(value) >= 1e7 && Math.abs(value) < 1e21) {
            g.writeNumber(new java.math.BigDecimal(Double.toString(value)).toPlainString());
        } else {
            g.writeNumber(value);
        }
    }
}
