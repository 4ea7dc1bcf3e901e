package org.wayhold.stream;

import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Properties;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.ConcurrentLinkedQueue;
import java.util.concurrent.atomic.AtomicBoolean;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.serialization.ByteArraySerializer;
import org.apache.kafka.common.serialization.StringSerializer;
import org.wayhold.config.ConfigLoader;
import org.wayhold.sample.Sample;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.SimulationSettings;
import org.wayhold.testing.KafkaBroker;
import org.wayhold.testing.WorkerChild;

/**
 * Figures of the fleet mode with a broker in this JVM (not a test: it prints). Run by hand, see
 * {@code bench/RESULTS.md}:
 *
 * <pre>
 * mvn -B -ntp -q test-compile dependency:build-classpath -Dmdep.outputFile=target/cp.txt &&
 * java -cp target/classes:target/test-classes:$(cat target/cp.txt) org.wayhold.stream.WorkerFiguresMain 100 120 100 90
 * </pre>
 *
 * Arguments: vehicles and drive seconds of the backlog run, vehicles and seconds of the live run (0
 * vehicles: no live run), seconds of samples per record in the backlog run (default 1).
 *
 * <ol>
 *   <li>Backlog: every record produced first, then one worker started; samples per second from its
 *       first pose to its last, and each vehicle's state size in the changelog.</li>
 *   <li>Live: two workers (one a child JVM), each vehicle sending one record of one second of samples
 *       per second of wall time; end-to-end latency from the record's timestamp (when the samples were
 *       produced) to the pose's arrival at a {@code read_committed} reader; then SIGKILL of the child and
 *       the time until every vehicle's poses flow again.</li>
 * </ol>
 */
public final class WorkerFiguresMain {

    private WorkerFiguresMain() {
    }

    public static void main(String[] args) throws Exception {
        int backlogVehicles = args.length > 0 ? Integer.parseInt(args[0]) : 100;
        double backlogS = args.length > 1 ? Double.parseDouble(args[1]) : 120;
        int liveVehicles = args.length > 2 ? Integer.parseInt(args[2]) : 100;
        int liveS = args.length > 3 ? Integer.parseInt(args[3]) : 90;
        double recordS = args.length > 4 ? Double.parseDouble(args[4]) : 1.0;
        KafkaBroker.logLevel("error");
        try (KafkaBroker broker = KafkaBroker.start()) {
            backlog(broker, backlogVehicles, backlogS, recordS);
            if (liveVehicles > 0) {
                live(broker, liveVehicles, liveS);
            }
        }
    }

    private static Settings settings(String yaml) throws Exception {
        Path f = Files.createTempFile("wayhold-figures-", ".yaml");
        Files.writeString(f, yaml);
        Settings s = ConfigLoader.loadOrDefaults(f);
        Files.delete(f);
        return s;
    }

    private static List<List<Fleet.Batch>> fleet(int vehicles, double driveS, long seed) {
        return fleet(vehicles, driveS, seed, 1.0);
    }

    private static List<List<Fleet.Batch>> fleet(int vehicles, double driveS, long seed, double recordS) {
        List<List<Fleet.Batch>> perVehicle = new ArrayList<>();
        for (int v = 0; v < vehicles; v++) {
            List<Sample> drive = Fleet.drive(SimulationSettings.defaults().withDurationS(driveS), seed + v);
            perVehicle.add(Fleet.batches(String.format(Locale.ROOT, "veh-%05d", v), drive, recordS));
        }
        return perVehicle;
    }

    private static void backlog(KafkaBroker broker, int vehicles, double driveS, double recordS) throws Exception {
        Settings settings = settings("""
                worker:
                  application_id: figures-backlog
                  samples_topic: backlog.samples
                  poses_topic: backlog.poses
                  events_topic: backlog.events
                  dead_letter_topic: backlog.rejected
                  partitions: 6
                  replication_factor: 1
                """);
        List<Fleet.Batch> records = Fleet.interleave(fleet(vehicles, driveS, 9000, recordS));
        long samples = records.stream().mapToLong(b -> b.samples().size()).sum();
        long bytes = records.stream().mapToLong(b -> b.ndjson().length).sum();
        long expectedPoses = KafkaIo.total(Fleet.servicePoses(settings, records));
        Properties admin = new Properties();
        admin.put("bootstrap.servers", broker.bootstrap());
        try (Admin a = Admin.create(admin)) {
            WorkerTopics.prepare(a, settings.worker());
        }
        KafkaIo.produce(broker.bootstrap(), settings.worker().samplesTopic(), records);
        long[] firstLast = {0, 0};
        try (Worker worker = new Worker(settings, broker.bootstrap())) {
            worker.start();
            KafkaIo.read(broker.bootstrap(), settings.worker().posesTopic(), Duration.ofMinutes(15), Duration.ZERO,
                    n -> n >= expectedPoses, r -> {
                        long now = System.nanoTime();
                        if (firstLast[0] == 0) {
                            firstLast[0] = now;
                        }
                        firstLast[1] = now;
                    });
        }
        double seconds = (firstLast[1] - firstLast[0]) / 1e9;
        System.out.printf(Locale.ROOT, "backlog: %d vehicles x %.0f s, %d records of %.2f s (%.1f MB), %d samples, %d"
                + " poses%n", vehicles, driveS, records.size(), recordS, bytes / 1e6, samples, expectedPoses);
        System.out.printf(Locale.ROOT, "backlog: one worker, 1 stream thread, commit every %.1f s: %.1f s from first to"
                        + " last pose = %.0f samples/s, %.0f records/s%n",
                settings.worker().commitIntervalS(), seconds, samples / seconds, records.size() / seconds);
        stateSizes(broker, WorkerTopology.changelogTopic(settings.worker().applicationId()));
    }

    /** The latest state per vehicle in the changelog: sizes. */
    private static void stateSizes(KafkaBroker broker, String changelog) {
        Map<String, Integer> latest = new HashMap<>();
        long[] records = {0};
        try (KafkaConsumer<String, byte[]> c = KafkaIo.committedReader(broker.bootstrap())) {
            c.subscribe(List.of(changelog));
            long idleSince = System.nanoTime();
            while (System.nanoTime() - idleSince < 5_000_000_000L) {
                for (ConsumerRecord<String, byte[]> r : c.poll(Duration.ofMillis(200))) {
                    idleSince = System.nanoTime();
                    records[0]++;
                    if (r.value() != null) {
                        latest.put(r.key(), r.value().length);
                    }
                }
            }
        }
        int[] sizes = latest.values().stream().mapToInt(Integer::intValue).sorted().toArray();
        System.out.printf(Locale.ROOT, "state: %d vehicles in the changelog (%d records written), bytes per vehicle:"
                        + " mean %.0f, median %d, max %d%n", sizes.length, records[0],
                Arrays.stream(sizes).average().orElse(0), sizes[sizes.length / 2], sizes[sizes.length - 1]);
    }

    private static void live(KafkaBroker broker, int vehicles, int seconds) throws Exception {
        String yaml = """
                worker:
                  application_id: figures-live
                  samples_topic: live.samples
                  poses_topic: live.poses
                  events_topic: live.events
                  dead_letter_topic: live.rejected
                  partitions: 6
                  replication_factor: 1
                """;
        Settings settings = settings(yaml);
        Path config = Files.createTempFile("wayhold-figures-", ".yaml");
        Files.writeString(config, yaml);
        List<List<Fleet.Batch>> perVehicle = fleet(vehicles, seconds + 2, 7000);
        Path log = Files.createTempFile("wayhold-figures-child-", ".log");
        try (Worker worker = new Worker(settings, broker.bootstrap())) {
            worker.start();
            worker.awaitRunning(Duration.ofSeconds(60));
            WorkerChild child = WorkerChild.start(log, List.of("--bootstrap", broker.bootstrap(), "--config",
                    config.toString()), 120);
            Thread.sleep(8000);

            ConcurrentLinkedQueue<long[]> latencies = new ConcurrentLinkedQueue<>();
            Map<String, Long> lastArrival = new ConcurrentHashMap<>();
            Map<String, Long> gapAfterKill = new ConcurrentHashMap<>();
            long[] killedAtMs = {Long.MAX_VALUE};
            AtomicBoolean stop = new AtomicBoolean();
            Thread reader = new Thread(() -> {
                try (KafkaConsumer<String, byte[]> c = KafkaIo.committedReader(broker.bootstrap())) {
                    c.subscribe(List.of(settings.worker().posesTopic()));
                    while (!stop.get()) {
                        for (ConsumerRecord<String, byte[]> r : c.poll(Duration.ofMillis(100))) {
                            long now = System.currentTimeMillis();
                            latencies.add(new long[] {r.timestamp(), now});
                            Long last = lastArrival.put(r.key(), now);
                            if (last != null && now > killedAtMs[0]) {
                                gapAfterKill.merge(r.key(), now - last, Math::max);
                            }
                        }
                    }
                }
            });
            reader.start();
            Properties p = new Properties();
            p.put(ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrap());
            p.put(ProducerConfig.ACKS_CONFIG, "all");
            p.put(ProducerConfig.LINGER_MS_CONFIG, 5);
            long start = System.currentTimeMillis();
            try (KafkaProducer<String, byte[]> producer = new KafkaProducer<>(p, new StringSerializer(),
                    new ByteArraySerializer())) {
                for (int i = 0; i < seconds; i++) {
                    for (List<Fleet.Batch> v : perVehicle) {
                        if (i < v.size()) {
                            Fleet.Batch b = v.get(i);
                            producer.send(new ProducerRecord<>(settings.worker().samplesTopic(), b.vehicleId(), b.ndjson()));
                        }
                    }
                    producer.flush();
                    if (i == seconds / 2) {
                        killedAtMs[0] = System.currentTimeMillis();
                        child.kill();
                    }
                    long next = start + (i + 1) * 1000L;
                    Thread.sleep(Math.max(0, next - System.currentTimeMillis()));
                }
            }
            Thread.sleep(20_000);
            stop.set(true);
            reader.join();

            List<Long> before = new ArrayList<>();
            for (long[] l : latencies) {
                if (l[1] < killedAtMs[0] && l[1] > start + 10_000) {
                    before.add(l[1] - l[0]);
                }
            }
            long[] sorted = before.stream().mapToLong(Long::longValue).sorted().toArray();
            // Each vehicle's poses arrive about once a second (one commit per record); the longest pause
            // after the kill is the takeover of the killed worker's vehicles.
            long takeoverMs = gapAfterKill.values().stream().mapToLong(Long::longValue).max().orElse(-1);
            long slowVehicles = gapAfterKill.values().stream().filter(g -> g > 3000).count();
            System.out.printf(Locale.ROOT, "live: %d vehicles, one 1 s record each per second (%d samples/s), two"
                            + " workers, commit every %.1f s, session timeout %.0f s%n", vehicles,
                    perVehicle.stream().mapToLong(v -> v.get(0).samples().size()).sum(),
                    settings.worker().commitIntervalS(), settings.worker().sessionTimeoutS());
            System.out.printf(Locale.ROOT, "live: latency from the samples' record to the pose at a read_committed reader"
                            + " (%d poses before the kill): p50 %d ms, p99 %d ms, max %d ms%n", sorted.length,
                    sorted[sorted.length / 2], sorted[(int) Math.floor(0.99 * (sorted.length - 1))],
                    sorted[sorted.length - 1]);
            System.out.printf(Locale.ROOT, "live: after SIGKILL of one worker, the longest pause of a vehicle's poses was"
                    + " %.1f s (%d of %d vehicles paused more than 3 s: the killed worker's)%n", takeoverMs / 1000.0,
                    slowVehicles, gapAfterKill.size());
        }
        Files.deleteIfExists(config);
    }
}
