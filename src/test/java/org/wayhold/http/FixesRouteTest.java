package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.wayhold.geo.Enu;
import org.wayhold.geo.Geodetic;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;

/**
 * The fixes a vehicle sent, with the filter's decision on each: a planted 40 m jump in open sky must
 * come back marked {@code gated}, the ordinary fixes {@code accepted} (exact hand case: the planted
 * fix is the one we moved).
 */
class FixesRouteTest {

    private static final String VAN = "fix-van";
    private static LiveServer server;
    private static double plantedT;
    private static SimulatedDrive drive;

    @BeforeAll
    static void start() {
        server = new LiveServer(LiveServer.settings(s -> s));
        SimulationSettings sim = SimulationSettings.defaults().withMinutes(3);
        sim = sim.withGnss(sim.gnss().perfect());
        drive = DriveSimulator.simulate(sim, 8L);
        List<Sample> samples = new ArrayList<>();
        for (Sample s : drive.samples()) {
            if (s instanceof GnssFix g && plantedT == 0 && g.t() > drive.startT() + 150) {
                plantedT = g.t();
                Enu antenna = drive.antennaAt(g.t());
                Geodetic moved = drive.frame().toGeodetic(antenna.eastM() + 40.0, antenna.northM(), antenna.upM());
                samples.add(new GnssFix(g.t(), moved.latDeg(), moved.lonDeg(), g.altM(), 1.0, g.sigmaVM(),
                        g.fix(), g.sats(), g.hdop(), g.speedMps(), g.courseDeg()));
            } else {
                samples.add(s);
            }
        }
        for (List<Sample> chunk : Drives.chunks(samples, 5.0)) {
            assertThat(server.postNdjson(VAN, Drives.ndjson(chunk)).statusCode()).isEqualTo(200);
        }
    }

    @AfterAll
    static void stop() {
        server.close();
    }

    @Test
    void thePlantedJumpIsMarkedGatedAndOrdinaryFixesAccepted() {
        JsonNode body = LiveServer.json(server.get("/v1/vehicles/" + VAN + "/fixes?from=" + (plantedT - 1.0)
                + "&to=" + (plantedT + 1.0)));
        assertThat(body.get("vehicle").asText()).isEqualTo(VAN);
        JsonNode fixes = body.get("fixes");
        assertThat(fixes.size()).as("5 Hz fixes in 2 s").isBetween(10, 11);
        for (JsonNode f : fixes) {
            if (f.get("t").asDouble() == plantedT) {
                assertThat(f.get("outcome").asText()).isEqualTo("gated");
                assertThat(f.get("nis").asDouble()).isGreaterThan(13.8155);
            } else if (f.get("t").asDouble() < plantedT) {
                assertThat(f.get("outcome").asText()).isEqualTo("accepted");
            }
            assertThat(f.get("sigma_h").asDouble()).isPositive();
        }
    }

    @Test
    void theWholeLogIsReturnedOldestFirstWithoutAWindow() {
        JsonNode fixes = LiveServer.json(server.get("/v1/vehicles/" + VAN + "/fixes")).get("fixes");
        // 3 minutes at 5 Hz are about 900 fixes, more than the log keeps (history.max_poses, 600 by
        // default): it holds exactly the newest ones.
        assertThat(fixes.size()).isEqualTo(Settings.defaults().history().maxPoses());
        assertThat(fixes.get(fixes.size() - 1).get("t").asDouble()).isGreaterThan(drive.startT() + 179.0);
        double last = Double.NEGATIVE_INFINITY;
        for (JsonNode f : fixes) {
            assertThat(f.get("t").asDouble()).isGreaterThan(last);
            last = f.get("t").asDouble();
        }
    }

    @Test
    void aWindowEndingBeforeItStartsIsABadRequest() {
        assertThat(server.get("/v1/vehicles/" + VAN + "/fixes?from=10&to=5").statusCode()).isEqualTo(400);
        assertThat(server.get("/v1/vehicles/nobody/fixes").statusCode()).isEqualTo(404);
    }
}
