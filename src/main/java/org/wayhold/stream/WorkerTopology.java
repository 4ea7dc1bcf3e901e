package org.wayhold.stream;

import org.apache.kafka.common.serialization.Serdes;
import org.apache.kafka.streams.Topology;
import org.apache.kafka.streams.state.Stores;
import org.wayhold.settings.Settings;
import org.wayhold.settings.WorkerSettings;

/**
 * The worker's topology, in one place:
 *
 * <pre>
 *   samples topic --(vehicle id, NDJSON)--> vehicles [store "vehicle-state", changelog] --+--> poses topic
 *                                                                                         +--> events topic
 *                                                                                         +--> dead-letter topic
 * </pre>
 *
 * The store keeps one entry per vehicle, in memory, with caching (a vehicle's state is written to the
 * changelog once per commit however many records it had) and a compacted changelog topic, which is
 * where the state lives durably: a worker that takes a vehicle over restores it from there.
 */
public final class WorkerTopology {

    static final String STORE = "vehicle-state";
    static final String SOURCE = "samples";
    static final String PROCESSOR = "vehicles";
    static final String POSES = "poses";
    static final String EVENTS = "events";
    static final String DEAD_LETTERS = "dead-letters";

    private WorkerTopology() {
    }

    /** The topology for these settings (topics from the {@code worker} section). */
    public static Topology build(Settings settings) {
        WorkerSettings w = settings.worker();
        Topology t = new Topology();
        t.addSource(SOURCE, Serdes.String().deserializer(), Serdes.ByteArray().deserializer(), w.samplesTopic());
        t.addProcessor(PROCESSOR, () -> new VehicleProcessor(new VehicleStep(settings)), SOURCE);
        t.addStateStore(Stores.keyValueStoreBuilder(Stores.inMemoryKeyValueStore(STORE), Serdes.String(),
                Serdes.ByteArray()).withCachingEnabled().withLoggingEnabled(java.util.Map.of()), PROCESSOR);
        t.addSink(POSES, w.posesTopic(), Serdes.String().serializer(), Serdes.ByteArray().serializer(), PROCESSOR);
        t.addSink(EVENTS, w.eventsTopic(), Serdes.String().serializer(), Serdes.ByteArray().serializer(), PROCESSOR);
        t.addSink(DEAD_LETTERS, w.deadLetterTopic(), Serdes.String().serializer(), Serdes.ByteArray().serializer(),
                PROCESSOR);
        return t;
    }

    /** The changelog topic Kafka Streams keeps the store in, for an application id. */
    public static String changelogTopic(String applicationId) {
        return applicationId + "-" + STORE + "-changelog";
    }
}
