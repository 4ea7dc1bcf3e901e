package org.wayhold.stream;

import org.apache.kafka.streams.processor.api.Processor;
import org.apache.kafka.streams.processor.api.ProcessorContext;
import org.apache.kafka.streams.processor.api.Record;
import org.apache.kafka.streams.processor.api.RecordMetadata;
import org.apache.kafka.streams.state.KeyValueStore;

/**
 * Moves one record between Kafka and {@link VehicleStep}: reads the vehicle's state from the store,
 * applies the record, puts the new state back and forwards poses, outage events and dead letters to
 * their sinks. Output records keep the input record's timestamp (the time the samples were produced),
 * so a reader sees how long a pose took from its samples.
 *
 * <p>Under exactly-once processing the store's changelog writes, the forwarded records and the input
 * offset commit together; a worker that dies mid-transaction leaves nothing visible to
 * {@code read_committed} readers, and the worker that takes over restores the state as of the last
 * commit and applies the record again.
 */
final class VehicleProcessor implements Processor<String, byte[], String, byte[]> {

    private final VehicleStep step;
    private ProcessorContext<String, byte[]> context;
    private KeyValueStore<String, byte[]> store;

    VehicleProcessor(VehicleStep step) {
        this.step = step;
    }

    @Override
    public void init(ProcessorContext<String, byte[]> context) {
        this.context = context;
        this.store = context.getStateStore(WorkerTopology.STORE);
    }

    @Override
    public void process(Record<String, byte[]> record) {
        String vehicleId = record.key();
        RecordMetadata m = context.recordMetadata().orElse(null);
        VehicleStep.Source source = m == null ? new VehicleStep.Source(null, -1, -1)
                : new VehicleStep.Source(m.topic(), m.partition(), m.offset());
        byte[] state = step.validVehicleId(vehicleId) ? store.get(vehicleId) : null;
        VehicleStep.Outcome o = step.apply(vehicleId, state, record.value(), source);
        if (o.state() != null) {
            store.put(vehicleId, o.state());
        }
        for (VehicleStep.PoseRecord p : o.poses()) {
            context.forward(record.withValue(p.json()), WorkerTopology.POSES);
        }
        for (byte[] e : o.events()) {
            context.forward(record.withValue(e), WorkerTopology.EVENTS);
        }
        for (byte[] d : o.deadLetters()) {
            context.forward(record.withValue(d), WorkerTopology.DEAD_LETTERS);
        }
    }
}
