package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import com.fasterxml.jackson.databind.JsonNode;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.util.List;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.locationtech.proj4j.BasicCoordinateTransform;
import org.locationtech.proj4j.CRSFactory;
import org.locationtech.proj4j.CoordinateReferenceSystem;
import org.locationtech.proj4j.ProjCoordinate;
import org.wayhold.sample.Sample;
import org.wayhold.session.VehicleSession;
import org.wayhold.simulate.SimulationSettings;

/**
 * Reading poses: entity tags and 304, poses from the history, tracks in a window, GeoJSON (RFC 7946)
 * and projected coordinates, the vehicle list and deletion. The drive starts at the simulator's
 * default origin, 51.2734 N 10.4468 E, so latitude and longitude cannot be mistaken for each other.
 */
class PoseQueriesTest {

    private static final String CAR = "query-car";
    private static LiveServer server;
    private static List<Sample> samples;

    @BeforeAll
    static void start() {
        server = new LiveServer(LiveServer.settings(s -> s));
        samples = Drives.openSky(31L, 30.0);
        List<List<Sample>> chunks = Drives.chunks(samples, 1.0);
        for (List<Sample> chunk : chunks.subList(0, chunks.size() - 1)) {
            assertThat(server.postNdjson(CAR, Drives.ndjson(chunk)).statusCode()).isEqualTo(200);
        }
    }

    @AfterAll
    static void stop() {
        server.close();
    }

    @Test
    void anUnchangedPoseCostsA304AndNewDataChangesTheTag() {
        HttpResponse<String> first = server.get("/v1/vehicles/" + CAR + "/pose");
        String etag = first.headers().firstValue("ETag").orElseThrow();
        HttpResponse<String> again = server.send(server.request("/v1/vehicles/" + CAR + "/pose")
                .header("If-None-Match", etag).GET().build());
        assertThat(again.statusCode()).isEqualTo(304);
        assertThat(again.body()).isEmpty();
        assertThat(again.headers().firstValue("ETag")).contains(etag);
        // A weak form of the same tag and a list holding it match too (RFC 9110 sec. 13.1.2).
        assertThat(server.send(server.request("/v1/vehicles/" + CAR + "/pose")
                .header("If-None-Match", "\"0-0\", W/" + etag).GET().build()).statusCode()).isEqualTo(304);

        server.postNdjson("tag-car", Drives.ndjson(samples.subList(0, 500)));
        String before = server.get("/v1/vehicles/tag-car/pose").headers().firstValue("ETag").orElseThrow();
        server.postNdjson("tag-car", Drives.ndjson(samples.subList(500, 600)));
        HttpResponse<String> changed = server.send(server.request("/v1/vehicles/tag-car/pose")
                .header("If-None-Match", before).GET().build());
        assertThat(changed.statusCode()).isEqualTo(200);
        assertThat(changed.headers().firstValue("ETag").orElseThrow()).isNotEqualTo(before);
    }

    @Test
    void aDeletedAndRecreatedVehicleNeverReusesATag() {
        server.postNdjson("reborn", Drives.ndjson(samples.subList(0, 300)));
        String old = server.get("/v1/vehicles/reborn/pose").headers().firstValue("ETag").orElseThrow();
        assertThat(server.delete("/v1/vehicles/reborn").statusCode()).isEqualTo(204);
        server.postNdjson("reborn", Drives.ndjson(samples.subList(0, 300)));
        HttpResponse<String> r = server.send(server.request("/v1/vehicles/reborn/pose")
                .header("If-None-Match", old).GET().build());
        assertThat(r.statusCode()).isEqualTo(200);
    }

    @Test
    void theServedPoseIsAlwaysTheSessionsLatestThoughItsJsonIsKept() {
        // The latest pose's JSON is kept per vehicle and version; whatever is posted or deleted in
        // between, a GET must return the session's current latest pose, written afresh here.
        for (int round = 0; round < 2; round++) {
            for (int k = 0; k < 6; k++) {
                server.postNdjson("cached", Drives.ndjson(samples.subList(100 * k, 100 * k + 100)));
                for (int twice = 0; twice < 2; twice++) {
                    HttpResponse<String> r = server.get("/v1/vehicles/cached/pose");
                    assertThat(r.statusCode()).isEqualTo(200);
                    VehicleSession session = server.sessions.find("cached").orElseThrow().session();
                    assertThat(r.body()).isEqualTo(new String(PoseJson.toBytes(session.latest().orElseThrow(),
                            session.liveness()), StandardCharsets.UTF_8));
                }
            }
            // Deleted and fed a shorter stretch: the new session's pose, not the old one's kept JSON.
            assertThat(server.delete("/v1/vehicles/cached").statusCode()).isEqualTo(204);
            server.postNdjson("cached", Drives.ndjson(samples.subList(0, 50)));
            HttpResponse<String> reborn = server.get("/v1/vehicles/cached/pose");
            VehicleSession session = server.sessions.find("cached").orElseThrow().session();
            assertThat(reborn.body()).isEqualTo(new String(PoseJson.toBytes(session.latest().orElseThrow(),
                    session.liveness()), StandardCharsets.UTF_8));
            assertThat(server.delete("/v1/vehicles/cached").statusCode()).isEqualTo(204);
        }
    }

    @Test
    void thePoseAtATimeIsTheNewestAtOrBeforeIt() {
        double at = samples.get(0).t() + 12.34;
        JsonNode p = LiveServer.json(server.get("/v1/vehicles/" + CAR + "/pose?at=" + at));
        assertThat(p.get("t").asDouble()).isLessThanOrEqualTo(at).isGreaterThan(at - 0.25);
    }

    @Test
    void theTrackHoldsThePosesOfTheWindowInTimeOrder() {
        double from = samples.get(0).t() + 5.0;
        double to = from + 4.0;
        JsonNode track = LiveServer.json(server.get("/v1/vehicles/" + CAR + "/track?from=" + from + "&to=" + to));
        assertThat(track.get("vehicle").asText()).isEqualTo(CAR);
        JsonNode poses = track.get("poses");
        assertThat(poses.size()).isEqualTo(track.get("count").asInt()).isGreaterThanOrEqualTo(20);
        double previous = Double.NEGATIVE_INFINITY;
        for (JsonNode p : poses) {
            double t = p.get("t").asDouble();
            assertThat(t).isBetween(from, to).isGreaterThanOrEqualTo(previous);
            previous = t;
            assertThat(p.has("x")).isFalse();
        }
    }

    @Test
    void geoJsonIsAFeatureCollectionWithLongitudeFirst() {
        SimulationSettings sim = SimulationSettings.defaults();
        HttpResponse<String> r = server.get("/v1/vehicles/" + CAR + "/track?format=geojson");
        assertThat(r.headers().firstValue("Content-Type").orElse("")).startsWith("application/geo+json");
        JsonNode fc = LiveServer.json(r);
        assertThat(fc.get("type").asText()).isEqualTo("FeatureCollection");
        JsonNode features = fc.get("features");
        JsonNode line = features.get(0);
        assertThat(line.get("type").asText()).isEqualTo("Feature");
        assertThat(line.get("geometry").get("type").asText()).isEqualTo("LineString");
        int points = 0;
        for (int i = 1; i < features.size(); i++) {
            JsonNode f = features.get(i);
            assertThat(f.get("type").asText()).isEqualTo("Feature");
            if (f.get("geometry").isNull()) {
                continue;
            }
            points++;
            JsonNode c = f.get("geometry").get("coordinates");
            assertThat(f.get("geometry").get("type").asText()).isEqualTo("Point");
            // RFC 7946 sec. 3.1.1: [longitude, latitude]. The drive stays within a few km of its origin.
            assertThat(c).hasSize(2);
            assertThat(c.get(0).asDouble()).isCloseTo(sim.route().originLonDeg(), within(0.05));
            assertThat(c.get(1).asDouble()).isCloseTo(sim.route().originLatDeg(), within(0.05));
            assertThat(c.get(0).asDouble()).isEqualTo(f.get("properties").get("lon").asDouble());
            assertThat(c.get(1).asDouble()).isEqualTo(f.get("properties").get("lat").asDouble());
        }
        assertThat(line.get("geometry").get("coordinates").size()).isEqualTo(points);
        assertThat(points).isGreaterThan(100);
    }

    @Test
    void projectedCoordinatesMatchProj4jWithAnIndependentUtmDefinition() {
        JsonNode track = LiveServer.json(server.get("/v1/vehicles/" + CAR + "/track?crs=epsg:32632"));
        assertThat(track.get("crs").asText()).isEqualTo("EPSG:32632");
        // Reference: Proj4J on a proj string for UTM zone 32N (WGS-84), not the EPSG database entry the
        // service looks up; both describe the same projection, so they agree to well under a millimetre.
        CRSFactory f = new CRSFactory();
        CoordinateReferenceSystem geo = f.createFromParameters("wgs84", "+proj=longlat +datum=WGS84 +no_defs");
        CoordinateReferenceSystem utm = f.createFromParameters("utm32n", "+proj=utm +zone=32 +datum=WGS84 +units=m +no_defs");
        BasicCoordinateTransform toUtm = new BasicCoordinateTransform(geo, utm);
        int checked = 0;
        for (JsonNode p : track.get("poses")) {
            if (p.get("lat").isNull()) {
                assertThat(p.get("x").isNull()).isTrue();
                continue;
            }
            ProjCoordinate out = toUtm.transform(new ProjCoordinate(p.get("lon").asDouble(), p.get("lat").asDouble()),
                    new ProjCoordinate());
            assertThat(p.get("x").asDouble()).isCloseTo(out.x, within(1e-3));
            assertThat(p.get("y").asDouble()).isCloseTo(out.y, within(1e-3));
            checked++;
        }
        assertThat(checked).isGreaterThan(100);
    }

    @Test
    void poseJsonCarriesEveryContractFieldWithNullForUnknownNumbers() {
        JsonNode p = LiveServer.json(server.get("/v1/vehicles/" + CAR + "/pose"));
        assertThat(p.fieldNames()).toIterable().containsExactly("t", "lat", "lon", "alt", "east", "north", "up",
                "heading_deg", "heading_sigma_deg", "speed", "yaw_rate", "cov", "ellipse95", "radius95", "state",
                "reasons", "outage", "gyro_bias", "speed_scale", "last_fix_t", "alert_limit", "origin", "received_at",
                "stale");
        assertThat(p.get("cov").fieldNames()).toIterable().containsExactly("ee", "en", "nn");
        assertThat(p.get("ellipse95").fieldNames()).toIterable().containsExactly("semi_major", "semi_minor",
                "orientation_deg");
        assertThat(p.get("outage").fieldNames()).toIterable().containsExactly("active", "since", "seconds", "meters");
        assertThat(p.get("origin").fieldNames()).toIterable().containsExactly("lat", "lon", "alt");
        // The circular R95 lies between 1.96 and 2.448 sigma of the larger axis; the 95 % ellipse's
        // semi-major axis is 2.448 sigma (chi-square, 2 dof, 0.95: 5.991 = 2.448^2, NIST/SEMATECH
        // e-Handbook 1.3.6.7.4).
        double semiMajor = p.get("ellipse95").get("semi_major").asDouble();
        assertThat(p.get("radius95").asDouble()).isBetween(1.95996 / 2.44775 * semiMajor, semiMajor * (1 + 1e-9));
        assertThat(p.get("reasons").isArray()).isTrue();
        // Epoch times are written in plain decimal and parse back to the sample's own double.
        String text = server.get("/v1/vehicles/" + CAR + "/pose").body();
        assertThat(text).doesNotContain("E9");
        double t = LiveServer.json(server.get("/v1/vehicles/" + CAR + "/pose")).get("t").asDouble();
        assertThat(samples.stream().mapToDouble(Sample::t).anyMatch(s -> s == t)).isTrue();

        // Before the first fix there is no position: numbers are null, not NaN (which is not JSON).
        server.post("/v1/vehicles/blind/samples", "application/x-ndjson",
                "{\"type\":\"wheel_speed\",\"t\":1800000000.0,\"speed\":1.0}\n"
                        + "{\"type\":\"wheel_speed\",\"t\":1800000000.5,\"speed\":1.0}\n");
        HttpResponse<String> blind = server.get("/v1/vehicles/blind/pose");
        assertThat(blind.body()).doesNotContain("NaN", "Infinity");
        JsonNode b = LiveServer.json(blind);
        assertThat(b.get("state").asText()).isEqualTo("initializing");
        assertThat(b.get("lat").isNull()).isTrue();
        assertThat(b.get("origin").isNull()).isTrue();
    }

    @Test
    void deletingAVehicleDropsItsSession() {
        server.postNdjson("doomed", Drives.ndjson(samples.subList(0, 100)));
        assertThat(server.delete("/v1/vehicles/doomed").statusCode()).isEqualTo(204);
        assertThat(server.get("/v1/vehicles/doomed/pose").statusCode()).isEqualTo(404);
        JsonNode list = LiveServer.json(server.get("/v1/vehicles")).get("vehicles");
        for (JsonNode v : list) {
            assertThat(v.get("vehicle").asText()).isNotEqualTo("doomed");
        }
    }
}
