package org.wayhold.session;

import java.io.IOException;
import java.io.InterruptedIOException;
import java.util.List;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.ExecutionException;
import org.wayhold.sample.Sample;

/**
 * Where a {@link SessionRegistry} records what it changes, so that a restart can apply it again.
 *
 * <p>Both methods are called while the vehicle's session is locked, before the change is applied
 * (write-ahead; see {@link VehicleSession}), so the log's order per vehicle is the order of application.
 * They must copy what they need before returning (the caller may reuse the list) and must not block on
 * the device: the returned future completes with the record's sequence number once it is durable, or
 * exceptionally when it cannot be written; the change is applied only in the first case.
 */
public interface SessionLog {

    /** Records a batch exactly as it was handed to {@link VehicleSession#submit}. */
    CompletableFuture<Long> batch(String vehicleId, List<? extends Sample> samples);

    /** Records that a vehicle's session was dropped. */
    CompletableFuture<Long> delete(String vehicleId);

    /**
     * The number the next record will get (records are numbered in the order they are made), or -1 when
     * the log does not number its records. A session created now has no record below it.
     */
    default long nextSequence() {
        return -1;
    }

    /** A recording that is already durable and not numbered. */
    CompletableFuture<Long> DONE = CompletableFuture.completedFuture(-1L);

    /** Records nothing: sessions live only in memory (tests, offline tools). */
    SessionLog NONE = new SessionLog() {

        @Override
        public CompletableFuture<Long> batch(String vehicleId, List<? extends Sample> samples) {
            return DONE;
        }

        @Override
        public CompletableFuture<Long> delete(String vehicleId) {
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
