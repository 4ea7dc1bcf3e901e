package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Random;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.Timeout;
import org.junit.jupiter.api.io.TempDir;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.testing.ServeChild;

/**
 * Extreme values and a restart: the real service in a child JVM ({@code wayhold serve --data DIR}) is
 * fed real drives and then lines with extreme values in every numeric field (seeded, as in
 * {@link HostileInputPropertyTest}), stopped gracefully (which writes a snapshot), started again, killed
 * with SIGKILL after more such lines and started once more (which replays the journal).
 *
 * <p>Rule: whatever values were posted, every start succeeds and brings every vehicle back with the
 * pose and track it had, byte for byte. A value that turned a vehicle's filter into NaN once made its
 * snapshot unreadable, so the service could not start on its own data directory.
 */
class ExtremeValuesRestartTest {

    private static final int VEHICLES = 3;
    private static final int REQUESTS = 150;
    private static final long SEED = 20_261_205L;

    @TempDir
    Path tmp;

    private final HttpClient http = HttpClient.newBuilder().connectTimeout(Duration.ofSeconds(10)).build();

    @Test
    @Timeout(value = 5, unit = TimeUnit.MINUTES)
    void aServiceFedExtremeValuesRestartsWithEveryVehicleAsItWas() throws Exception {
        Path data = tmp.resolve("data");
        ServeChild child = start(data, 0);
        double[][] state = new double[VEHICLES][];
        Random r = new Random(SEED);
        int[] tried = new int[ExtremeValues.PAIRS];
        try {
            for (int v = 0; v < VEHICLES; v++) {
                List<Sample> drive = Drives.openSky(900L + v, 20.0);
                assertThat(post(child, v, Drives.ndjson(drive))).isEqualTo(200);
                GnssFix fix = (GnssFix) drive.stream().filter(s -> s instanceof GnssFix).reduce((a, b) -> b).orElseThrow();
                state[v] = new double[] {drive.get(drive.size() - 1).t(), fix.latDeg(), fix.lonDeg()};
            }
            feed(child, state, r, tried);
            List<String> before = snapshotOfAll(child);

            child.stop();
            assertThat(Files.readString(child.output())).contains("journal: closed with a snapshot of " + VEHICLES
                    + " sessions");
            child = start(data, 1);
            assertThat(snapshotOfAll(child)).as("after a graceful restart").isEqualTo(before);

            feed(child, state, r, tried);
            List<String> beforeKill = snapshotOfAll(child);
            child.process().destroyForcibly();
            assertThat(child.process().waitFor(30, TimeUnit.SECONDS)).isTrue();
            child = start(data, 2);
            assertThat(snapshotOfAll(child)).as("after SIGKILL and a replay of the journal").isEqualTo(beforeKill);
        } finally {
            child.process().destroyForcibly();
        }
        for (int pair : tried) {
            assertThat(pair).as("every numeric field tried").isPositive();
        }
    }

    private void feed(ServeChild child, double[][] state, Random r, int[] tried) throws Exception {
        for (int i = 0; i < REQUESTS; i++) {
            int v = r.nextInt(VEHICLES);
            ByteArrayOutputStream body = new ByteArrayOutputStream();
            for (int k = 0; k < 4; k++) {
                state[v][0] += 0.01;
                body.writeBytes(ExtremeValues.line(r, state[v][0], state[v][1], state[v][2], tried));
                body.write('\n');
            }
            assertThat(post(child, v, body.toByteArray())).isEqualTo(200);
        }
    }

    /** The pose and track of every vehicle, as the service writes them. */
    private List<String> snapshotOfAll(ServeChild child) throws Exception {
        List<String> all = new ArrayList<>();
        for (int v = 0; v < VEHICLES; v++) {
            for (String path : new String[] {"/pose", "/track"}) {
                HttpResponse<String> r = get(child, "/v1/vehicles/x-" + v + path);
                assertThat(r.statusCode()).as(r.body()).isEqualTo(200);
                // The liveness follows the wall clock (and is not kept across a restart), not the samples.
                all.add(LiveServer.withoutLiveness(r.body()));
            }
        }
        JsonNode health = LiveServer.JSON.readTree(get(child, "/health").body());
        assertThat(health.path("sessions").asInt()).isEqualTo(VEHICLES);
        return all;
    }

    private int post(ServeChild child, int vehicle, byte[] body) throws IOException, InterruptedException {
        return http.send(HttpRequest.newBuilder(URI.create(child.baseUrl() + "/v1/vehicles/x-" + vehicle + "/samples"))
                .timeout(Duration.ofSeconds(60)).header("Content-Type", "application/x-ndjson")
                .POST(HttpRequest.BodyPublishers.ofByteArray(body)).build(), HttpResponse.BodyHandlers.ofString())
                .statusCode();
    }

    private HttpResponse<String> get(ServeChild child, String path) throws IOException, InterruptedException {
        return http.send(HttpRequest.newBuilder(URI.create(child.baseUrl() + path)).timeout(Duration.ofSeconds(60))
                .GET().build(), HttpResponse.BodyHandlers.ofString());
    }

    private ServeChild start(Path data, int run) throws Exception {
        return ServeChild.start(tmp.resolve("serve-" + run + ".log"), List.of("--data", data.toString()), null, 120);
    }
}
