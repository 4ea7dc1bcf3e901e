package org.wayhold.http;

import java.util.concurrent.ConcurrentHashMap;
import java.util.function.LongSupplier;

/**
 * The per-vehicle sample rate limit: one token bucket per vehicle on wall-clock (monotonic) time, in
 * samples.
 *
 * <p>The bucket refills at {@code server.max_samples_per_second_per_vehicle} up to {@code rate_burst_s}
 * seconds of that rate. A request is admitted when its vehicle's bucket is not in debt; the samples it
 * carries are charged as they are read, and a large body may take the bucket below zero. The next
 * request of that vehicle then gets 429 with {@code Retry-After}, the time to pay the debt back. So a
 * body is never cut in the middle for its rate (only for its size), and over any interval of T seconds
 * a vehicle gets at most {@code rate * (T + burst) + max_samples_per_request} samples through.
 *
 * <p>This is about the cost of the filter, on the server's clock; it never looks at the samples' own
 * times, which may be of any date (a recorded drive replayed fast is fine up to the rate).
 *
 * <p>Memory: a bucket exists only for a vehicle that has a session (it is made by the first charge,
 * which follows the session's creation) and is dropped with the session, so the number of buckets is
 * bounded by {@code server.max_sessions}. Thread-safe.
 */
final class IngestRate {

    private final double ratePerS;
    private final double capacity;
    private final LongSupplier nanoClock;
    private final ConcurrentHashMap<String, Bucket> buckets = new ConcurrentHashMap<>();

    /**
     * @param ratePerS  sustained samples per second per vehicle (> 0)
     * @param burstS    bucket size as seconds of that rate (s, > 0)
     * @param nanoClock monotonic time (ns), {@link System#nanoTime} in service
     */
    IngestRate(double ratePerS, double burstS, LongSupplier nanoClock) {
        this.ratePerS = ratePerS;
        this.capacity = Math.max(1.0, ratePerS * burstS);
        this.nanoClock = nanoClock;
    }

    /**
     * Refuses a request of a vehicle whose bucket is in debt.
     *
     * @throws HttpProblem 429 with Retry-After in whole seconds, rounded up
     */
    void admit(String vehicleId) {
        Bucket b = buckets.get(vehicleId);
        if (b == null) {
            return;
        }
        double waitS = b.waitS(nanoClock.getAsLong());
        if (waitS > 0.0) {
            long retryAfterS = Math.max(1L, (long) Math.ceil(waitS));
            throw HttpProblem.tooManyRequests("vehicle", String.format(java.util.Locale.ROOT,
                    "'%s' sent samples faster than %.0f per second (server.max_samples_per_second_per_vehicle);"
                            + " retry in %d s", vehicleId, ratePerS, retryAfterS), retryAfterS);
        }
    }

    /** Charges samples read for a vehicle that has a session. */
    void charge(String vehicleId, int samples) {
        buckets.computeIfAbsent(vehicleId, id -> new Bucket(capacity, nanoClock.getAsLong()))
                .take(samples, nanoClock.getAsLong());
    }

    /** Forgets a vehicle whose session was removed. */
    void forget(String vehicleId) {
        buckets.remove(vehicleId);
    }

    /** Number of buckets held (count). */
    int size() {
        return buckets.size();
    }

    private final class Bucket {
        private double tokens;
        private long lastNanos;

        Bucket(double tokens, long nowNanos) {
            this.tokens = tokens;
            this.lastNanos = nowNanos;
        }

        private void refill(long nowNanos) {
            long elapsed = nowNanos - lastNanos;
            if (elapsed > 0) {
                tokens = Math.min(capacity, tokens + elapsed * 1e-9 * ratePerS);
                lastNanos = nowNanos;
            }
        }

        synchronized void take(int samples, long nowNanos) {
            refill(nowNanos);
            tokens -= samples;
        }

        /** Seconds until the bucket is out of debt; 0 when it is not in debt. */
        synchronized double waitS(long nowNanos) {
            refill(nowNanos);
            return tokens >= 0.0 ? 0.0 : -tokens / ratePerS;
        }
    }
}
