package org.wayhold.tracks;

import com.fasterxml.jackson.core.JsonEncoding;
import com.fasterxml.jackson.core.JsonFactory;
import com.fasterxml.jackson.core.JsonGenerator;
import java.io.BufferedOutputStream;
import java.io.IOException;
import java.io.OutputStream;
import java.math.BigDecimal;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import org.wayhold.fusion.FusedDrive;
import org.wayhold.fusion.FusedPoint;

/**
 * Writes a fused drive as a GeoJSON FeatureCollection (RFC 7946), streamed so a long drive needs no
 * tree in memory:
 * <ul>
 *   <li>per estimate ({@code forward}, and {@code smoothed} when smoothed) one line feature: a
 *       LineString, or a MultiLineString cut at the antimeridian when the track crosses it (RFC 7946
 *       sec. 3.1.9: two consecutive positions whose longitudes differ by more than 180 degrees are
 *       taken to cross it, and the line is split between them); a track of fewer than two placed
 *       points has no line;</li>
 *   <li>one Point feature per placed point with its values as properties: time, ENU position,
 *       heading, covariance, 95% ellipse and radius, state, reasons and whether it lies in a gap.</li>
 * </ul>
 * Positions are [longitude, latitude, ellipsoidal height] in WGS-84 (RFC 7946 sec. 3.1.1 and 4; no
 * {@code crs} member), longitude and latitude to 1e-9 degree. Points without a geodetic position (no
 * fix yet) are left out; the CSV keeps them.
 */
public final class TrackGeoJson {

    private static final JsonFactory JSON = new JsonFactory();

    private TrackGeoJson() {
    }

    public static void write(FusedDrive drive, Path file) throws IOException {
        try (OutputStream out = new BufferedOutputStream(Files.newOutputStream(file), 1 << 16);
             JsonGenerator g = JSON.createGenerator(out, JsonEncoding.UTF8)) {
            g.writeStartObject();
            g.writeStringField("type", "FeatureCollection");
            g.writeArrayFieldStart("features");
            line(g, drive, "forward", drive.forward());
            if (!drive.smoothed().isEmpty()) {
                line(g, drive, "smoothed", drive.smoothed());
            }
            points(g, drive, "forward", drive.forward());
            points(g, drive, "smoothed", drive.smoothed());
            g.writeEndArray();
            g.writeEndObject();
        }
    }

    private static void line(JsonGenerator g, FusedDrive drive, String estimate, List<FusedPoint> points)
            throws IOException {
        List<List<FusedPoint>> parts = cutAtAntimeridian(points);
        if (parts.isEmpty()) {
            return;
        }
        g.writeStartObject();
        g.writeStringField("type", "Feature");
        g.writeObjectFieldStart("geometry");
        if (parts.size() == 1) {
            g.writeStringField("type", "LineString");
            g.writeFieldName("coordinates");
            positions(g, parts.get(0));
        } else {
            g.writeStringField("type", "MultiLineString");
            g.writeArrayFieldStart("coordinates");
            for (List<FusedPoint> part : parts) {
                positions(g, part);
            }
            g.writeEndArray();
        }
        g.writeEndObject();
        g.writeObjectFieldStart("properties");
        g.writeStringField("log", drive.name());
        g.writeStringField("estimate", estimate);
        g.writeStringField("kind", "track");
        g.writeNumberField("points", points.size());
        number(g, "start_t", points.get(0).t(), 3);
        number(g, "end_t", points.get(points.size() - 1).t(), 3);
        g.writeEndObject();
        g.writeEndObject();
    }

    private static void points(JsonGenerator g, FusedDrive drive, String estimate, List<FusedPoint> points)
            throws IOException {
        for (FusedPoint p : points) {
            if (!p.placed()) {
                continue;
            }
            g.writeStartObject();
            g.writeStringField("type", "Feature");
            g.writeObjectFieldStart("geometry");
            g.writeStringField("type", "Point");
            g.writeFieldName("coordinates");
            position(g, p);
            g.writeEndObject();
            g.writeObjectFieldStart("properties");
            g.writeStringField("log", drive.name());
            g.writeStringField("estimate", estimate);
            g.writeStringField("kind", "point");
            number(g, "t", p.t(), 3);
            g.writeStringField("time", TrackValues.utc(p.t()));
            number(g, "east_m", p.eastM(), TrackValues.M_DECIMALS);
            number(g, "north_m", p.northM(), TrackValues.M_DECIMALS);
            number(g, "up_m", p.upM(), TrackValues.M_DECIMALS);
            number(g, "heading_deg", p.headingDeg(), 4);
            number(g, "heading_sigma_deg", p.headingSigmaDeg(), 4);
            number(g, "speed_mps", p.speedMps(), 4);
            g.writeObjectFieldStart("cov_m2");
            number(g, "ee", p.covEastEastM2(), 6);
            number(g, "en", p.covEastNorthM2(), 6);
            number(g, "nn", p.covNorthNorthM2(), 6);
            g.writeEndObject();
            g.writeObjectFieldStart("ellipse95");
            number(g, "semi_major_m", p.ellipse95().semiMajorM(), TrackValues.M_DECIMALS);
            number(g, "semi_minor_m", p.ellipse95().semiMinorM(), TrackValues.M_DECIMALS);
            number(g, "orientation_deg", p.ellipse95().orientationDeg(), 4);
            g.writeEndObject();
            number(g, "radius95_m", p.radius95M(), TrackValues.M_DECIMALS);
            g.writeStringField("state", p.state().wireName());
            g.writeArrayFieldStart("reasons");
            for (String r : TrackValues.reasons(p)) {
                g.writeString(r);
            }
            g.writeEndArray();
            g.writeBooleanField("in_gap", p.inGap());
            g.writeEndObject();
            g.writeEndObject();
        }
    }

    /** The placed points in runs that do not cross the antimeridian; runs of fewer than two are dropped. */
    static List<List<FusedPoint>> cutAtAntimeridian(List<FusedPoint> points) {
        List<List<FusedPoint>> parts = new ArrayList<>();
        List<FusedPoint> current = new ArrayList<>();
        FusedPoint last = null;
        for (FusedPoint p : points) {
            if (!p.placed()) {
                continue;
            }
            if (last != null && Math.abs(p.lonDeg() - last.lonDeg()) > 180.0) {
                parts.add(current);
                current = new ArrayList<>();
            }
            current.add(p);
            last = p;
        }
        parts.add(current);
        parts.removeIf(part -> part.size() < 2);
        return parts;
    }

    private static void positions(JsonGenerator g, List<FusedPoint> points) throws IOException {
        g.writeStartArray();
        for (FusedPoint p : points) {
            position(g, p);
        }
        g.writeEndArray();
    }

    private static void position(JsonGenerator g, FusedPoint p) throws IOException {
        g.writeStartArray();
        g.writeNumber(TrackValues.decimal(p.lonDeg(), TrackValues.DEG_DECIMALS));
        g.writeNumber(TrackValues.decimal(p.latDeg(), TrackValues.DEG_DECIMALS));
        BigDecimal h = TrackValues.decimal(p.heightM(), 3);
        if (h != null) {
            g.writeNumber(h);
        }
        g.writeEndArray();
    }

    private static void number(JsonGenerator g, String name, double v, int decimals) throws IOException {
        BigDecimal d = TrackValues.decimal(v, decimals);
        if (d == null) {
            g.writeNullField(name);
        } else {
            g.writeNumberField(name, d);
        }
    }
}
