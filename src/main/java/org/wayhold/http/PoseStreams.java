package org.wayhold.http;

import io.javalin.http.Context;
import io.javalin.http.sse.SseClient;
import jakarta.servlet.http.HttpServletResponse;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.util.List;
import java.util.Locale;
import java.util.Set;
import java.util.concurrent.ArrayBlockingQueue;
import java.util.concurrent.BlockingQueue;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.ScheduledExecutorService;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicBoolean;
import java.util.concurrent.atomic.AtomicInteger;
import java.util.function.Consumer;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;
import org.wayhold.pose.Pose;
import org.wayhold.session.Liveness;
import org.wayhold.session.VehicleSession;

/**
 * Server-Sent Events streams of poses, one pose per event.
 *
 * <p>Each client has a bounded queue and a writer thread of its own. The session's listener runs on the
 * thread that feeds the vehicle, so it only offers the pose to the queue and never waits: a client that
 * cannot keep up fills its queue and is closed (it may reconnect and resume), and no client can ever
 * slow ingest down. The writer sends each queued pose as an event named {@code pose}, its data the pose
 * JSON with the vehicle's liveness ({@code received_at}, {@code stale}), and a comment line
 * {@code : keep-alive} whenever nothing was sent for {@code server.sse_keep_alive_s}, which keeps
 * proxies from timing the stream out and reveals clients that have gone away.
 *
 * <p>Event ids are the pose's time on the vehicle's clock (plain decimal seconds), so they mean the same
 * on every connection: a client that reconnects with {@code Last-Event-ID} (as EventSource does by
 * itself) gets the poses the history holds after that time, then the live ones, with nothing twice and
 * nothing left out in between. Without it the first event is the current pose.
 *
 * <p>A vehicle that stops sending produces no pose, so a checker looks at every open stream a few times
 * per {@code outage.stale_after_s} (at least once a second) and, when the vehicle's staleness differs
 * from what the stream last said, sends the last pose again with the new {@code stale} (same id: it is
 * the same pose).
 *
 * <p>Any {@code Accept} that admits {@code text/event-stream} is served ({@code text/event-stream},
 * {@code text/*}, {@code *}{@code /*}, or no {@code Accept} at all, RFC 9110 sec. 12.5.1); one that
 * rules it out is 406.
 *
 * <p>At most {@code server.max_streams} streams are open: a slot is reserved before the stream is
 * started (the stream itself is attached later, on another thread, so counting attached streams would
 * let a burst of requests past the bound) and freed exactly once when the stream ends. A client that
 * stops reading is dropped once its queue is full, or, when its writer is blocked in a write, once the
 * write has made no progress for {@code server.idle_timeout_s} (the connection's idle timeout).
 *
 * <p>{@link #closeAll()} ends every stream cleanly (the response is completed, not cut), for shutdown and
 * for a deleted vehicle.
 *
 * <p>The poses come from a {@link Source}: a vehicle's session in this process, or, for the read service
 * of the fleet mode ({@code serve --from-kafka}), the pose JSON that a worker wrote, kept on a
 * {@link PoseBoard}. Both give the same events: ids, resumption, liveness and staleness notes alike.
 */
final class PoseStreams {

    private static final Logger LOG = LoggerFactory.getLogger(PoseStreams.class);

    /** Poses queued per client before it counts as too slow (count): about 50 s of history at 5 Hz. */
    static final int QUEUE_CAPACITY = 256;

    static final String EVENT_STREAM = "text/event-stream";
    static final String LAST_EVENT_ID = "Last-Event-ID";

    /** Queued to wake a writer so that it sees a close request without waiting for its poll to time out. */
    private static final Object WAKE_UP = new Object();
    /** Queued when the vehicle's staleness differs from what the stream last said. */
    private static final Object LIVENESS = new Object();

    private final long keepAliveMillis;
    /** Most open streams (count); each holds a thread, so the number is bounded. */
    private final int maxStreams;
    /** Slots taken: streams open or being started. */
    private final AtomicInteger reserved = new AtomicInteger();
    private final Set<Stream<?>> open = ConcurrentHashMap.newKeySet();
    private final AtomicInteger threadNumber = new AtomicInteger();
    private final ExecutorService writers = Executors.newCachedThreadPool(r -> {
        Thread t = new Thread(r, "pose-stream-" + threadNumber.incrementAndGet());
        t.setDaemon(true);
        return t;
    });
    private final ScheduledExecutorService checker = Executors.newSingleThreadScheduledExecutor(r -> {
        Thread t = new Thread(r, "pose-stream-liveness");
        t.setDaemon(true);
        return t;
    });
    private volatile boolean closing;

    /**
     * @param keepAliveS  interval of keep-alive comments (s, > 0)
     * @param maxStreams  most open streams (count)
     * @param staleAfterS {@code outage.stale_after_s} (s, > 0): streams are checked for a change of
     *                    staleness every quarter of it, at most every second and at least every 50 ms
     */
    PoseStreams(double keepAliveS, int maxStreams, double staleAfterS) {
        this.keepAliveMillis = Math.max(1L, Math.round(keepAliveS * 1000.0));
        this.maxStreams = maxStreams;
        long checkMillis = checkMillis(staleAfterS);
        checker.scheduleWithFixedDelay(this::checkLiveness, checkMillis, checkMillis, TimeUnit.MILLISECONDS);
    }

    /**
     * Where a stream's poses come from, and how one is written.
     *
     * @param <P> a pose as the source holds it
     */
    interface Source<P> {
        /**
         * Registers the listener and returns, atomically with the registration, what it must be sent
         * first (see {@link VehicleSession#subscribe}).
         *
         * @param afterT time of the last pose the client saw (s, vehicle clock), NaN for none
         */
        Backlog<P> subscribe(Consumer<P> listener, double afterT);

        void unsubscribe(Consumer<P> listener);

        /** Whether the vehicle is still sending, now. */
        Liveness liveness();

        /** The pose's time (s, vehicle clock): the event's id. */
        double timeOf(P pose);

        /** The pose's JSON with the vehicle's liveness (UTF-8): the event's data. */
        byte[] json(P pose, Liveness live);
    }

    /**
     * What a new stream sends first.
     *
     * @param poses     oldest first
     * @param resumed   true when they continue after the time the client asked for
     * @param heldFromT oldest pose time the source holds (s, vehicle clock), NaN when none
     */
    record Backlog<P>(List<P> poses, boolean resumed, double heldFromT) {
    }

    /** The poses of a vehicle's session in this process. */
    static Source<Pose> source(VehicleSession session) {
        return new Source<>() {
            @Override
            public Backlog<Pose> subscribe(Consumer<Pose> listener, double afterT) {
                VehicleSession.Subscription sub = session.subscribe(listener, afterT);
                return new Backlog<>(sub.backlog(), sub.resumed(), sub.heldFromT());
            }

            @Override
            public void unsubscribe(Consumer<Pose> listener) {
                session.removeListener(listener);
            }

            @Override
            public Liveness liveness() {
                return session.liveness();
            }

            @Override
            public double timeOf(Pose pose) {
                return pose.t();
            }

            @Override
            public byte[] json(Pose pose, Liveness live) {
                return PoseJson.toBytes(pose, live);
            }
        };
    }

    /** The poses of a vehicle as a worker wrote them ({@code serve --from-kafka}). */
    static Source<PoseBoard.Entry> source(PoseBoard.Vehicle vehicle) {
        return new Source<>() {
            @Override
            public Backlog<PoseBoard.Entry> subscribe(Consumer<PoseBoard.Entry> listener, double afterT) {
                PoseBoard.Subscription sub = vehicle.subscribe(listener, afterT);
                return new Backlog<>(sub.backlog(), sub.resumed(), sub.heldFromT());
            }

            @Override
            public void unsubscribe(Consumer<PoseBoard.Entry> listener) {
                vehicle.removeListener(listener);
            }

            @Override
            public Liveness liveness() {
                return vehicle.liveness();
            }

            @Override
            public double timeOf(PoseBoard.Entry pose) {
                return pose.t();
            }

            @Override
            public byte[] json(PoseBoard.Entry pose, Liveness live) {
                return PoseJson.withLiveness(pose.json(), live);
            }
        };
    }

    /** Period of the staleness check (ms): a quarter of the stale time, within [50 ms, 1 s]. */
    static long checkMillis(double staleAfterS) {
        return Math.max(50L, Math.min(1000L, Math.round(staleAfterS * 250.0)));
    }

    int openCount() {
        return open.size();
    }

    /**
     * Whether an {@code Accept} header admits {@code text/event-stream} (RFC 9110 sec. 12.5.1): the most
     * specific media range that matches decides, and a weight of 0 means "not acceptable". No header at
     * all admits anything.
     */
    static boolean acceptsEventStream(String accept) {
        if (accept == null || accept.isBlank()) {
            return true;
        }
        int bestSpecificity = -1;
        double bestQ = 0.0;
        for (String range : accept.split(",")) {
            String[] parts = range.split(";");
            String type = parts[0].strip().toLowerCase(Locale.ROOT);
            int specificity = switch (type) {
                case EVENT_STREAM -> 3;
                case "text/*" -> 2;
                case "*/*" -> 1;
                default -> -1;
            };
            if (specificity < 0) {
                continue;
            }
            double q = 1.0;
            for (int i = 1; i < parts.length; i++) {
                String p = parts[i].strip().toLowerCase(Locale.ROOT);
                if (p.startsWith("q=")) {
                    try {
                        q = Double.parseDouble(p.substring(2).strip());
                    } catch (NumberFormatException e) {
                        q = 0.0;
                    }
                }
            }
            if (specificity > bestSpecificity) {
                bestSpecificity = specificity;
                bestQ = q;
            }
        }
        return bestSpecificity >= 0 && bestQ > 0.0;
    }

    /**
     * The time of a {@code Last-Event-ID} (s, vehicle clock), NaN when absent or not one of this
     * service's ids (the stream then starts from the current pose).
     */
    static double lastEventT(String header) {
        if (header == null || header.isBlank()) {
            return Double.NaN;
        }
        try {
            double t = Double.parseDouble(header.strip());
            return Double.isFinite(t) ? t : Double.NaN;
        } catch (NumberFormatException e) {
            return Double.NaN;
        }
    }

    /**
     * Starts a stream of the session's poses on this request: after {@code Last-Event-ID} when the
     * request has one and the history holds it, else from the current pose.
     */
    void start(Context ctx, String vehicleId, VehicleSession session) {
        start(ctx, vehicleId, source(session));
    }

    /**
     * Starts a stream of a vehicle's poses as a worker wrote them ({@code serve --from-kafka}), on the
     * same terms as a session's.
     */
    void start(Context ctx, String vehicleId, PoseBoard.Vehicle vehicle) {
        start(ctx, vehicleId, source(vehicle));
    }

    private <P> void start(Context ctx, String vehicleId, Source<P> source) {
        String accept = ctx.header("Accept");
        if (!acceptsEventStream(accept)) {
            throw new HttpProblem(406, "not-acceptable", "Not acceptable", "Accept",
                    "Accept: must admit text/event-stream (or */*, or be left out), was '"
                            + VehicleRoutes.clip(accept) + "'");
        }
        double afterT = lastEventT(ctx.header(LAST_EVENT_ID));
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
            HttpServletResponse res = ctx.res();
            res.setStatus(200);
            res.setCharacterEncoding("UTF-8");
            res.setContentType(EVENT_STREAM);
            res.addHeader("Connection", "close");
            res.addHeader("Cache-Control", "no-cache");
            // Tells a buffering reverse proxy (nginx) to pass events on as they come.
            res.addHeader("X-Accel-Buffering", "no");
            res.flushBuffer();
            // A timeout of 0 keeps the asynchronous response open until the stream closes it.
            ctx.async(config -> config.timeout = 0L, () -> attach(new SseClient(ctx), vehicleId, source, slot,
                    afterT));
        } catch (IOException e) {
            slot.free();
            throw new UncheckedIOException(e);
        } catch (RuntimeException e) {
            slot.free();
            throw e;
        }
    }

    /** One reserved stream slot, freed once. */
    private final class Slot {
        private final AtomicBoolean freed = new AtomicBoolean();

        void free() {
            if (freed.compareAndSet(false, true)) {
                reserved.decrementAndGet();
            }
        }
    }

    private <P> void attach(SseClient client, String vehicleId, Source<P> source, Slot slot, double afterT) {
        Stream<P> s = new Stream<>(client, vehicleId, source, slot);
        client.keepAlive();
        client.onClose(s::detach);
        open.add(s);
        Backlog<P> sub = source.subscribe(s, afterT);
        s.backlog = sub.poses();
        if (sub.resumed() && afterT < sub.heldFromT()) {
            s.note = "resumed after " + PoseJson.plain(afterT) + " s, but the history holds poses from "
                    + PoseJson.plain(sub.heldFromT()) + " s on; the track endpoint has no more";
        }
        try {
            writers.execute(s::write);
        } catch (java.util.concurrent.RejectedExecutionException e) {
            s.detach();
            client.close();
        }
    }

    /** Asks each stream whose vehicle's staleness changed since its last event to say so. */
    private void checkLiveness() {
        try {
            for (Stream<?> s : open) {
                s.checkLiveness();
            }
        } catch (RuntimeException e) {
            // The checker must keep running: one failed look is retried at the next period.
            LOG.warn("pose streams: the staleness check failed: {}", e.toString());
        }
    }

    /** Ends the streams of one vehicle (its session was deleted). */
    void closeVehicle(String vehicleId) {
        for (Stream<?> s : open) {
            if (s.vehicleId.equals(vehicleId)) {
                s.requestClose();
            }
        }
    }

    /** Ends every stream and refuses new ones; waits up to a second for the writers to finish. */
    void closeAll() {
        closing = true;
        checker.shutdownNow();
        for (Stream<?> s : open) {
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
    private final class Stream<P> implements Consumer<P> {
        private final SseClient client;
        private final String vehicleId;
        private final Source<P> source;
        private final Slot slot;
        /** Poses, {@link #WAKE_UP} to make the writer look at its flags at once, and {@link #LIVENESS}. */
        private final BlockingQueue<Object> queue = new ArrayBlockingQueue<>(QUEUE_CAPACITY + 2);
        private volatile boolean closeRequested;
        private volatile boolean overflowed;
        /** Poses to send before the queue's, set before the writer starts. */
        private List<P> backlog = List.of();
        /** A comment to send first, or null. */
        private String note;
        /** The last pose sent and the staleness it was sent with; the checker reads them. */
        private volatile P lastSent;
        private volatile boolean lastSentStale;
        private final AtomicBoolean livenessQueued = new AtomicBoolean();

        Stream(SseClient client, String vehicleId, Source<P> source, Slot slot) {
            this.client = client;
            this.vehicleId = vehicleId;
            this.source = source;
            this.slot = slot;
        }

        /** Called on the feeding thread: never blocks. */
        @Override
        public void accept(P pose) {
            // Two slots are kept free, for the wake-up and a staleness note, so that a full queue can
            // still be closed at once.
            if (queue.remainingCapacity() <= 2 || !queue.offer(pose)) {
                overflowed = true;
                queue.offer(WAKE_UP);
            }
        }

        void checkLiveness() {
            if (lastSent != null && source.liveness().stale() != lastSentStale
                    && livenessQueued.compareAndSet(false, true) && !queue.offer(LIVENESS)) {
                livenessQueued.set(false);
            }
        }

        void requestClose() {
            closeRequested = true;
            queue.offer(WAKE_UP);
        }

        void detach() {
            source.unsubscribe(this);
            open.remove(this);
            slot.free();
        }

        private void send(P p) {
            Liveness live = source.liveness();
            client.sendEvent("pose", new String(source.json(p, live), StandardCharsets.UTF_8),
                    PoseJson.plain(source.timeOf(p)));
            lastSentStale = live.stale();
            lastSent = p;
        }

        void write() {
            try {
                if (note != null) {
                    client.sendComment(note);
                }
                for (P p : backlog) {
                    if (closeRequested || client.terminated()) {
                        break;
                    }
                    send(p);
                }
                backlog = List.of();
                while (!closeRequested && !overflowed && !client.terminated()) {
                    Object next = queue.poll(keepAliveMillis, TimeUnit.MILLISECONDS);
                    if (next == null) {
                        client.sendComment("keep-alive");
                    } else if (next == LIVENESS) {
                        livenessQueued.set(false);
                        P p = lastSent;
                        if (p != null && source.liveness().stale() != lastSentStale) {
                            send(p);
                        }
                    } else if (next != WAKE_UP) {
                        // Only the listener queues anything else: a pose of this source.
                        @SuppressWarnings("unchecked")
                        P p = (P) next;
                        send(p);
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
