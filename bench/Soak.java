import java.io.BufferedReader;
import java.io.IOException;
import java.io.InputStreamReader;
import java.net.InetAddress;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.SplittableRandom;
import java.util.TreeMap;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicLong;
import java.util.concurrent.atomic.LongAdder;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import java.util.zip.GZIPInputStream;

/**
 * Soak client for bench/soak.sh (JDK only, run as a single source file: {@code java bench/Soak.java}).
 *
 * <p>N vehicles each post the next 1/M s of a recorded demo drive M times per second (so each vehicle
 * sends in real time, times --speed), D dashboards each make 5 reads per second (a random vehicle's
 * pose 4 times, the vehicle list once), for T minutes. Loopback only; every bound is checked.
 *
 * <p>Arguments: BASE_URL LOG N M T_MINUTES D SPEED [WRITE_TOKEN]. Prints one "key value" line per figure.
 *
 * <p>Kill mode (bench/soak.sh -k S): with SOAK_KILL_EVERY_S, SOAK_SERVER_CMD (a file, one argument of the
 * server's command per line) and SOAK_SERVER_LOG set, this program starts the server itself, kills it
 * with SIGKILL every S seconds and starts it again on the same --data directory. At each kill the
 * posters are held (their request in flight fails with the server); after the restart the samples
 * every vehicle holds are compared with what its acknowledged replies applied: a vehicle must hold
 * exactly those, plus at most the samples of requests whose reply never came. It also reads the
 * server's heap after a full GC (jcmd) at the start, before every kill and at the end.
 */
public final class Soak {

    private static final Pattern T_FIELD = Pattern.compile("\"t\":(-?[0-9.eE+]+)");
    private static final Pattern ACCEPTED = Pattern.compile("\"accepted\":(\\d+)");
    private static final Pattern REJECTED = Pattern.compile("\"rejected_count\":(\\d+)");
    private static final Pattern DUPLICATES = Pattern.compile("\"duplicates\":(\\d+)");

    private static final LongAdder ACCEPTED_SAMPLES = new LongAdder();
    private static final LongAdder REJECTED_SAMPLES = new LongAdder();
    private static final LongAdder SENT_SAMPLES = new LongAdder();
    private static final Map<String, LongAdder> STATUS = new ConcurrentHashMap<>();
    private static final LongAdder TRANSPORT_ERRORS = new LongAdder();
    private static final Latencies POST_LATENCY = new Latencies();
    private static final Latencies GET_LATENCY = new Latencies();
    private static final Gate GATE = new Gate();
    private static final Pattern HELD = Pattern.compile("\"vehicle\":\"(soak-\\d+)\",\"samples\":(\\d+)");

    public static void main(String[] args) throws Exception {
        if (args.length < 7) {
            throw new IllegalArgumentException("usage: BASE_URL LOG N M T_MINUTES D SPEED [WRITE_TOKEN]");
        }
        URI base = URI.create(args[0]);
        if (!InetAddress.getByName(base.getHost()).isLoopbackAddress()) {
            throw new IllegalArgumentException("loopback only, was " + base.getHost());
        }
        Path log = Path.of(args[1]);
        int vehicles = bounded("N", Integer.parseInt(args[2]), 1, 500);
        int postHz = bounded("M", Integer.parseInt(args[3]), 1, 50);
        double minutes = Double.parseDouble(args[4]);
        if (!(minutes > 0 && minutes <= 30)) {
            throw new IllegalArgumentException("T: must be in (0, 30] minutes, was " + minutes);
        }
        int dashboards = bounded("D", Integer.parseInt(args[5]), 0, 100);
        double speed = Double.parseDouble(args[6]);
        if (!(speed > 0 && speed <= 100)) {
            throw new IllegalArgumentException("SPEED: must be in (0, 100], was " + speed);
        }
        String token = args.length > 7 && !args[7].isBlank() ? args[7] : null;

        List<String> lines = readLines(log);
        double[] times = new double[lines.size()];
        for (int i = 0; i < lines.size(); i++) {
            Matcher m = T_FIELD.matcher(lines.get(i));
            if (!m.find()) {
                throw new IllegalStateException(log + " line " + (i + 1) + " has no t");
            }
            times[i] = Double.parseDouble(m.group(1));
        }
        double lapS = Math.ceil(times[times.length - 1] - times[0] + 1.0);

        HttpClient client = HttpClient.newBuilder().connectTimeout(Duration.ofSeconds(5))
                .executor(Executors.newFixedThreadPool(4)).build();
        String killEvery = System.getenv("SOAK_KILL_EVERY_S");
        Server server = null;
        List<String> heap = new ArrayList<>();
        if (killEvery != null) {
            server = new Server(Files.readAllLines(Path.of(System.getenv("SOAK_SERVER_CMD"))),
                    Path.of(System.getenv("SOAK_SERVER_LOG")), base, client);
            server.start();
            heap.add("start " + server.heapAfterGcMib());
        }
        long endNanos = System.nanoTime() + (long) (minutes * 60e9);
        // One thread per vehicle and per dashboard, so every one of them runs for the whole time.
        ExecutorService workers = Executors.newFixedThreadPool(vehicles + dashboards);
        AtomicLong requests = new AtomicLong();
        // Vehicle k starts k seconds into the drive so the fleet is not in lock step.
        List<Runnable> tasks = new ArrayList<>();
        List<Tally> tallies = new ArrayList<>();
        for (int k = 0; k < vehicles; k++) {
            String id = "soak-" + k;
            int offsetIndex = firstAtOrAfter(times, times[0] + k % (int) lapS);
            Tally tally = new Tally(id);
            tallies.add(tally);
            // In kill mode the vehicles post at phases spread over the period, as independent rigs would, so
            // that a kill finds requests in flight; otherwise all post together.
            long phaseNanos = killEvery == null ? 0 : (1_000_000_000L / postHz) * k / vehicles;
            tasks.add(new VehicleFeed(client, base, token, id, lines, times, lapS, offsetIndex, postHz, speed, endNanos,
                    tally, phaseNanos));
        }
        for (int d = 0; d < dashboards; d++) {
            tasks.add(new Dashboard(client, base, token, vehicles, endNanos, 1000L + d));
        }
        GATE.parties(tasks.size());
        for (Runnable t : tasks) {
            workers.submit(() -> {
                try {
                    t.run();
                } finally {
                    GATE.leave();
                }
            });
        }
        workers.shutdown();
        List<String> kills = new ArrayList<>();
        long[] sums = new long[4];
        if (server != null) {
            long periodNanos = (long) (Double.parseDouble(killEvery) * 1e9);
            long startNanos = System.nanoTime();
            SplittableRandom jitter = new SplittableRandom(20_261_205L);
            for (long at = startNanos + periodNanos; at < endNanos - 5_000_000_000L; at += periodNanos) {
                sleepUntil(at);
                heap.add(String.format(Locale.ROOT, "before_kill_%d %s", kills.size() + 1, server.heapAfterGcMib()));
                // Anywhere in a posting period after the forced GC, under load.
                sleepUntil(System.nanoTime() + 1_000_000_000L + jitter.nextLong(1_000_000_000L / postHz));
                kills.add(killAndCheck(server, tallies, token, (System.nanoTime() - startNanos) / 1e9, sums));
            }
        }
        if (!workers.awaitTermination((long) (minutes * 60 + 300), TimeUnit.SECONDS)) {
            workers.shutdownNow();
        }
        System.out.printf(Locale.ROOT, "vehicles %d%nposts_per_s_per_vehicle %d%nspeed %.1f%ndashboards %d%nminutes %.2f%n",
                vehicles, postHz, speed, dashboards, minutes);
        System.out.printf(Locale.ROOT, "samples_sent %d%nsamples_accepted %d%nsamples_rejected %d%n",
                SENT_SAMPLES.sum(), ACCEPTED_SAMPLES.sum(), REJECTED_SAMPLES.sum());
        TreeMap<String, Long> statuses = new TreeMap<>();
        STATUS.forEach((k, v) -> statuses.put(k, v.sum()));
        System.out.println("statuses " + statuses);
        long httpErrors = statuses.entrySet().stream()
                .filter(e -> !e.getKey().endsWith(" 200") && !e.getKey().endsWith(" 304"))
                .mapToLong(Map.Entry::getValue).sum();
        System.out.println("http_not_2xx_304 " + httpErrors);
        System.out.println("transport_errors " + TRANSPORT_ERRORS.sum());
        System.out.println("post " + POST_LATENCY.summary());
        System.out.println("get " + GET_LATENCY.summary());
        if (server != null) {
            for (String k : kills) {
                System.out.println(k);
            }
            System.out.printf(Locale.ROOT, "kills %d%nacknowledged_at_kills %d%nrecovered_of_them %d%n"
                            + "unacknowledged_found_durable %d%nvehicles_outside_bounds %d%n", kills.size(), sums[0],
                    sums[1], sums[2], sums[3]);
            // The end, without a kill: every vehicle holds exactly what it was told was applied, plus at most
            // the requests whose reply never came.
            Map<String, Long> held = held(client, base, token);
            long acked = 0;
            long have = 0;
            long outside = 0;
            for (Tally t : tallies) {
                long h = held.getOrDefault(t.id, 0L);
                acked += t.mustHave();
                have += Math.min(h, t.mustHave());
                if (h < t.mustHave() || h > t.mayHave()) {
                    outside++;
                }
            }
            System.out.printf(Locale.ROOT, "end acknowledged %d held_of_them %d vehicles_outside_bounds %d%n", acked, have,
                    outside);
            heap.add("end " + server.heapAfterGcMib());
            System.out.println("heap_after_gc_mib " + String.join(", ", heap));
            System.out.println("server_rss_mib_end " + server.rssMib());
            System.out.println("graceful_stop " + server.stop());
        }
        System.exit(0);
    }

    /**
     * SIGKILL, hold the posters, start again, and compare what each vehicle holds with its acknowledged
     * samples; then let the posters go on, counting from what the vehicle holds now.
     */
    private static String killAndCheck(Server server, List<Tally> tallies, String token, double atS, long[] sums)
            throws Exception {
        GATE.pause();
        server.kill();
        GATE.awaitParked();
        long t0 = System.nanoTime();
        server.start();
        double restartS = (System.nanoTime() - t0) / 1e9;
        Map<String, Long> held = held(server.client, server.base, token);
        long acked = 0;
        long recovered = 0;
        long extra = 0;
        long outside = 0;
        for (Tally t : tallies) {
            long h = held.getOrDefault(t.id, 0L);
            long must = t.mustHave();
            acked += must;
            recovered += Math.min(h, must);
            extra += Math.max(0, h - must);
            if (h < must || h > t.mayHave()) {
                outside++;
            }
            t.rebase(h);
        }
        sums[0] += acked;
        sums[1] += recovered;
        sums[2] += extra;
        sums[3] += outside;
        GATE.resume();
        return String.format(Locale.ROOT, "kill at %.0f s: acknowledged %d samples, recovered %d of them, %d more"
                + " (replies lost with the kill), %d vehicles outside the bounds, back in %.1f s (%s)", atS, acked,
                recovered, extra, outside, restartS, server.recoveryLine());
    }

    private static Map<String, Long> held(HttpClient client, URI base, String token) throws Exception {
        HttpRequest.Builder b = HttpRequest.newBuilder(base.resolve("/v1/vehicles")).timeout(Duration.ofSeconds(60));
        if (token != null) {
            b.header("Authorization", "Bearer " + token);
        }
        HttpResponse<String> r = client.send(b.build(), HttpResponse.BodyHandlers.ofString());
        Map<String, Long> out = new TreeMap<>();
        Matcher m = HELD.matcher(r.body());
        while (m.find()) {
            out.put(m.group(1), Long.parseLong(m.group(2)));
        }
        return out;
    }

    /** One vehicle's acknowledged samples since the last restart, over what it held then. */
    private static final class Tally {
        final String id;
        private long base;
        private long acked;
        private long unknown;

        Tally(String id) {
            this.id = id;
        }

        synchronized void acknowledged(long applied) {
            acked += applied;
        }

        /** A request whose reply never came: its samples may or may not have been applied. */
        synchronized void unknown(long samples) {
            unknown += samples;
        }

        synchronized long mustHave() {
            return base + acked;
        }

        synchronized long mayHave() {
            return base + acked + unknown;
        }

        synchronized void rebase(long held) {
            base = held;
            acked = 0;
            unknown = 0;
        }
    }

    /** Holds every poster and dashboard between a kill and the restart. */
    private static final class Gate {
        private boolean paused;
        private int parked;
        private int parties;

        synchronized void parties(int n) {
            parties = n;
        }

        synchronized void leave() {
            parties--;
            notifyAll();
        }

        synchronized void checkpoint() {
            if (!paused) {
                return;
            }
            // Counted once per stay: a thread woken while still paused waits again without notifying, so
            // that a hundred parked threads do not wake each other in turn.
            parked++;
            notifyAll();
            try {
                while (paused) {
                    wait();
                }
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
            } finally {
                parked--;
            }
        }

        synchronized void pause() {
            paused = true;
        }

        synchronized void awaitParked() throws InterruptedException {
            while (parked < parties) {
                wait(100);
            }
        }

        synchronized void resume() {
            paused = false;
            notifyAll();
        }
    }

    /** The server under test, started and killed by this program. */
    private static final class Server {
        final List<String> command;
        final Path log;
        final URI base;
        final HttpClient client;
        Process process;

        Server(List<String> command, Path log, URI base, HttpClient client) {
            this.command = command;
            this.log = log;
            this.base = base;
            this.client = client;
        }

        void start() throws Exception {
            ProcessBuilder pb = new ProcessBuilder(command).redirectErrorStream(true)
                    .redirectOutput(ProcessBuilder.Redirect.appendTo(log.toFile()));
            process = pb.start();
            long deadline = System.nanoTime() + 180_000_000_000L;
            while (System.nanoTime() < deadline) {
                if (!process.isAlive()) {
                    throw new IllegalStateException("the server exited with " + process.exitValue() + "; see " + log);
                }
                try {
                    HttpResponse<Void> r = client.send(HttpRequest.newBuilder(base.resolve("/health"))
                            .timeout(Duration.ofSeconds(5)).build(), HttpResponse.BodyHandlers.discarding());
                    if (r.statusCode() == 200) {
                        return;
                    }
                } catch (IOException e) {
                    // Not listening yet.
                }
                Thread.sleep(50);
            }
            throw new IllegalStateException("the server did not become ready; see " + log);
        }

        void kill() throws InterruptedException {
            process.destroyForcibly();
            process.waitFor();
        }

        String stop() throws Exception {
            process.destroy();
            if (!process.waitFor(120, TimeUnit.SECONDS)) {
                process.destroyForcibly();
                return "timed out";
            }
            String text = Files.readString(log);
            return "exit " + process.exitValue() + (text.contains("journal: closed with a snapshot")
                    ? ", closed with a snapshot" : ", no closing snapshot");
        }

        /** The last start-up report line of the server's log. */
        String recoveryLine() throws IOException {
            String found = "";
            for (String line : Files.readAllLines(log)) {
                if (line.startsWith("journal ") && line.contains("restored")) {
                    found = line.replaceFirst("^journal \\S+: ", "");
                }
            }
            return found;
        }

        /** Heap in use after a full GC (MiB), from jcmd. */
        String heapAfterGcMib() throws Exception {
            String pid = Long.toString(process.pid());
            run("jcmd", pid, "GC.run");
            double kib = 0;
            for (String line : run("jcmd", pid, "GC.heap_info").split("\n")) {
                if (line.contains("Metaspace")) {
                    break;
                }
                Matcher m = Pattern.compile("used (\\d+)K").matcher(line);
                if (m.find()) {
                    kib += Double.parseDouble(m.group(1));
                }
            }
            return String.format(Locale.ROOT, "%.1f", kib / 1024);
        }

        String rssMib() throws IOException {
            for (String line : Files.readAllLines(Path.of("/proc/" + process.pid() + "/status"))) {
                if (line.startsWith("VmRSS")) {
                    return String.format(Locale.ROOT, "%.1f", Long.parseLong(line.replaceAll("\\D", "")) / 1024.0);
                }
            }
            return "unknown";
        }

        private static String run(String... cmd) throws Exception {
            Process p = new ProcessBuilder(cmd).redirectErrorStream(true).start();
            String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
            p.waitFor();
            return out;
        }
    }

    private static int bounded(String name, int v, int lo, int hi) {
        if (v < lo || v > hi) {
            throw new IllegalArgumentException(name + ": must be in [" + lo + ", " + hi + "], was " + v);
        }
        return v;
    }

    private static List<String> readLines(Path log) throws IOException {
        List<String> lines = new ArrayList<>();
        try (BufferedReader r = new BufferedReader(new InputStreamReader(
                log.toString().endsWith(".gz") ? new GZIPInputStream(Files.newInputStream(log)) : Files.newInputStream(log),
                StandardCharsets.UTF_8))) {
            String line;
            while ((line = r.readLine()) != null) {
                if (!line.isBlank()) {
                    lines.add(line);
                }
            }
        }
        return lines;
    }

    private static int firstAtOrAfter(double[] times, double t) {
        int i = Arrays.binarySearch(times, t);
        return i >= 0 ? i : Math.min(times.length - 1, -i - 1);
    }

    private static void count(String method, int status) {
        STATUS.computeIfAbsent(method + " " + status, k -> new LongAdder()).increment();
    }

    /** One vehicle: posts the drive in slices of 1/M s, looping with shifted times, paced on wall time. */
    private record VehicleFeed(HttpClient client, URI base, String token, String id, List<String> lines,
                               double[] times, double lapS, int startIndex, int postHz, double speed,
                               long endNanos, Tally tally, long phaseNanos) implements Runnable {
        @Override
        public void run() {
            sleepUntil(System.nanoTime() + phaseNanos);
            URI uri = base.resolve("/v1/vehicles/" + id + "/samples");
            double sliceS = speed / postHz;
            long periodNanos = 1_000_000_000L / postHz;
            int i = startIndex;
            int lap = 0;
            double sliceEnd = times[startIndex] + sliceS;
            long next = System.nanoTime();
            while (System.nanoTime() < endNanos) {
                GATE.checkpoint();
                StringBuilder body = new StringBuilder(8192);
                int n = 0;
                while (times[i] < sliceEnd) {
                    String line = lines.get(i);
                    if (lap > 0) {
                        double t = times[i] + lap * lapS;
                        line = T_FIELD.matcher(line).replaceFirst("\"t\":" + BigDecimalText.of(t));
                    }
                    body.append(line).append('\n');
                    n++;
                    i++;
                    if (i == times.length) {
                        i = 0;
                        lap++;
                        sliceEnd -= lapS;
                    }
                }
                sliceEnd += sliceS;
                if (n > 0) {
                    SENT_SAMPLES.add(n);
                    HttpRequest.Builder b = HttpRequest.newBuilder(uri).timeout(Duration.ofSeconds(30))
                            .header("Content-Type", "application/x-ndjson")
                            .POST(HttpRequest.BodyPublishers.ofString(body.toString()));
                    if (token != null) {
                        b.header("Authorization", "Bearer " + token);
                    }
                    long t0 = System.nanoTime();
                    try {
                        HttpResponse<String> r = client.send(b.build(), HttpResponse.BodyHandlers.ofString());
                        POST_LATENCY.add(System.nanoTime() - t0);
                        count("POST", r.statusCode());
                        if (r.statusCode() == 200) {
                            ACCEPTED_SAMPLES.add(first(ACCEPTED, r.body()));
                            REJECTED_SAMPLES.add(first(REJECTED, r.body()));
                            tally.acknowledged(first(ACCEPTED, r.body()) - first(DUPLICATES, r.body()));
                        }
                    } catch (IOException | InterruptedException e) {
                        TRANSPORT_ERRORS.increment();
                        tally.unknown(n);
                    }
                }
                next += periodNanos;
                sleepUntil(next);
            }
        }
    }

    /** One dashboard: 5 reads a second, a random vehicle's pose 4 times and the vehicle list once. */
    private record Dashboard(HttpClient client, URI base, String token, int vehicles, long endNanos, long seed)
            implements Runnable {
        @Override
        public void run() {
            SplittableRandom r = new SplittableRandom(seed);
            long next = System.nanoTime();
            int tick = 0;
            while (System.nanoTime() < endNanos) {
                GATE.checkpoint();
                String path = tick % 5 == 4 ? "/v1/vehicles" : "/v1/vehicles/soak-" + r.nextInt(vehicles) + "/pose";
                HttpRequest.Builder b = HttpRequest.newBuilder(base.resolve(path)).timeout(Duration.ofSeconds(30)).GET();
                if (token != null) {
                    b.header("Authorization", "Bearer " + token);
                }
                long t0 = System.nanoTime();
                try {
                    HttpResponse<Void> resp = client.send(b.build(), HttpResponse.BodyHandlers.discarding());
                    GET_LATENCY.add(System.nanoTime() - t0);
                    // A vehicle that has not posted yet is a 404 in the first second: count it as such.
                    count("GET", resp.statusCode());
                } catch (IOException | InterruptedException e) {
                    TRANSPORT_ERRORS.increment();
                }
                tick++;
                next += 200_000_000L;
                sleepUntil(next);
            }
        }
    }

    private static long first(Pattern p, String body) {
        Matcher m = p.matcher(body);
        return m.find() ? Long.parseLong(m.group(1)) : 0;
    }

    private static void sleepUntil(long nanos) {
        long wait = nanos - System.nanoTime();
        if (wait > 0) {
            try {
                Thread.sleep(wait / 1_000_000, (int) (wait % 1_000_000));
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
            }
        }
    }

    /** Epoch seconds written in plain decimal, as the logs do. */
    private static final class BigDecimalText {
        static String of(double t) {
            return new java.math.BigDecimal(Double.toString(t)).toPlainString();
        }
    }

    /** Latencies in microseconds, kept whole (bounded by the run's request count). */
    private static final class Latencies {
        private final List<Long> micros = new ArrayList<>();

        synchronized void add(long nanos) {
            micros.add(nanos / 1000);
        }

        synchronized String summary() {
            if (micros.isEmpty()) {
                return "requests 0";
            }
            long[] a = micros.stream().mapToLong(Long::longValue).sorted().toArray();
            return String.format(Locale.ROOT, "requests %d p50_ms %.2f p99_ms %.2f max_ms %.2f", a.length,
                    a[(int) Math.floor(0.50 * (a.length - 1))] / 1000.0, a[(int) Math.floor(0.99 * (a.length - 1))] / 1000.0,
                    a[a.length - 1] / 1000.0);
        }
    }
}
