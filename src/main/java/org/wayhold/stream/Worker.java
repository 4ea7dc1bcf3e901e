package org.wayhold.stream;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.Comparator;
import java.util.List;
import java.util.Properties;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicReference;
import java.util.stream.Stream;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.admin.AdminClientConfig;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.streams.KafkaStreams;
import org.apache.kafka.streams.StreamsConfig;
import org.apache.kafka.streams.errors.StreamsUncaughtExceptionHandler;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;
import org.wayhold.settings.Settings;
import org.wayhold.settings.WorkerSettings;

/**
 * One worker of the fleet mode: the topology of {@link WorkerTopology} run by Kafka Streams with
 * exactly-once processing. Workers with the same {@code worker.application_id} share the samples
 * topic's partitions, and so the vehicles; when one stops or dies, the others take its partitions over
 * and restore their vehicles' state from the changelog.
 *
 * <p>The state stores are in memory, so the state directory holds only Kafka Streams' locks and
 * offset files: each worker takes a fresh temporary one and deletes it when it stops.
 */
public final class Worker implements AutoCloseable {

    private static final Logger LOG = LoggerFactory.getLogger(Worker.class);

    /**
     * Spacing of the probing rebalances that move vehicles to a worker that joined a running fleet once
     * it has restored their state (ms): Kafka Streams' minimum, so a new worker takes its share within a
     * minute or two rather than the default ten.
     */
    static final long PROBING_REBALANCE_MS = 60_000;

    private final Settings settings;
    private final String bootstrap;
    private final Path stateDir;
    private final CountDownLatch running = new CountDownLatch(1);
    private final CountDownLatch ended = new CountDownLatch(1);
    private final AtomicReference<Throwable> failure = new AtomicReference<>();
    private KafkaStreams streams;

    /**
     * @param settings  the pipeline's settings and the {@code worker} section
     * @param bootstrap {@code HOST:PORT[,HOST:PORT...]} of the Kafka cluster
     */
    public Worker(Settings settings, String bootstrap) {
        this.settings = settings;
        this.bootstrap = bootstrap;
        try {
            this.stateDir = Files.createTempDirectory("wayhold-worker-");
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /** The Kafka Streams configuration of a worker. */
    static Properties properties(WorkerSettings w, String bootstrap, Path stateDir) {
        Properties p = new Properties();
        p.put(StreamsConfig.APPLICATION_ID_CONFIG, w.applicationId());
        p.put(StreamsConfig.BOOTSTRAP_SERVERS_CONFIG, bootstrap);
        p.put(StreamsConfig.PROCESSING_GUARANTEE_CONFIG, StreamsConfig.EXACTLY_ONCE_V2);
        p.put(StreamsConfig.NUM_STREAM_THREADS_CONFIG, w.threads());
        p.put(StreamsConfig.NUM_STANDBY_REPLICAS_CONFIG, w.standbyReplicas());
        p.put(StreamsConfig.COMMIT_INTERVAL_MS_CONFIG, Math.max(1L, Math.round(w.commitIntervalS() * 1000.0)));
        p.put(StreamsConfig.REPLICATION_FACTOR_CONFIG, w.replicationFactor());
        p.put(StreamsConfig.STATE_DIR_CONFIG, stateDir.toString());
        p.put(StreamsConfig.PROBING_REBALANCE_INTERVAL_MS_CONFIG, PROBING_REBALANCE_MS);
        // The topology has no global state; enabling the handler there is the coming default and keeps
        // Kafka Streams from warning about it at every start.
        p.put(StreamsConfig.PROCESSING_EXCEPTION_HANDLER_GLOBAL_ENABLED_CONFIG, true);
        long sessionMs = Math.max(1L, Math.round(w.sessionTimeoutS() * 1000.0));
        p.put(StreamsConfig.consumerPrefix(ConsumerConfig.SESSION_TIMEOUT_MS_CONFIG), (int) sessionMs);
        // Three heartbeats per session timeout, the clients' usual ratio.
        p.put(StreamsConfig.consumerPrefix(ConsumerConfig.HEARTBEAT_INTERVAL_MS_CONFIG), (int) Math.max(1L, sessionMs / 3));
        return p;
    }

    /**
     * Checks (and creates when allowed) the topics, then starts processing. Returns once the stream
     * threads run; vehicles are assigned during the first rebalance ({@link #awaitRunning}).
     *
     * @return the topics created
     */
    public List<String> start() throws WorkerTopics.Refused, InterruptedException {
        WorkerSettings w = settings.worker();
        List<String> created;
        Properties admin = new Properties();
        admin.put(AdminClientConfig.BOOTSTRAP_SERVERS_CONFIG, bootstrap);
        try (Admin a = Admin.create(admin)) {
            created = WorkerTopics.prepare(a, w);
        }
        streams = new KafkaStreams(WorkerTopology.build(settings), properties(w, bootstrap, stateDir));
        streams.setUncaughtExceptionHandler(e -> {
            // A record the pipeline cannot take goes to the dead-letter topic; an exception here is a
            // state this version cannot read or a bug. Stop rather than skip: another worker, or this one
            // after a fix, applies the record from the last commit, so nothing is lost.
            LOG.error("worker: stopping on an unexpected error", e);
            failure.compareAndSet(null, e);
            return StreamsUncaughtExceptionHandler.StreamThreadExceptionResponse.SHUTDOWN_CLIENT;
        });
        streams.setStateListener((now, before) -> {
            if (now == KafkaStreams.State.RUNNING) {
                running.countDown();
            } else if (now == KafkaStreams.State.ERROR || now == KafkaStreams.State.NOT_RUNNING
                    || now == KafkaStreams.State.PENDING_ERROR) {
                ended.countDown();
            }
        });
        streams.start();
        return created;
    }

    /** Waits until the worker runs (its first rebalance is done); false when it ended or time ran out. */
    public boolean awaitRunning(Duration timeout) throws InterruptedException {
        long deadline = System.nanoTime() + timeout.toNanos();
        while (System.nanoTime() < deadline) {
            if (running.await(50, TimeUnit.MILLISECONDS)) {
                return true;
            }
            if (ended.getCount() == 0) {
                return false;
            }
        }
        return false;
    }

    /** Waits until the worker has ended (an error, or {@link #close}); false when time ran out. */
    public boolean awaitEnd(Duration timeout) throws InterruptedException {
        return ended.await(timeout.toMillis(), TimeUnit.MILLISECONDS);
    }

    /** The error that stopped the worker, or null. */
    public Throwable failure() {
        return failure.get();
    }

    /** Kafka Streams' state of this worker, or null before {@link #start}. */
    public KafkaStreams.State state() {
        return streams == null ? null : streams.state();
    }

    /**
     * Stops cleanly: the open transaction commits, the group hears that this worker leaves (so the
     * others take its vehicles over at once rather than after the session timeout), and the state
     * directory is deleted.
     */
    @Override
    public void close() {
        if (streams != null) {
            streams.close(new KafkaStreams.CloseOptions().timeout(Duration.ofSeconds(30)).leaveGroup(true));
        }
        ended.countDown();
        deleteStateDir();
    }

    private void deleteStateDir() {
        try (Stream<Path> paths = Files.walk(stateDir)) {
            paths.sorted(Comparator.reverseOrder()).forEach(p -> p.toFile().delete());
        } catch (IOException e) {
            LOG.debug("worker: state directory {} left behind: {}", stateDir, e.toString());
        }
    }
}
