package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import java.io.ByteArrayInputStream;
import java.io.IOException;
import java.io.RandomAccessFile;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.ByteBuffer;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Random;
import java.util.TreeSet;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicInteger;
import java.util.concurrent.atomic.AtomicLong;
import java.util.concurrent.atomic.AtomicReference;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.Timeout;
import org.junit.jupiter.api.io.TempDir;
import org.wayhold.ingest.NdjsonReader;
import org.wayhold.ingest.ReadResult;
import org.wayhold.sample.Sample;
import org.wayhold.session.SessionStats;
import org.wayhold.session.VehicleSession;
import org.wayhold.settings.Settings;
import org.wayhold.testing.ServeChild;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;

/**
 * The real service in a child JVM ({@code wayhold serve}), killed with SIGKILL at 20 seeded moments
 * while several threads post simulated drives, and restarted on the same {@code --data} directory each
 * time.
 *
 * <p>Expected values come from an uninterrupted run: one in-process {@link VehicleSession} per vehicle
 * fed the same batches once each, in order (the same code, so poses must agree to the last bit). Checks:
 * after every restart each vehicle holds exactly the samples of its acknowledged batches, or those and
 * the one batch that was in flight when the process died (its reply never came, so either is right);
 * a batch whose reply never came is posted again and is harmless; at the end the latest pose and the
 * whole track of every vehicle are byte-identical JSON to the uninterrupted run's, before and after one
 * more SIGKILL, and after a graceful restart that replays nothing; and a journal whose last record is
 * corrupted by hand is cut by exactly that record, which is then posted again.
 *
 * <p>The figures of the run (acknowledged and recovered samples per restart) go to
 * {@code target/crash-recovery-figures.txt}; tests do not print.
 */
class CrashRecoveryTest {

    private static final long SEED = 20_260_601L;
    private static final int VEHICLES = 4;
    private static final int KILLS = 20;
    /** One batch per second of drive, as a logging rig might post. */
    private static final double BATCH_S = 1.0;
    /** Longest wait for a child JVM to start and recover (s): generous, the machine is shared. */
    private static final long START_TIMEOUT_S = 120;
    private static final Pattern CUT = Pattern.compile("cut (\\d+) bytes in");
    private static final Settings SESSION_SETTINGS = Settings.defaults();

    @TempDir
    Path tmp;

    /** Samples that replies reported as duplicates: batches posted again whose first copy was durable. */
    private final AtomicLong duplicateSamples = new AtomicLong();

    private final HttpClient http = HttpClient.newBuilder().version(HttpClient.Version.HTTP_1_1)
            .connectTimeout(Duration.ofSeconds(5)).build();

    /** One vehicle: its batches as NDJSON, the reference session, and applied counts after each batch. */
    private static final class Vehicle {
        final String id;
        final List<byte[]> bodies = new ArrayList<>();
        final List<List<Sample>> batches = new ArrayList<>();
        final long[] appliedAfter;
        final VehicleSession reference;
        volatile int acked;

        Vehicle(String id, SimulatedDrive drive) {
            this.id = id;
            for (List<Sample> chunk : Drives.chunks(drive.samples(), BATCH_S)) {
                byte[] body = Drives.ndjson(chunk);
                bodies.add(body);
                // The reference gets what the server will parse, not the simulator's objects.
                ReadResult parsed = new NdjsonReader().readAll(new ByteArrayInputStream(body));
                assertThat(parsed.rejected()).isEmpty();
                batches.add(parsed.samples());
            }
            appliedAfter = new long[batches.size() + 1];
            VehicleSession counter = new VehicleSession(id, SESSION_SETTINGS, null);
            for (int i = 0; i < batches.size(); i++) {
                counter.submit(batches.get(i));
                appliedAfter[i + 1] = applied(counter.stats());
            }
            reference = new VehicleSession(id, SESSION_SETTINGS, null);
        }
    }

    private static long applied(SessionStats s) {
        return s.wheelSpeedApplied() + s.yawRateApplied() + s.gnssApplied() + s.referenceApplied();
    }

    /** Where the posting threads find the live server, and where they wait while it is down. */
    private static final class Gate {
        private String baseUrl;
        private long generation;
        private int waiting;
        private int active;

        synchronized void open(String url) {
            baseUrl = url;
            generation++;
            notifyAll();
        }

        synchronized long generation() {
            return generation;
        }

        synchronized String url() {
            return baseUrl;
        }

        synchronized void awaitNewer(long seen) throws InterruptedException {
            waiting++;
            notifyAll();
            try {
                while (generation == seen) {
                    wait();
                }
            } finally {
                waiting--;
            }
        }

        synchronized void started() {
            active++;
        }

        synchronized void finished() {
            active--;
            notifyAll();
        }

        /** Waits until every posting thread still running is parked here; true when there are none. */
        synchronized boolean awaitAllParked() throws InterruptedException {
            while (waiting < active) {
                wait(1000);
            }
            return active == 0;
        }
    }

    /** A running child service. */
    @Test
    @Timeout(value = 8, unit = TimeUnit.MINUTES)
    void killedTwentyTimesTheServiceLosesNoAcknowledgedSampleAndEndsOnTheUninterruptedPoses() throws Exception {
        List<Vehicle> vehicles = new ArrayList<>();
        for (int v = 0; v < VEHICLES; v++) {
            SimulatedDrive drive = DriveSimulator.simulate(
                    SimulationSettings.defaults().withMinutes(3).withTunnelsS(40), SEED + v);
            vehicles.add(new Vehicle("crash-" + v, drive));
        }
        // Vehicle 0 keeps its last two batches for the hand-corrupted journal at the end.
        Vehicle v0 = vehicles.get(0);
        int[] mainBatches = new int[VEHICLES];
        int total = 0;
        for (int v = 0; v < VEHICLES; v++) {
            mainBatches[v] = vehicles.get(v).batches.size() - (v == 0 ? 2 : 0);
            total += mainBatches[v];
        }
        Path data = tmp.resolve("data");
        Path churn = config("churn.yaml", 1.0);
        Path calm = config("calm.yaml", 3600.0);
        List<String> figures = new ArrayList<>();

        Random random = new Random(SEED);
        TreeSet<Integer> killAt = new TreeSet<>();
        while (killAt.size() < KILLS) {
            killAt.add(5 + random.nextInt(total - 10));
        }

        Gate gate = new Gate();
        AtomicInteger totalAcked = new AtomicInteger();
        AtomicInteger interrupted = new AtomicInteger();
        AtomicInteger reposted = new AtomicInteger();
        AtomicReference<Throwable> failure = new AtomicReference<>();
        int run = 0;
        ServeChild child = start(data, churn, run++);
        gate.open(child.baseUrl());
        List<Thread> posters = new ArrayList<>();
        for (int v = 0; v < VEHICLES; v++) {
            Vehicle vehicle = vehicles.get(v);
            int count = mainBatches[v];
            gate.started();
            Thread t = new Thread(() -> {
                try {
                    post(vehicle, count, gate, totalAcked, interrupted, reposted);
                } catch (Throwable e) {
                    failure.compareAndSet(null, e);
                } finally {
                    gate.finished();
                }
            }, "poster-" + vehicle.id);
            posters.add(t);
            t.start();
        }

        long ackedSum = 0;
        long recoveredSum = 0;
        long inFlightDurable = 0;
        long bytesCutSum = 0;
        long finalHeld = 0;
        try {
            for (int threshold : killAt) {
                while (totalAcked.get() < threshold && failure.get() == null) {
                    Thread.sleep(1);
                }
                assertThat(failure.get()).isNull();
                // Land inside a request now and then, not only between them.
                Thread.sleep(random.nextInt(15));
                child.process().destroyForcibly();
                assertThat(child.process().waitFor(30, TimeUnit.SECONDS)).isTrue();
                gate.awaitAllParked();
                int[] ackedBatches = new int[VEHICLES];
                for (int v = 0; v < VEHICLES; v++) {
                    ackedBatches[v] = vehicles.get(v).acked;
                }
                child = start(data, churn, run++);
                bytesCutSum += cutOf(child.output());
                Map<String, Long> counts = sampleCounts(child.baseUrl());
                long acked = 0;
                long recovered = 0;
                for (int v = 0; v < VEHICLES; v++) {
                    Vehicle vehicle = vehicles.get(v);
                    int k = ackedBatches[v];
                    long have = counts.getOrDefault(vehicle.id, 0L);
                    long mustHave = vehicle.appliedAfter[k];
                    long mayHave = vehicle.appliedAfter[Math.min(k + 1, mainBatches[v])];
                    assertThat(have).as("%s after kill %d: %d batches acknowledged", vehicle.id, run - 1, k)
                            .isIn(mustHave, mayHave);
                    acked += mustHave;
                    recovered += Math.min(have, mustHave);
                    if (have != mustHave) {
                        inFlightDurable++;
                    }
                }
                ackedSum += acked;
                recoveredSum += recovered;
                figures.add(String.format(Locale.ROOT, "kill %2d: acknowledged %7d samples, recovered %7d of them"
                        + " (%d sessions, %d bytes cut)", run - 1, acked, recovered, counts.size(),
                        cutOf(child.output())));
                gate.open(child.baseUrl());
            }
            for (Thread t : posters) {
                t.join(TimeUnit.MINUTES.toMillis(3));
                assertThat(t.isAlive()).as(t.getName() + " finished").isFalse();
            }
            assertThat(failure.get()).isNull();
            assertThat(ackedSum).isEqualTo(recoveredSum);

            // The uninterrupted run: every batch once, in order.
            for (int v = 0; v < VEHICLES; v++) {
                Vehicle vehicle = vehicles.get(v);
                assertThat(vehicle.acked).isEqualTo(mainBatches[v]);
                for (int i = 0; i < mainBatches[v]; i++) {
                    vehicle.reference.submit(vehicle.batches.get(i));
                }
            }
            assertSameAsReference(child, vehicles, "after the last batch");
            Map<String, Long> finalCounts = sampleCounts(child.baseUrl());
            for (int v = 0; v < VEHICLES; v++) {
                Vehicle vehicle = vehicles.get(v);
                assertThat(finalCounts.get(vehicle.id)).isEqualTo(vehicle.appliedAfter[mainBatches[v]]);
                finalHeld += finalCounts.get(vehicle.id);
            }

            child.process().destroyForcibly();
            child.process().waitFor(30, TimeUnit.SECONDS);
            child = start(data, churn, run++);
            assertSameAsReference(child, vehicles, "after one more SIGKILL");

            // Graceful stop: the shutdown snapshot holds everything, the next start replays nothing.
            child.process().destroy();
            assertThat(child.process().waitFor(60, TimeUnit.SECONDS)).isTrue();
            assertThat(Files.readString(child.output())).contains("journal: closed with a snapshot of 4 sessions");
            child = start(data, calm, run++);
            JsonNode recovery = health(child.baseUrl()).path("journal").path("recovery");
            assertThat(recovery.path("sessions_from_snapshot").asInt()).isEqualTo(VEHICLES);
            assertThat(recovery.path("records_replayed").asLong()).isZero();
            assertSameAsReference(child, vehicles, "after a graceful restart");

            // Two more batches of vehicle 0, then SIGKILL and a flipped byte in the journal's last record.
            int n = v0.batches.size();
            assertThat(postOnce(child.baseUrl(), v0, n - 2)).isEqualTo(200);
            assertThat(postOnce(child.baseUrl(), v0, n - 1)).isEqualTo(200);
            child.process().destroyForcibly();
            child.process().waitFor(30, TimeUnit.SECONDS);
            Path segment = newestSegment(data);
            long[] last = lastRecord(segment);
            try (RandomAccessFile f = new RandomAccessFile(segment.toFile(), "rw")) {
                long at = last[0] + 8 + last[1] / 2;
                f.seek(at);
                int b = f.read();
                f.seek(at);
                f.write(b ^ 0x10);
            }
            child = start(data, calm, run++);
            recovery = health(child.baseUrl()).path("journal").path("recovery");
            assertThat(recovery.path("bytes_cut").asLong()).as("exactly the last record: header and payload")
                    .isEqualTo(8 + last[1]);
            assertThat(cutOf(child.output())).isEqualTo(8 + last[1]);
            assertThat(recovery.path("records_replayed").asLong()).as("the batch before it").isEqualTo(1);
            assertThat(Files.size(segment)).isEqualTo(last[0]);
            v0.reference.submit(v0.batches.get(n - 2));
            assertSameAsReference(child, vehicles, "after cutting the corrupt record");
            // The cut batch was acknowledged before the damage; posted again, it is applied like new.
            assertThat(postOnce(child.baseUrl(), v0, n - 1)).isEqualTo(200);
            v0.reference.submit(v0.batches.get(n - 1));
            assertSameAsReference(child, vehicles, "after posting the cut batch again");
            assertThat(sampleCounts(child.baseUrl()).get(v0.id)).isEqualTo(v0.appliedAfter[n]);
        } finally {
            child.process().destroyForcibly();
            for (Thread t : posters) {
                t.interrupt();
            }
        }
        figures.add(0, String.format(Locale.ROOT, "%d SIGKILLs, %d vehicles, %d batches (%d samples) posted by"
                        + " %d threads. Summed over the %d restarts: %d samples acknowledged before the kill, %d of them"
                        + " recovered. %d requests failed by a kill, %d batches posted again, %d unacknowledged batches"
                        + " found durable (%d of their samples answered as duplicates when posted again), %d bytes of"
                        + " torn tail cut. At the end: %d of %d samples held, poses and tracks byte-identical.",
                KILLS, VEHICLES, total, totalSamples(vehicles, mainBatches), VEHICLES, KILLS, ackedSum, recoveredSum,
                interrupted.get(), reposted.get(), inFlightDurable, duplicateSamples.get(), bytesCutSum,
                finalHeld, totalSamples(vehicles, mainBatches)));
        Files.createDirectories(Path.of("target"));
        Files.write(Path.of("target", "crash-recovery-figures.txt"), figures);
    }

    private static long totalSamples(List<Vehicle> vehicles, int[] mainBatches) {
        long n = 0;
        for (int v = 0; v < vehicles.size(); v++) {
            n += vehicles.get(v).appliedAfter[mainBatches[v]];
        }
        return n;
    }

    /** Posts one vehicle's batches in order, resending a batch whose reply never came after the restart. */
    private void post(Vehicle vehicle, int count, Gate gate, AtomicInteger totalAcked, AtomicInteger interrupted,
                      AtomicInteger reposted) throws InterruptedException {
        boolean again = false;
        while (vehicle.acked < count) {
            long generation = gate.generation();
            String url = gate.url();
            int status;
            try {
                status = postOnce(url, vehicle, vehicle.acked);
            } catch (IOException e) {
                interrupted.incrementAndGet();
                again = true;
                gate.awaitNewer(generation);
                continue;
            }
            assertThat(status).as("reply to batch %d of %s", vehicle.acked, vehicle.id).isEqualTo(200);
            if (again) {
                reposted.incrementAndGet();
                again = false;
            }
            vehicle.acked++;
            totalAcked.incrementAndGet();
        }
    }

    private int postOnce(String baseUrl, Vehicle vehicle, int batch) throws IOException, InterruptedException {
        HttpRequest request = HttpRequest.newBuilder(URI.create(baseUrl + "/v1/vehicles/" + vehicle.id + "/samples"))
                .timeout(Duration.ofSeconds(60)).header("Content-Type", "application/x-ndjson")
                .POST(HttpRequest.BodyPublishers.ofByteArray(vehicle.bodies.get(batch))).build();
        HttpResponse<String> r = http.send(request, HttpResponse.BodyHandlers.ofString());
        if (r.statusCode() == 200) {
            JsonNode reply = LiveServer.JSON.readTree(r.body());
            // A batch sent again after a lost reply may find its samples applied: duplicates or too late,
            // never anything else.
            assertThat(reply.path("accepted").asLong() + reply.path("rejected_count").asLong())
                    .isEqualTo(vehicle.batches.get(batch).size());
            duplicateSamples.addAndGet(reply.path("duplicates").asLong());
        }
        return r.statusCode();
    }

    private void assertSameAsReference(ServeChild child, List<Vehicle> vehicles, String when) throws Exception {
        for (Vehicle v : vehicles) {
            // The vehicle's liveness (received_at, stale) is the service's wall clock, not session state.
            String pose = get(child.baseUrl(), "/v1/vehicles/" + v.id + "/pose").body()
                    .replaceFirst(",\"received_at\":[^,]*,\"stale\":(true|false)}$", "}");
            assertThat(pose).as("%s pose %s", v.id, when)
                    .isEqualTo(new String(PoseJson.toBytes(v.reference.latest().orElseThrow()), StandardCharsets.UTF_8));
            String track = get(child.baseUrl(), "/v1/vehicles/" + v.id + "/track").body();
            assertThat(track).as("%s track %s", v.id, when).isEqualTo(new String(TrackJson.json(v.id,
                    v.reference.track(Double.NEGATIVE_INFINITY, Double.POSITIVE_INFINITY), null,
                    TrackJson.Held.of(v.reference.held(), Double.NEGATIVE_INFINITY)),
                    StandardCharsets.UTF_8));
        }
    }

    private HttpResponse<String> get(String baseUrl, String path) throws IOException, InterruptedException {
        return http.send(HttpRequest.newBuilder(URI.create(baseUrl + path)).timeout(Duration.ofSeconds(60)).GET()
                .build(), HttpResponse.BodyHandlers.ofString());
    }

    private JsonNode health(String baseUrl) throws Exception {
        return LiveServer.JSON.readTree(get(baseUrl, "/health").body());
    }

    private Map<String, Long> sampleCounts(String baseUrl) throws Exception {
        Map<String, Long> counts = new HashMap<>();
        for (JsonNode v : LiveServer.JSON.readTree(get(baseUrl, "/v1/vehicles").body()).path("vehicles")) {
            counts.put(v.path("vehicle").asText(), v.path("samples").asLong());
        }
        return counts;
    }

    /**
     * A config with a small segment size and a short retention, so that segments roll over and are
     * deleted during the run.
     */
    private Path config(String name, double snapshotIntervalS) throws IOException {
        Path p = tmp.resolve(name);
        Files.writeString(p, String.format(Locale.ROOT, """
                journal:
                  segment_bytes: 65536
                  retention_bytes: 131072
                  retention_age_s: 1.0
                  snapshot_interval_s: %s
                """, snapshotIntervalS));
        return p;
    }

    /** Starts {@code wayhold serve} in a child JVM on a free port and waits until it serves. */
    private ServeChild start(Path data, Path config, int run) throws Exception {
        return ServeChild.start(tmp.resolve("serve-" + run + ".log"),
                List.of("--data", data.toString(), "--config", config.toString()), null, START_TIMEOUT_S);
    }

    private static long cutOf(Path output) throws IOException {
        Matcher m = CUT.matcher(Files.readString(output));
        return m.find() ? Long.parseLong(m.group(1)) : -1;
    }

    private static Path newestSegment(Path data) throws IOException {
        try (Stream<Path> s = Files.list(data)) {
            return s.filter(p -> p.getFileName().toString().matches("segment-\\d+\\.wal"))
                    .filter(p -> p.toFile().length() > 0).sorted().reduce((a, b) -> b).orElseThrow();
        }
    }

    /**
     * Offset and payload length of the last record of a segment, found by walking the documented framing
     * {@code [length u32][CRC32C u32][payload]} from the start.
     */
    private static long[] lastRecord(Path segment) throws IOException {
        ByteBuffer b = ByteBuffer.wrap(Files.readAllBytes(segment));
        long offset = -1;
        long length = -1;
        while (b.remaining() >= 8) {
            int len = b.getInt(b.position());
            assertThat(len).isPositive().isLessThanOrEqualTo(b.remaining() - 8);
            offset = b.position();
            length = len;
            b.position(b.position() + 8 + len);
        }
        assertThat(b.remaining()).as("a clean segment ends on a record boundary").isZero();
        return new long[] {offset, length};
    }
}
