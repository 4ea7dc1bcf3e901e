package org.wayhold.http;

import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;
import java.util.SplittableRandom;
import java.util.concurrent.Callable;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.concurrent.atomic.AtomicLong;
import java.util.function.IntFunction;
import org.wayhold.sample.Sample;
import org.wayhold.session.SessionRegistry;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulationSettings;

/**
 * A small load generator for the HTTP service, loopback only; not a test (nothing here runs in
 * {@code mvn test}). Three phases, each warmed up first and bounded in time:
 * <ol>
 *   <li>batch NDJSON ingest: a simulated drive in 10 s bodies (about 1650 samples each) posted to 8
 *       vehicles from 4 threads; samples per second;</li>
 *   <li>single-sample POSTs: 4 threads, each posting one wheel-speed line per request to its own vehicle;
 *       requests per second;</li>
 *   <li>pose GETs with 1000 active vehicles: 8 threads reading random vehicles' latest pose; requests
 *       per second and p50/p99 latency.</li>
 * </ol>
 * Client and server share the machine (and its cores), so the figures are a floor, not a ceiling.
 *
 * <p>With a second argument, the base URL of a running service on loopback (for example the jar under
 * {@code serve --config bench/load-server.yaml}, journal and all), the phases go there instead of to a
 * server started in this JVM. That service needs room for about 1100 sessions and no tokens.
 *
 * <p>Run: {@code mvn -B -ntp -o -q test-compile && java -cp target/classes:target/test-classes:$(mvn -q
 * dependency:build-classpath -Dmdep.includeScope=test -Dmdep.outputFile=/dev/stdout)
 * org.wayhold.http.LoadGenerator [seconds-per-phase, default 8] [http://127.0.0.1:PORT]}
 */
public final class LoadGenerator {

    private static final HttpClient CLIENT = HttpClient.newBuilder().connectTimeout(Duration.ofSeconds(5)).build();

    private LoadGenerator() {
    }

    public static void main(String[] args) throws Exception {
        double phaseS = args.length > 0 ? Double.parseDouble(args[0]) : 8.0;
        if (!(phaseS > 0 && phaseS <= 15)) {
            throw new IllegalArgumentException("seconds per phase: must be in (0, 15], was " + phaseS);
        }
        HttpService service = null;
        String base;
        if (args.length > 1) {
            base = args[1].replaceAll("/+$", "");
            String host = URI.create(base).getHost();
            if (!host.equals("127.0.0.1") && !host.equals("localhost") && !host.equals("[::1]")) {
                throw new IllegalArgumentException("base URL: loopback only, was " + base);
            }
        } else {
            // The ingest phases create a few dozen vehicles besides the 1000 read in the last phase.
            Settings settings = LiveServer.settings(s -> LiveServer.withLimits(s, s.maxBodyBytes(), 1200,
                    s.corsOrigins(), s.sseKeepAliveS()));
            service = new HttpService(new SessionRegistry(settings, null)).start();
            base = service.baseUrl();
        }
        // Vehicle ids carry the start time, so that runs against a service that keeps its sessions
        // never post into the past of an earlier run's vehicles.
        String run = Long.toString(System.currentTimeMillis() / 1000 % 100000);
        try {
            List<Sample> drive = DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(10), 9L).samples();
            List<byte[]> bodies = new ArrayList<>();
            List<Integer> counts = new ArrayList<>();
            for (List<Sample> chunk : Drives.chunks(drive, 10.0)) {
                bodies.add(Drives.ndjson(chunk));
                counts.add(chunk.size());
            }
            batchIngest(base, bodies, counts, "warm" + run, Math.min(phaseS, 3.0));
            batchIngest(base, bodies, counts, "batch" + run, phaseS);

            singlePosts(base, "warm-single" + run, Math.min(phaseS, 3.0));
            singlePosts(base, "single" + run, phaseS);

            List<Sample> shortDrive = Drives.chunks(drive, 2.0).get(0);
            byte[] small = Drives.ndjson(shortDrive);
            ExecutorService pool = Executors.newFixedThreadPool(4);
            List<Future<?>> created = new ArrayList<>();
            for (int v = 0; v < 1000; v++) {
                String id = "fleet-" + v;
                created.add(pool.submit(() -> post(base + "/v1/vehicles/" + id + "/samples", small)));
            }
            for (Future<?> f : created) {
                f.get();
            }
            pool.shutdown();
            poseGets(base, 1000, Math.min(phaseS, 3.0), false);
            poseGets(base, 1000, phaseS, true);
        } finally {
            if (service != null) {
                service.stop();
            }
        }
    }

    private static void batchIngest(String base, List<byte[]> bodies, List<Integer> counts, String prefix,
                                    double seconds) throws Exception {
        int threads = 4;
        int vehicles = 8;
        long deadline = System.nanoTime() + (long) (seconds * 1e9);
        AtomicLong samples = new AtomicLong();
        AtomicLong requests = new AtomicLong();
        long start = System.nanoTime();
        onThreads(threads, thread -> () -> {
            // Thread t feeds vehicles t and t + 4, alternating, each its drive in order.
            int[] next = new int[2];
            for (int k = 0; System.nanoTime() < deadline; k++) {
                int which = k % 2;
                // Each pass over the drive goes to a new vehicle: a second pass into the same one
                // would be rejected as late, and rejections are not ingest.
                int i = next[which] % bodies.size();
                int pass = next[which] / bodies.size();
                next[which]++;
                String id = prefix + "-" + (thread + which * threads) + "-" + pass;
                long accepted = post(base + "/v1/vehicles/" + id + "/samples", bodies.get(i));
                if (accepted != counts.get(i)) {
                    throw new IllegalStateException("POST to " + id + ": " + accepted + " of " + counts.get(i)
                            + " samples accepted; the load must be all valid");
                }
                samples.addAndGet(accepted);
                requests.incrementAndGet();
            }
            return null;
        });
        double s = (System.nanoTime() - start) / 1e9;
        if (!prefix.startsWith("warm")) {
            System.out.printf(Locale.ROOT, "batch NDJSON ingest: %d samples in %d requests over %.1f s = %.0f samples/s (%d vehicles, %d threads)%n",
                    samples.get(), requests.get(), s, samples.get() / s, vehicles, threads);
        }
    }

    private static void singlePosts(String base, String prefix, double seconds) throws Exception {
        int threads = 4;
        long deadline = System.nanoTime() + (long) (seconds * 1e9);
        AtomicLong requests = new AtomicLong();
        long start = System.nanoTime();
        onThreads(threads, t -> () -> {
            String id = prefix + "-" + t;
            for (long k = 0; System.nanoTime() < deadline; k++) {
                String line = String.format(Locale.ROOT, "{\"type\":\"wheel_speed\",\"t\":%.2f,\"speed\":5.0}%n",
                        1_800_000_000.0 + 0.02 * k);
                post(base + "/v1/vehicles/" + id + "/samples", line.getBytes(java.nio.charset.StandardCharsets.UTF_8));
                requests.incrementAndGet();
            }
            return null;
        });
        double s = (System.nanoTime() - start) / 1e9;
        if (!prefix.startsWith("warm")) {
            System.out.printf(Locale.ROOT, "single-sample POST: %d requests over %.1f s = %.0f req/s (%d threads)%n",
                    requests.get(), s, requests.get() / s, threads);
        }
    }

    private static void poseGets(String base, int vehicles, double seconds, boolean report) throws Exception {
        int threads = 8;
        long deadline = System.nanoTime() + (long) (seconds * 1e9);
        long start = System.nanoTime();
        List<long[]> all = onThreads(threads, t -> () -> {
            SplittableRandom rnd = new SplittableRandom(t);
            long[] latencies = new long[1 << 20];
            int n = 0;
            while (System.nanoTime() < deadline && n < latencies.length) {
                URI uri = URI.create(base + "/v1/vehicles/fleet-" + rnd.nextInt(vehicles) + "/pose");
                long t0 = System.nanoTime();
                HttpResponse<byte[]> r = CLIENT.send(HttpRequest.newBuilder(uri).GET().build(),
                        HttpResponse.BodyHandlers.ofByteArray());
                latencies[n++] = System.nanoTime() - t0;
                if (r.statusCode() != 200) {
                    throw new IllegalStateException("GET " + uri + " -> " + r.statusCode());
                }
            }
            return Arrays.copyOf(latencies, n);
        });
        double s = (System.nanoTime() - start) / 1e9;
        long[] merged = all.stream().flatMapToLong(Arrays::stream).sorted().toArray();
        if (report) {
            System.out.printf(Locale.ROOT, "pose GET, %d vehicles: %d requests over %.1f s = %.0f req/s, p50 %.2f ms, p99 %.2f ms (%d threads)%n",
                    vehicles, merged.length, s, merged.length / s, merged[merged.length / 2] / 1e6,
                    merged[(int) Math.floor(merged.length * 0.99)] / 1e6, threads);
        }
    }

    /** Runs {@code task.apply(t)} on thread t of a pool of {@code threads}; returns the results in thread order. */
    private static <T> List<T> onThreads(int threads, IntFunction<Callable<T>> task) throws Exception {
        ExecutorService pool = Executors.newFixedThreadPool(threads);
        try {
            List<Future<T>> done = new ArrayList<>();
            for (int t = 0; t < threads; t++) {
                done.add(pool.submit(task.apply(t)));
            }
            List<T> results = new ArrayList<>();
            for (Future<T> f : done) {
                results.add(f.get());
            }
            return results;
        } finally {
            pool.shutdown();
        }
    }

    /** POSTs one NDJSON body; returns the reply's {@code accepted} count. */
    private static long post(String url, byte[] body) {
        try {
            HttpResponse<String> r = CLIENT.send(HttpRequest.newBuilder(URI.create(url))
                    .header("Content-Type", "application/x-ndjson")
                    .POST(HttpRequest.BodyPublishers.ofByteArray(body)).build(), HttpResponse.BodyHandlers.ofString());
            if (r.statusCode() != 200) {
                throw new IllegalStateException("POST " + url + " -> " + r.statusCode() + " " + r.body());
            }
            return LiveServer.JSON.readTree(r.body()).get("accepted").asLong();
        } catch (java.io.IOException e) {
            throw new java.io.UncheckedIOException(e);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            throw new IllegalStateException(e);
        }
    }
}
