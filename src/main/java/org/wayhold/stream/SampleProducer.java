package org.wayhold.stream;

import java.util.Properties;
import java.util.concurrent.CompletableFuture;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.serialization.ByteArraySerializer;
import org.apache.kafka.common.serialization.StringSerializer;
import org.wayhold.http.SampleForwarder;
import org.wayhold.settings.WorkerSettings;

/**
 * HTTP ingest as a stateless producer ({@code serve --to-kafka}): each body becomes records of the
 * samples topic keyed by the vehicle, acknowledged by every in-sync replica ({@code acks=all}) before
 * the reply. Idempotent, so a retry inside the client never writes a record twice; records of one
 * vehicle keep their order (one partition, at most five requests in flight with idempotence).
 */
public final class SampleProducer implements SampleForwarder, AutoCloseable {

    private final KafkaProducer<String, byte[]> producer;
    private final String topic;

    public SampleProducer(String bootstrap, WorkerSettings w) {
        Properties p = new Properties();
        p.put(ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, bootstrap);
        p.put(ProducerConfig.ACKS_CONFIG, "all");
        p.put(ProducerConfig.ENABLE_IDEMPOTENCE_CONFIG, true);
        p.put(ProducerConfig.CLIENT_ID_CONFIG, w.applicationId() + "-ingest");
        // Batches of several vehicles' bodies share a request; 5 ms is small next to an HTTP round trip.
        p.put(ProducerConfig.LINGER_MS_CONFIG, 5);
        this.producer = new KafkaProducer<>(p, new StringSerializer(), new ByteArraySerializer());
        this.topic = w.samplesTopic();
    }

    @Override
    public CompletableFuture<Stored> forward(String vehicleId, byte[] samples) {
        CompletableFuture<Stored> done = new CompletableFuture<>();
        producer.send(new ProducerRecord<>(topic, vehicleId, samples), (metadata, error) -> {
            if (error != null) {
                done.completeExceptionally(error);
            } else {
                done.complete(new Stored(metadata.topic(), metadata.partition(), metadata.offset()));
            }
        });
        return done;
    }

    @Override
    public void close() {
        producer.close();
    }
}
