package org.wayhold.http;

import com.fasterxml.jackson.core.JsonGenerator;
import java.io.IOException;
import java.util.ArrayList;
import java.util.List;
import org.wayhold.geo.ProjectedCrs;
import org.wayhold.pose.Pose;
import org.wayhold.session.VehicleSession;

/**
 * A vehicle's track as JSON, or as GeoJSON (RFC 7946).
 *
 * <p>JSON: {@code {"vehicle", "crs" (when asked), "count", "held_from", "held_to", "truncated",
 * "poses": [pose...]}}; with a CRS every pose carries {@code x} and {@code y} in that CRS.
 * {@code held_from} and {@code held_to} are the oldest and newest pose times the vehicle's bounded
 * history holds (s, vehicle clock; null when it holds none), and {@code truncated} is true when the
 * requested window starts before {@code held_from} while the history is full, so poses the window asks
 * for have been let go.
 *
 * <p>GeoJSON: a FeatureCollection whose first feature is a LineString of the whole track (when it has
 * two or more positions; a MultiLineString cut at the antimeridian when the track crosses it, RFC 7946
 * sec. 3.1.9) and then one Point feature per pose, its properties the pose JSON. RFC 7946
 * sec. 3.1.1 and 4: positions are [longitude, latitude] in WGS-84 and there is no {@code crs} member,
 * so projected {@code x}, {@code y} appear only among the properties. A pose without a position yet
 * (before the first fix) has {@code "geometry": null}, which sec. 3.2 allows.
 */
final class TrackJson {

    private TrackJson() {
    }

    /**
     * What the history holds against what a request asked for.
     *
     * @param fromT     oldest pose held (s, vehicle clock), NaN when none
     * @param toT       newest pose held (s), NaN when none
     * @param truncated the request reached back past a full history
     */
    record Held(double fromT, double toT, boolean truncated) {

        static Held of(VehicleSession.HeldSpan span, double requestedFromT) {
            boolean before = !Double.isNaN(span.fromT()) && requestedFromT < span.fromT();
            return new Held(span.fromT(), span.toT(), before && span.full());
        }
    }

    static byte[] json(String vehicleId, List<Pose> poses, ProjectedCrs crs, Held held) {
        return PoseJson.document(256 + 700 * poses.size(), g -> {
            g.writeStartObject();
            g.writeStringField("vehicle", vehicleId);
            if (crs != null) {
                g.writeStringField("crs", crs.name());
            }
            g.writeNumberField("count", poses.size());
            PoseJson.number(g, "held_from", held.fromT());
            PoseJson.number(g, "held_to", held.toT());
            g.writeBooleanField("truncated", held.truncated());
            g.writeArrayFieldStart("poses");
            for (Pose p : poses) {
                PoseJson.write(g, p, crs);
            }
            g.writeEndArray();
            g.writeEndObject();
        });
    }

    static byte[] geoJson(String vehicleId, List<Pose> poses, ProjectedCrs crs) {
        return PoseJson.document(512 + 800 * poses.size(), g -> {
            g.writeStartObject();
            g.writeStringField("type", "FeatureCollection");
            g.writeArrayFieldStart("features");
            long positioned = poses.stream().filter(PoseJson::hasPosition).count();
            if (positioned >= 2) {
                g.writeStartObject();
                g.writeStringField("type", "Feature");
                g.writeObjectFieldStart("geometry");
                List<List<double[]>> parts = cutAtAntimeridian(poses);
                if (parts.size() == 1) {
                    g.writeStringField("type", "LineString");
                    g.writeFieldName("coordinates");
                    line(g, parts.get(0));
                } else {
                    g.writeStringField("type", "MultiLineString");
                    g.writeArrayFieldStart("coordinates");
                    for (List<double[]> part : parts) {
                        line(g, part);
                    }
                    g.writeEndArray();
                }
                g.writeEndObject();
                g.writeObjectFieldStart("properties");
                g.writeStringField("vehicle", vehicleId);
                g.writeStringField("kind", "track");
                PoseJson.number(g, "from", poses.get(0).t());
                PoseJson.number(g, "to", poses.get(poses.size() - 1).t());
                g.writeEndObject();
                g.writeEndObject();
            }
            for (Pose p : poses) {
                g.writeStartObject();
                g.writeStringField("type", "Feature");
                if (PoseJson.hasPosition(p)) {
                    g.writeObjectFieldStart("geometry");
                    g.writeStringField("type", "Point");
                    g.writeFieldName("coordinates");
                    position(g, p);
                    g.writeEndObject();
                } else {
                    g.writeNullField("geometry");
                }
                g.writeFieldName("properties");
                PoseJson.write(g, p, crs);
                g.writeEndObject();
            }
            g.writeEndArray();
            g.writeEndObject();
        });
    }

    /**
     * The track's positions as [longitude, latitude] pairs (degrees), cut where it crosses the
     * antimeridian, as RFC 7946 sec. 3.1.9 asks: "any geometry that crosses the antimeridian SHOULD be
     * represented by cutting it in two such that neither part's representation crosses the
     * antimeridian". Two consecutive positions whose longitudes differ by more than 180 degrees are
     * taken to cross it (a vehicle's track moves far less than half the globe between poses); the cut
     * ends one part at longitude 180 (or -180) and starts the next at the opposite one, both at the
     * latitude interpolated linearly in longitude, as the RFC's example does.
     */
    static List<List<double[]>> cutAtAntimeridian(List<Pose> poses) {
        List<List<double[]>> parts = new ArrayList<>();
        List<double[]> part = new ArrayList<>();
        double[] previous = null;
        for (Pose p : poses) {
            if (!PoseJson.hasPosition(p)) {
                continue;
            }
            double[] here = {p.lonDeg(), p.latDeg()};
            if (previous != null && Math.abs(here[0] - previous[0]) > 180.0) {
                // Going east over 180 (here lies west of -180 + ...) or west over -180.
                double side = previous[0] > 0.0 ? 180.0 : -180.0;
                double unwrappedLon = here[0] + 2.0 * side;
                double f = (side - previous[0]) / (unwrappedLon - previous[0]);
                double crossingLat = previous[1] + f * (here[1] - previous[1]);
                part.add(new double[] {side, crossingLat});
                parts.add(part);
                part = new ArrayList<>();
                part.add(new double[] {-side, crossingLat});
            }
            part.add(here);
            previous = here;
        }
        parts.add(part);
        return parts;
    }

    private static void line(JsonGenerator g, List<double[]> positions) throws IOException {
        g.writeStartArray();
        for (double[] lonLat : positions) {
            g.writeStartArray();
            g.writeNumber(lonLat[0]);
            g.writeNumber(lonLat[1]);
            g.writeEndArray();
        }
        g.writeEndArray();
    }

    /** RFC 7946 sec. 3.1.1: longitude first, then latitude (degrees). */
    private static void position(JsonGenerator g, Pose p) throws IOException {
        g.writeStartArray();
        g.writeNumber(p.lonDeg());
        g.writeNumber(p.latDeg());
        g.writeEndArray();
    }
}
