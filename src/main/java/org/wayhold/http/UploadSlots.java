package org.wayhold.http;

import java.util.concurrent.Semaphore;

/**
 * The request bodies the service reads at once, ingested or drained after a refusal: at most
 * {@code server.max_concurrent_uploads}. A body read blocks its thread while the client sends, so
 * without a bound slow uploads (or slow bodies of refused requests) could hold every server thread and
 * leave none for reads of poses and {@code /health}. A request that finds no slot is not waited for:
 * an upload gets 503 with {@code Retry-After}, a refused body is not drained (its connection closes).
 */
final class UploadSlots {

    private final Semaphore slots;

    /** @param count bodies read at once (count, >= 1) */
    UploadSlots(int count) {
        this.slots = new Semaphore(count);
    }

    /** Takes a slot if one is free at once; pair with {@link #release} when true. */
    boolean tryAcquire() {
        return slots.tryAcquire();
    }

    void release() {
        slots.release();
    }

    /** Free slots now (count). */
    int available() {
        return slots.availablePermits();
    }
}
