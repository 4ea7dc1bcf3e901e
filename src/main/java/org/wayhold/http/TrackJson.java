package org.wayhold.http;

import com.fasterxml.jackson.core.JsonGenerator;
import java.io.IOException;
import java.util.List;
import org.wayhold.geo.ProjectedCrs;
import org.wayhold.pose.Pose;

/**
 * A vehicle's track as JSON, or as GeoJSON (RFC 7946).
 *
 * <p>JSON: {@code {"vehicle", "crs" (when asked), "count", "poses": [pose...]}}; with a CRS every pose
 * carries {@code x} and {@code y} in that CRS.
 *
 * <p>GeoJSON: a FeatureCollection whose first feature is a LineString of the whole track (when it has
 * two or more positions) and then one Point feature per pose, its properties the pose JSON. RFC 7946
 * sec. 3.1.1 and 4: positions are [longitude, latitude] in WGS-84 and there is no {@code crs} member,
 * so projected {@code x}, {@code y} appear only among the properties. A pose without a position yet
 * (before the first fix) has {@code "geometry": null}, which sec. 3.2 allows.
 */
final class TrackJson {

    private TrackJson() {
    }

    static byte[] json(String vehicleId, List<Pose> poses, ProjectedCrs crs) {
        return PoseJson.document(256 + 700 * poses.size(), g -> {
            g.writeStartObject();
            g.writeStringField("vehicle", vehicleId);
            if (crs != null) {
                g.writeStringField("crs", crs.name());
            }
            g.writeNumberField("count", poses.size());
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
                g.writeStringField("type", "LineString");
                g.writeArrayFieldStart("coordinates");
                for (Pose p : poses) {
                    if (PoseJson.hasPosition(p)) {
                        position(g, p);
                    }
                }
                g.writeEndArray();
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

    /** RFC 7946 sec. 3.1.1: longitude first, then latitude (degrees). */
    private static void position(JsonGenerator g, Pose p) throws IOException {
        g.writeStartArray();
        g.writeNumber(p.lonDeg());
        g.writeNumber(p.latDeg());
        g.writeEndArray();
    }
}
