package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import java.net.http.HttpResponse;
import java.util.List;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.Sample;
import org.wayhold.settings.HistorySettings;
import org.wayhold.settings.Settings;

/**
 * The pose history is bounded, so a track request may ask for more than is held: the reply must say
 * what the history actually holds (headers for both formats, fields in the JSON) and whether the window
 * lost poses to the bound. Expected values come from the reply's own poses: the oldest and newest held
 * are the first and last of an open-ended track. History of 50 poses here, so that it fills quickly.
 */
class TrackHeldTest {

    private static final int MAX_POSES = 50;
    private static LiveServer server;
    private static List<Sample> samples;

    @BeforeAll
    static void start() {
        Settings d = LiveServer.settings(s -> s);
        server = new LiveServer(new Settings(d.server(), d.filter(), d.gating(), d.outage(), d.ordering(),
                new HistorySettings(d.history().intervalS(), MAX_POSES), d.vehicles()));
        samples = Drives.openSky(83L, 40.0);
    }

    @AfterAll
    static void stop() {
        server.close();
    }

    @Test
    void aWindowLongerThanTheFullHistorySaysWhatIsHeldAndThatItWasCut() {
        server.postNdjson("long", Drives.ndjson(samples));
        JsonNode all = LiveServer.json(server.get("/v1/vehicles/long/track")).get("poses");
        assertThat(all.size()).isEqualTo(MAX_POSES);
        double heldFrom = all.get(0).get("t").asDouble();
        double heldTo = all.get(all.size() - 1).get("t").asDouble();
        double driveStart = samples.get(0).t();

        HttpResponse<String> r = server.get("/v1/vehicles/long/track?from=" + driveStart);
        JsonNode body = LiveServer.json(r);
        assertThat(body.get("held_from").asDouble()).isEqualTo(heldFrom);
        assertThat(body.get("held_to").asDouble()).isEqualTo(heldTo);
        assertThat(body.get("truncated").asBoolean()).as("the window starts before what is held").isTrue();
        assertThat(Double.parseDouble(r.headers().firstValue(VehicleRoutes.HELD_FROM).orElseThrow())).isEqualTo(heldFrom);
        assertThat(Double.parseDouble(r.headers().firstValue(VehicleRoutes.HELD_TO).orElseThrow())).isEqualTo(heldTo);
        assertThat(r.headers().firstValue(VehicleRoutes.TRUNCATED)).contains("true");

        HttpResponse<String> geo = server.get("/v1/vehicles/long/track?format=geojson&from=" + driveStart);
        assertThat(geo.headers().firstValue(VehicleRoutes.TRUNCATED)).contains("true");
        assertThat(Double.parseDouble(geo.headers().firstValue(VehicleRoutes.HELD_FROM).orElseThrow())).isEqualTo(heldFrom);

        // A window inside what is held is whole.
        HttpResponse<String> inside = server.get("/v1/vehicles/long/track?from=" + heldFrom);
        assertThat(LiveServer.json(inside).get("truncated").asBoolean()).isFalse();
        assertThat(inside.headers().firstValue(VehicleRoutes.TRUNCATED)).contains("false");
    }

    @Test
    void aHistoryThatIsNotFullHasLostNothingWhateverTheWindow() {
        server.postNdjson("short", Drives.ndjson(samples.subList(0, 200)));
        JsonNode body = LiveServer.json(server.get("/v1/vehicles/short/track?from=0"));
        assertThat(body.get("count").asInt()).isLessThan(MAX_POSES);
        assertThat(body.get("truncated").asBoolean()).isFalse();
        assertThat(body.get("held_from").asDouble()).isEqualTo(body.get("poses").get(0).get("t").asDouble());
    }
}
