package org.wayhold.stream;

import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Properties;
import java.util.UUID;
import java.util.function.Predicate;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.serialization.ByteArrayDeserializer;
import org.apache.kafka.common.serialization.ByteArraySerializer;
import org.apache.kafka.common.serialization.StringDeserializer;
import org.apache.kafka.common.serialization.StringSerializer;

/** Producing fleets' records to a topic and reading a topic back, committed records only. */
final class KafkaIo {

    private KafkaIo() {
    }

    /** Sends the records in order, keyed by vehicle, and waits until the broker acknowledged all. */
    static void produce(String bootstrap, String topic, List<Fleet.Batch> records) {
        Properties p = new Properties();
        p.put(ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, bootstrap);
        p.put(ProducerConfig.ACKS_CONFIG, "all");
        p.put(ProducerConfig.ENABLE_IDEMPOTENCE_CONFIG, true);
        p.put(ProducerConfig.LINGER_MS_CONFIG, 5);
        try (KafkaProducer<String, byte[]> producer = new KafkaProducer<>(p, new StringSerializer(),
                new ByteArraySerializer())) {
            for (Fleet.Batch b : records) {
                producer.send(new ProducerRecord<>(topic, b.vehicleId(), b.ndjson()));
            }
            producer.flush();
        }
    }

    /** A consumer of committed records only, from the beginning of every partition, in no group. */
    static KafkaConsumer<String, byte[]> committedReader(String bootstrap) {
        Properties p = new Properties();
        p.put(ConsumerConfig.BOOTSTRAP_SERVERS_CONFIG, bootstrap);
        p.put(ConsumerConfig.GROUP_ID_CONFIG, "test-reader-" + UUID.randomUUID());
        p.put(ConsumerConfig.ISOLATION_LEVEL_CONFIG, "read_committed");
        p.put(ConsumerConfig.AUTO_OFFSET_RESET_CONFIG, "earliest");
        p.put(ConsumerConfig.ENABLE_AUTO_COMMIT_CONFIG, false);
        return new KafkaConsumer<>(p, new StringDeserializer(), new ByteArrayDeserializer());
    }

    /**
     * Reads a topic's values by key, as text, until {@code done} holds for the count read so far or time
     * runs out, then for {@code settle} more (so that records beyond the expected ones would show);
     * {@code each} sees every record as it arrives.
     */
    static Map<String, List<String>> read(String bootstrap, String topic, Duration timeout, Duration settle,
                                          Predicate<Long> done,
                                          java.util.function.Consumer<ConsumerRecord<String, byte[]>> each) {
        Map<String, List<String>> out = new LinkedHashMap<>();
        long count = 0;
        long deadline = System.nanoTime() + timeout.toNanos();
        try (KafkaConsumer<String, byte[]> c = committedReader(bootstrap)) {
            c.subscribe(List.of(topic));
            long settleEnd = Long.MAX_VALUE;
            while (System.nanoTime() < Math.min(deadline, settleEnd)) {
                for (ConsumerRecord<String, byte[]> r : c.poll(Duration.ofMillis(200))) {
                    out.computeIfAbsent(r.key(), k -> new ArrayList<>()).add(new String(r.value(), StandardCharsets.UTF_8));
                    count++;
                    each.accept(r);
                }
                if (settleEnd == Long.MAX_VALUE && done.test(count)) {
                    settleEnd = System.nanoTime() + settle.toNanos();
                }
            }
        }
        return out;
    }

    static long total(Map<String, List<String>> byKey) {
        return byKey.values().stream().mapToLong(List::size).sum();
    }
}
