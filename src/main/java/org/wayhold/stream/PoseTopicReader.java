package org.wayhold.stream;

import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Properties;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.common.PartitionInfo;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.errors.WakeupException;
import org.apache.kafka.common.serialization.ByteArrayDeserializer;
import org.apache.kafka.common.serialization.StringDeserializer;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;
import org.wayhold.http.PoseBoard;
import org.wayhold.settings.WorkerSettings;

/**
 * Reads the workers' poses topic into a {@link PoseBoard}, for {@code serve --from-kafka}: every
 * partition, from the start of what the topic keeps, committed records only ({@code read_committed}:
 * a worker's poses count once its transaction has committed, so a worker that died mid-way shows
 * nothing it will redo). No consumer group: every read service sees every vehicle, and any number of
 * them can run.
 */
public final class PoseTopicReader implements AutoCloseable {

    private static final Logger LOG = LoggerFactory.getLogger(PoseTopicReader.class);

    private final KafkaConsumer<String, byte[]> consumer;
    private final String topic;
    private final PoseBoard board;
    private final Thread thread;
    private volatile boolean closed;

    /**
     * @param bootstrap {@code HOST:PORT[,HOST:PORT...]} of the Kafka cluster
     */
    public PoseTopicReader(String bootstrap, WorkerSettings w, PoseBoard board) {
        Properties p = new Properties();
        p.put(ConsumerConfig.BOOTSTRAP_SERVERS_CONFIG, bootstrap);
        p.put(ConsumerConfig.ISOLATION_LEVEL_CONFIG, "read_committed");
        p.put(ConsumerConfig.ENABLE_AUTO_COMMIT_CONFIG, false);
        p.put(ConsumerConfig.CLIENT_ID_CONFIG, w.applicationId() + "-reader");
        this.consumer = new KafkaConsumer<>(p, new StringDeserializer(), new ByteArrayDeserializer());
        this.topic = w.posesTopic();
        this.board = board;
        this.thread = new Thread(this::run, "poses-from-kafka");
        this.thread.setDaemon(true);
    }

    /**
     * Assigns every partition of the poses topic and starts reading from their beginnings.
     *
     * @throws IllegalStateException when the topic does not exist
     */
    public PoseTopicReader start() {
        List<PartitionInfo> infos = consumer.partitionsFor(topic, Duration.ofSeconds(60));
        if (infos == null || infos.isEmpty()) {
            consumer.close();
            throw new IllegalStateException("--from-kafka: topic " + topic + " (worker.poses_topic) does not exist;"
                    + " start a worker first, which creates it");
        }
        List<TopicPartition> partitions = new ArrayList<>();
        for (PartitionInfo i : infos) {
            partitions.add(new TopicPartition(topic, i.partition()));
        }
        consumer.assign(partitions);
        consumer.seekToBeginning(partitions);
        thread.start();
        return this;
    }

    private void run() {
        try {
            Map<TopicPartition, Long> ends = consumer.endOffsets(consumer.assignment());
            boolean caughtUp = false;
            while (!closed) {
                for (ConsumerRecord<String, byte[]> r : consumer.poll(Duration.ofMillis(500))) {
                    // The record's timestamp is the samples record's (see PoseBoard): when they arrived.
                    board.put(r.key(), r.value(), r.timestamp());
                }
                if (!caughtUp && ends.entrySet().stream().allMatch(e -> consumer.position(e.getKey()) >= e.getValue())) {
                    caughtUp = true;
                    board.caughtUp();
                    LOG.info("poses from kafka: caught up with topic {} ({} vehicles)", topic, board.size());
                }
            }
        } catch (WakeupException e) {
            // close() woke the poll up.
        } catch (RuntimeException e) {
            LOG.error("poses from kafka: reading {} stopped", topic, e);
        } finally {
            consumer.close();
        }
    }

    /** Stops reading; waits up to ten seconds for the reading thread to close the consumer. */
    @Override
    public void close() {
        closed = true;
        consumer.wakeup();
        try {
            thread.join(10_000);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }
}
