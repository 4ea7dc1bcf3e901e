/**
 * NDJSON and JSON text to {@link org.wayhold.sample.Sample} records, and back.
 *
 * <p>The wire format is the sample log of the interface contract: one JSON object per line with
 * {@code type} ({@code gnss}, {@code wheel_speed}, {@code yaw_rate}, {@code reference}) and {@code t}
 * (seconds on the vehicle's clock, a double such as UTC epoch seconds). Field names on the wire carry
 * no unit suffix; their units are fixed by the contract: {@code lat}, {@code lon}, {@code course},
 * {@code heading} in degrees (WGS-84; course and heading clockwise from true north), {@code alt},
 * {@code sigma_h}, {@code sigma_v} in metres, {@code speed} in m/s, {@code rate} in rad/s positive
 * counter-clockwise seen from above (z up).
 *
 * <p>A bad line never aborts a batch: it becomes a {@link org.wayhold.ingest.LineError} with its
 * 1-based line number and a reason that starts with the offending field name, and the valid lines
 * around it are kept. Fields the reader does not know are skipped whatever their value, so newer
 * senders can add fields without breaking older readers.
 */
package org.wayhold.ingest;
