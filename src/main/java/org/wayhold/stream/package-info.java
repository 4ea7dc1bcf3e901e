/**
 * The fleet mode on Apache Kafka: {@code wayhold worker} runs the same per-vehicle pipeline as the
 * service ({@link org.wayhold.pipeline.VehiclePipeline}) as a Kafka Streams application, and
 * {@code serve --from-kafka} reads the poses it writes.
 *
 * <p>Topology: samples (NDJSON text, keyed by vehicle id) -> {@link org.wayhold.stream.VehicleProcessor}
 * (one vehicle's state from an in-memory store with a compacted changelog) -> poses, outage events and
 * refused samples, each a topic keyed by vehicle id. Processing is exactly-once ({@code exactly_once_v2}):
 * the state change, the output records and the input offsets of a record commit in one transaction.
 *
 * <p>Units and frames are the pipeline's: times in seconds on the vehicle's clock, positions in the
 * session's ENU frame or WGS-84 degrees, as in the pose JSON. Wall-clock times appear only as Kafka record
 * timestamps (ms since the Unix epoch).
 */
package org.wayhold.stream;
