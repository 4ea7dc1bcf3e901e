package org.wayhold.http;

import io.javalin.http.Context;
import io.javalin.http.sse.SseClient;
import io.javalin.http.sse.SseHandler;
import java.nio.charset.StandardCharsets;
import java.util.Set;
import java.util.concurrent.ArrayBlockingQueue;
import java.util.concurrent.BlockingQueue;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicInteger;
import java.util.function.Consumer;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;
import org.wayhold.pose.Pose;
import org.wayhold.session.VehicleSession;

/**
 * Server-Sent Events streams of poses, one pose per event.
 *
 * <p>Each client has a bounded queue and a writer thread of its own. The session's listener runs on the
 * thread that feeds the vehicle, so it only offers the pose to the queue and never waits: a client that
 * cannot keep up fills its queue and is closed (it may reconnect and starts again from the latest pose),
 * and no client can ever slow ingest down. The writer sends each queued pose as an event named
 * {@code pose} whose {@code id} counts events on that stream, and a comment line {@code : keep-alive}
 * whenever nothing was sent for {@code server.sse_keep_alive_s}, which keeps proxies from timing the
 * stream out and reveals clients that have gone away.
 *
 * <p>At most {@code server.max_streams} streams are open: a slot is reserved before the stream is
 * started (the stream itself is attached later, on another thread, so counting attached streams would
 * let a burst of requests past the bound) and freed exactly once when the stream ends. A client that
 * stops reading is dropped once its queue is full, or, when its writer is blocked in a write, once the
 * write has made no progress for {@code server.idle_timeout_s} (the connection's idle timeout).
 *
 * <p>{@link #closeAll()} ends every stream cleanly (the response is completed, not cut), for shutdown and
 * for a deleted vehicle.
 */
final class PoseStreams {

    private static final Logger LOG = LoggerFactory.getLogger(PoseStreams.class);

    /** Poses queued per client before it counts as too slow (count): about 50 s of history at 5 Hz. */
    static final int QUEUE_CAPACITY = 256;

    /** Queued to wake a writer so that it sees a close request without waiting for its poll to time out. */
    private static final Object WAKE_UP = new Object();

    private final long keepAliveMillis;
    /** Most open streams (count); each holds a thread, so the number is bounded. */
    private final int maxStreams;
    /** Slots taken: streams open or being started. */
    private final AtomicInteger reserved = new AtomicInteger();
    private final Set<Stream> open = ConcurrentHashMap.newKeySet();
    private final AtomicInteger threadNumber = new AtomicInteger();
    private final ExecutorService writers = Executors.newCachedThreadPool(r -> {
        Thread t = new Thread(r, "pose-stream-" + threadNumber.incrementAndGet());
        t.setDaemon(true);
        return t;
    });
    private volatile boolean closing;

    /**
     * @param keepAliveS interval of keep-alive comments (s, > 0)
     * @param maxStreams most open streams (count)
     */
    PoseStreams(double keepAliveS, int maxStreams) {
        this.keepAliveMillis = Math.max(1L, Math.round(keepAliveS * 1000.0));
        this.maxStreams = maxStreams;
    }

    int openCount() {
        return open.size();
    }

    /**
     * Starts a stream of the session's poses on this request; the current pose, if any, is the first
     * event.
     */
    void start(Context ctx, String vehicleId, VehicleSession session) {
        start(ctx, vehicleId, stream -> {
            session.latest().ifPresent(stream::offer);
            session.addListener(stream);
            return () -> session.removeListener(stream);
        });
    }

    /**
     * Starts a stream of a vehicle's poses as another process wrote them ({@code serve --from-kafka});
     * the newest pose, if any, is the first event.
     */
    void start(Context ctx, String vehicleId, PoseBoard.Vehicle vehicle) {
        start(ctx, vehicleId, stream -> {
            Consumer<byte[]> listener = stream::offer;
            vehicle.latest().ifPresent(e -> stream.offer(e.json()));
            vehicle.addListener(listener);
            return () -> vehicle.removeListener(listener);
        });
    }

    /** Subscribes a stream to its poses; returns what unsubscribes it. */
    @FunctionalInterface
    private interface Subscription {
        Runnable subscribe(Stream stream);
    }

    private void start(Context ctx, String vehicleId, Subscription subscription) {
        String accept = ctx.header("Accept");
        if (accept == null || !accept.contains("text/event-stream")) {
            // Javalin's SSE handler serves only clients that ask for an event stream (as EventSource
            // does); anything else would get an empty 200, so say what is missing instead.
            throw new HttpProblem(406, "not-acceptable", "Not acceptable", "Accept",
                    "Accept: must include text/event-stream, was " + (accept == null ? "missing" : "'" + accept + "'"));
        }
        if (closing) {
            throw HttpProblem.unavailable("stream", "stream: the service is shutting down");
        }
        if (reserved.incrementAndGet() > maxStreams) {
            reserved.decrementAndGet();
            throw HttpProblem.unavailable("stream", "stream: all " + maxStreams
                    + " pose streams are in use (server.max_streams)");
        }
        Slot slot = new Slot();
        try {
            // A timeout of 0 keeps the asynchronous response open until the stream closes it.
            new SseHandler(0L, client -> attach(client, vehicleId, subscription, slot)).handle(ctx);
        } catch (RuntimeException e) {
            slot.free();
            throw e;
        }
    }

    /** One reserved stream slot, freed once. */
    private final class Slot {
        private final java.util.concurrent.atomic.AtomicBoolean freed = new java.util.concurrent.atomic.AtomicBoolean();

        void free() {
            if (freed.compareAndSet(false, true)) {
                reserved.decrementAndGet();
            }
        }
    }

    private void attach(SseClient client, String vehicleId, Subscription subscription, Slot slot) {
        Stream s = new Stream(client, vehicleId, slot);
        client.keepAlive();
        client.onClose(s::detach);
        open.add(s);
        s.unsubscribe = subscription.subscribe(s);
        try {
            writers.execute(s::write);
        } catch (java.util.concurrent.RejectedExecutionException e) {
            s.detach();
            client.close();
        }
    }

    /** Ends the streams of one vehicle (its session was deleted). */
    void closeVehicle(String vehicleId) {
        for (Stream s : open) {
            if (s.vehicleId.equals(vehicleId)) {
                s.requestClose();
            }
        }
    }

    /** Ends every stream and refuses new ones; waits up to a second for the writers to finish. */
    void closeAll() {
        closing = true;
        for (Stream s : open) {
            s.requestClose();
        }
        writers.shutdown();
        try {
            if (!writers.awaitTermination(1, TimeUnit.SECONDS)) {
                LOG.warn("{} pose streams did not end within 1 s", open.size());
            }
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }

    /** One client: the queue the listener fills and the loop that empties it. */
    private final class Stream implements Consumer<Pose> {
        private final SseClient client;
        private final String vehicleId;
        private final Slot slot;
        /** Set once subscribed; detaching runs it. */
        private volatile Runnable unsubscribe = () -> { };
        /** Poses, and {@link #WAKE_UP} to make the writer look at its flags at once. */
        private final BlockingQueue<Object> queue = new ArrayBlockingQueue<>(QUEUE_CAPACITY + 1);
        private volatile boolean closeRequested;
        private volatile boolean overflowed;
        private long eventId;

        Stream(SseClient client, String vehicleId, Slot slot) {
            this.client = client;
            this.vehicleId = vehicleId;
            this.slot = slot;
        }

        /** Called on the feeding thread: never blocks. */
        @Override
        public void accept(Pose pose) {
            offer(pose);
        }

        /** A pose, or a pose's JSON as another process wrote it. */
        void offer(Object pose) {
            // One slot is kept free for the wake-up, so that a full queue can still be closed at once.
            if (queue.remainingCapacity() <= 1 || !queue.offer(pose)) {
                overflowed = true;
                queue.offer(WAKE_UP);
            }
        }

        void requestClose() {
            closeRequested = true;
            queue.offer(WAKE_UP);
        }

        void detach() {
            unsubscribe.run();
            open.remove(this);
            slot.free();
        }

        void write() {
            try {
                while (!closeRequested && !overflowed && !client.terminated()) {
                    Object next = queue.poll(keepAliveMillis, TimeUnit.MILLISECONDS);
                    if (next == null) {
                        client.sendComment("keep-alive");
                    } else if (next instanceof Pose p) {
                        client.sendEvent("pose", new String(PoseJson.toBytes(p), StandardCharsets.UTF_8),
                                Long.toString(++eventId));
                    } else if (next instanceof byte[] json) {
                        client.sendEvent("pose", new String(json, StandardCharsets.UTF_8), Long.toString(++eventId));
                    }
                }
                if (overflowed && !client.terminated()) {
                    client.sendComment("closing: the client did not keep up with the pose stream");
                }
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
            } catch (RuntimeException e) {
                // A failed write means the client has gone; nothing is left to tell it.
                LOG.debug("pose stream for {} ended: {}", vehicleId, e.toString());
            } finally {
                detach();
                client.close();
            }
        }
    }
}
