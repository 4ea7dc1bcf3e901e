package org.wayhold.cli;

import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.InputStream;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.List;
import java.util.concurrent.TimeUnit;
import java.util.zip.GZIPInputStream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.wayhold.testing.ServeChild;

/**
 * {@code serve --replay} on a data directory that already holds the replay vehicle (the quick start run
 * a second time): the replay must start its drive again from the beginning, not be refused as late by
 * the session the first run left in the journal. Runs the real command in child JVMs.
 */
class ServeReplayTest {

    private static final Path LOG = Path.of("sample-logs/open-sky.ndjson.gz");
    private static final ObjectMapper JSON = new ObjectMapper();
    private static final HttpClient CLIENT = HttpClient.newBuilder().connectTimeout(Duration.ofSeconds(5)).build();

    @TempDir
    Path tmp;

    @Test
    void aSecondReplayOnTheSameDataStartsTheDriveAgain() throws Exception {
        double firstT;
        double lastT;
        try (InputStream in = new GZIPInputStream(Files.newInputStream(LOG))) {
            String[] lines = new String(in.readAllBytes(), java.nio.charset.StandardCharsets.UTF_8).split("\n");
            firstT = JSON.readTree(lines[0]).get("t").asDouble();
            lastT = JSON.readTree(lines[lines.length - 1]).get("t").asDouble();
        }
        Path data = tmp.resolve("data");

        // First run: the whole drive at 200x (about 1.2 s), then a graceful stop that snapshots it.
        ServeChild first = start(data, 200.0, 1);
        try {
            double t = waitForPoseT(first.baseUrl(), lastT - 1.0, 60);
            assertThat(t).isGreaterThan(lastT - 1.0);
        } finally {
            first.stop();
        }

        // Second run at real time: within seconds the pose is near the drive's start again.
        ServeChild second = start(data, 1.0, 2);
        try {
            assertThat(Files.readString(second.output()))
                    .contains("dropped the restored session of vehicle 'replay' to replay from the start");
            double t = waitForPoseT(second.baseUrl(), firstT, 60);
            assertThat(t).isLessThan(firstT + 30.0);
        } finally {
            second.stop();
        }
    }

    /**
     * When the replayed drive ends the command says so, and the vehicle, which then goes quiet, turns
     * stale after {@code outage.stale_after_s} (1 s here) while its state stays the filter's last.
     */
    @Test
    void theEndOfTheDriveIsPrintedAndTheVehicleThenTurnsStale() throws Exception {
        int lines;
        try (InputStream in = new GZIPInputStream(Files.newInputStream(LOG))) {
            lines = (int) new String(in.readAllBytes(), java.nio.charset.StandardCharsets.UTF_8).lines()
                    .filter(l -> !l.isBlank()).count();
        }
        Path config = tmp.resolve("stale.yaml");
        Files.writeString(config, "outage:\n  stale_after_s: 1.0\n");
        ServeChild child = ServeChild.start(tmp.resolve("serve-end.log"), List.of("--data",
                tmp.resolve("data-end").toString(), "--config", config.toString(), "--replay", LOG.toString(),
                "--speed", "200"), "replaying ", 60);
        try {
            long deadline = System.nanoTime() + TimeUnit.SECONDS.toNanos(60);
            String out = "";
            while (System.nanoTime() < deadline && !out.contains("the drive has ended")) {
                Thread.sleep(50);
                out = Files.readString(child.output());
            }
            assertThat(out).contains("replay: the drive has ended: " + lines + " samples of " + LOG
                    + " replayed into vehicle 'replay'").contains("stale after 1 s");
            JsonNode pose = null;
            while (System.nanoTime() < deadline) {
                pose = JSON.readTree(CLIENT.send(HttpRequest.newBuilder(URI.create(child.baseUrl()
                        + "/v1/vehicles/replay/pose")).GET().build(), HttpResponse.BodyHandlers.ofString()).body());
                if (pose.get("stale").asBoolean()) {
                    break;
                }
                Thread.sleep(100);
            }
            assertThat(pose.get("stale").asBoolean()).as("the vehicle turns stale after the drive").isTrue();
            assertThat(pose.get("state").asText()).isIn("aided", "degraded", "bridging", "unreliable");
            assertThat(pose.get("received_at").asDouble()).isLessThan(System.currentTimeMillis() / 1000.0 - 1.0);
        } finally {
            child.stop();
        }
    }

    /** The pose time of vehicle 'replay' once it exists and is at least {@code minT}; fails after a bound. */
    private static double waitForPoseT(String baseUrl, double minT, int timeoutS) throws Exception {
        long deadline = System.nanoTime() + TimeUnit.SECONDS.toNanos(timeoutS);
        double t = Double.NaN;
        while (System.nanoTime() < deadline) {
            HttpResponse<String> r = CLIENT.send(HttpRequest.newBuilder(URI.create(baseUrl + "/v1/vehicles/replay/pose"))
                    .GET().build(), HttpResponse.BodyHandlers.ofString());
            if (r.statusCode() == 200) {
                JsonNode pose = JSON.readTree(r.body());
                t = pose.get("t").asDouble();
                if (t >= minT) {
                    return t;
                }
            }
            Thread.sleep(50);
        }
        throw new AssertionError("pose of 'replay' did not reach t = " + minT + " s within " + timeoutS
                + " s; last seen " + t);
    }

    private ServeChild start(Path data, double speed, int run) throws Exception {
        return ServeChild.start(tmp.resolve("serve-" + run + ".log"), List.of("--data", data.toString(),
                "--replay", LOG.toString(), "--speed", Double.toString(speed)), "replaying ", 60);
    }
}
