package org.wayhold.http;

import java.util.concurrent.CompletableFuture;

/**
 * Where {@code serve --to-kafka} hands a vehicle's samples on: a record of the workers' samples topic.
 * Kept free of Kafka so that the HTTP side only knows that a body was stored somewhere durable.
 */
@FunctionalInterface
public interface SampleForwarder {

    /**
     * Where a record went.
     *
     * @param topic     the topic
     * @param partition its partition
     * @param offset    its offset in the partition
     */
    record Stored(String topic, int partition, long offset) {
    }

    /**
     * Sends one record of NDJSON sample lines, or of a JSON array of samples, keyed by the vehicle.
     *
     * @return completes once the broker has acknowledged the record (all in-sync replicas), or
     *         exceptionally when it refused it or could not be reached
     */
    CompletableFuture<Stored> forward(String vehicleId, byte[] samples);
}
