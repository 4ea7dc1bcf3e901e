/**
 * Per-vehicle time ordering. Samples of one vehicle may arrive out of order (GNSS latency, separate
 * HTTP batches per stream); samples up to {@code max_lag_s} older than the newest are applied in time
 * order by returning to a checkpoint and re-filtering, so the result equals in-order processing.
 *
 * <p>Times are seconds on the vehicle's clock. Order is by time, then by the rank of the sample's type
 * ({@link org.wayhold.sample.SampleType#rank()}: yaw rate, wheel speed, GNSS, reference), then by
 * arrival.
 */
package org.wayhold.ordering;
