package org.wayhold.session;

import java.io.IOException;
import java.io.InterruptedIOException;
import java.util.List;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.ExecutionException;
import org.wayhold.sample.Sample;

/**
 * Where a {@link SessionRegistry} records what it applied, so that a restart can apply it again.
 *
 * <p>Both methods are called while the vehicle's session is locked, right after the change, so the
 * log's order per vehicle is the order of application. They must copy what they need before returning
 * (the caller may reuse the list) and must not block on the device: the returned future completes once
 * the record is durable, or exceptionally when it cannot be written. Callers wait on it outside the
 * lock, before acknowledging.
 */
public interface SessionLog {

    /** Records a batch exactly as it was handed to {@link VehicleSession#submit}. */
    CompletableFuture<?> batch(String vehicleId, List<? extends Sample> samples);

    /** Records that a vehicle's session was dropped. */
    CompletableFuture<?> delete(String vehicleId);

    /** A recording that is already durable. */
    CompletableFuture<Void> DONE = CompletableFuture.completedFuture(null);

    /** Records nothing: sessions live only in memory (tests, offline tools). */
    SessionLog NONE = new SessionLog() {

        @Override
        public CompletableFuture<?> batch(String vehicleId, List<? extends Sample> samples) {
            return DONE;
        }

        @Override
        public CompletableFuture<?> delete(String vehicleId) {
            return DONE;
        }
    };

    /**
     * Waits until a record is durable.
     *
     * @throws IOException when it could not be written (or the wait was interrupted)
     */
    static void await(CompletableFuture<?> recorded) throws IOException {
        try {
            recorded.get();
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            throw new InterruptedIOException("interrupted while waiting for the session log");
        } catch (ExecutionException e) {
            Throwable cause = e.getCause();
            throw cause instanceof IOException io ? io : new IOException(String.valueOf(cause), cause);
        }
    }
}
