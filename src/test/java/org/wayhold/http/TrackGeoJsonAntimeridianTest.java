package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import com.fasterxml.jackson.databind.JsonNode;
import java.io.IOException;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.wayhold.pose.Ellipse95;
import org.wayhold.pose.NavState;
import org.wayhold.pose.Outage;
import org.wayhold.pose.Radius95;
import org.wayhold.pose.Pose;

/**
 * Rule (RFC 7946 sec. 3.1.9): "any geometry that crosses the antimeridian SHOULD be represented by
 * cutting it in two such that neither part's representation crosses the antimeridian". A track that
 * crosses it becomes a MultiLineString whose parts meet at longitude 180 / -180, at the crossing's
 * latitude; a track that does not stays one LineString, as before. Expected values are exact hand cases
 * (the RFC's own example crosses from 170 E to 170 W at 45 N and cuts at 45 N).
 */
class TrackGeoJsonAntimeridianTest {

    private static Pose at(double t, double latDeg, double lonDeg) {
        return new Pose(t, latDeg, lonDeg, 10.0, 0.0, 0.0, 0.0, 90.0, 10.0, 0.0, 1.0, 0.0, 1.0, 1.0,
                Ellipse95.of(1.0, 0.0, 1.0), NavState.AIDED, Outage.NONE, 0.0, 1.0, null, t, 10.0,
                Radius95.of(1.0, 0.0, 1.0), 0);
    }

    private static JsonNode trackGeometry(List<Pose> poses) throws IOException {
        JsonNode doc = LiveServer.JSON.readTree(TrackJson.geoJson("ship", poses, null));
        return doc.get("features").get(0).get("geometry");
    }

    @Test
    void aTrackCrossingEastwardOver180IsCutInTwoAtTheCrossingLatitude() throws IOException {
        JsonNode g = trackGeometry(List.of(at(1, 45.0, 170.0), at(2, 47.0, -170.0), at(3, 47.5, -169.0)));
        assertThat(g.get("type").asText()).isEqualTo("MultiLineString");
        JsonNode parts = g.get("coordinates");
        assertThat(parts).hasSize(2);
        // Halfway in longitude from 170 E to 190 E (= 170 W): halfway in latitude, 46 N.
        assertThat(parts.get(0).toString()).isEqualTo("[[170.0,45.0],[180.0,46.0]]");
        assertThat(parts.get(1).toString()).isEqualTo("[[-180.0,46.0],[-170.0,47.0],[-169.0,47.5]]");
    }

    @Test
    void aTrackCrossingWestwardAndBackGivesThreePartsEachWithinRange() throws IOException {
        List<Pose> poses = new ArrayList<>();
        double[] lons = {-179.5, -179.9, 179.9, 179.5, 179.9, -179.9};
        for (int i = 0; i < lons.length; i++) {
            poses.add(at(i, -16.0 - 0.001 * i, lons[i]));
        }
        JsonNode parts = trackGeometry(poses).get("coordinates");
        assertThat(parts).hasSize(3);
        for (JsonNode part : parts) {
            for (int i = 1; i < part.size(); i++) {
                // No part's representation crosses: consecutive longitudes within half a turn.
                assertThat(Math.abs(part.get(i).get(0).asDouble() - part.get(i - 1).get(0).asDouble()))
                        .isLessThanOrEqualTo(180.0);
            }
        }
        assertThat(parts.get(0).get(parts.get(0).size() - 1).get(0).asDouble()).isEqualTo(-180.0);
        assertThat(parts.get(1).get(0).get(0).asDouble()).isEqualTo(180.0);
        // -179.9 to 179.9 is 0.2 degrees westward: the cut lies halfway, between the latitudes of poses 1 and 2.
        assertThat(parts.get(1).get(0).get(1).asDouble()).isCloseTo(-16.0015, within(1e-12));
    }

    @Test
    void aTrackThatDoesNotCrossStaysOneLineString() throws IOException {
        JsonNode g = trackGeometry(List.of(at(1, 45.0, 10.0), at(2, 45.1, 10.1)));
        assertThat(g.get("type").asText()).isEqualTo("LineString");
        assertThat(g.get("coordinates").toString()).isEqualTo("[[10.0,45.0],[10.1,45.1]]");
    }
}
