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
    private final Set<Stream> open = ConcurrentHashMap.newKeySet();
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
            ctx.async(config -> config.timeout = 0L, () -> attach(new SseClient(ctx), vehicleId, session, slot,
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

    private void attach(SseClient client, String vehicleId, VehicleSession session, Slot slot, double afterT) {
        Stream s = new Stream(client, vehicleId, session, slot);
        client.keepAlive();
        client.onClose(s::detach);
        open.add(s);
        VehicleSession.Subscription sub = session.subscribe(s, afterT);
        s.backlog = sub.backlog();
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
            for (Stream s : open) {
                s.checkLiveness();
            }
        } catch (RuntimeException e) {
            // The checker must keep running: one failed look is retried at the next period.
            LOG.warn("pose streams: the staleness check failed: {}", e.toString());
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
        checker.shutdownNow();
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
        private final VehicleSession session;
        private final Slot slot;
        /** Poses, {@link #WAKE_UP} to make the writer look at its flags at once, and {@link #LIVENESS}. */
        private final BlockingQueue<Object> queue = new ArrayBlockingQueue<>(QUEUE_CAPACITY + 2);
        private volatile boolean closeRequested;
        private volatile boolean overflowed;
        /** Poses to send before the queue's, set before the writer starts. */
        private List<Pose> backlog = List.of();
        /** A comment to send first, or null. */
        private String note;
        /** The last pose sent and the staleness it was sent with; the checker reads them. */
        private volatile Pose lastSent;
        private volatile boolean lastSentStale;
        private final AtomicBoolean livenessQueued = new AtomicBoolean();

        Stream(SseClient client, String vehicleId, VehicleSession session, Slot slot) {
            this.client = client;
            this.vehicleId = vehicleId;
            this.session = session;
            this.slot = slot;
        }

        /** Called on the feeding thread: never blocks. */
        @Override
        public void accept(Pose pose) {
            // Two slots are kept free, for the wake-up and a staleness note, so that a full queue can
            // still be closed at once.
            if (queue.remainingCapacity() <= 2 || !queue.offer(pose)) {
                overflowed = true;
                queue.offer(WAKE_UP);
            }
        }

        void checkLiveness() {
            if (lastSent != null && session.liveness().stale() != lastSentStale
                    && livenessQueued.compareAndSet(false, true) && !queue.offer(LIVENESS)) {
                livenessQueued.set(false);
            }
        }

        void requestClose() {
            closeRequested = true;
            queue.offer(WAKE_UP);
        }

        void detach() {
            session.removeListener(this);
            open.remove(this);
            slot.free();
        }

        private void send(Pose p) {
            Liveness live = session.liveness();
            client.sendEvent("pose", new String(PoseJson.toBytes(p, live), StandardCharsets.UTF_8),
                    PoseJson.plain(p.t()));
            lastSentStale = live.stale();
            lastSent = p;
        }

        void write() {
            try {
                if (note != null) {
                    client.sendComment(note);
                }
                for (Pose p : backlog) {
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
                    } else if (next instanceof Pose p) {
                        send(p);
                    } else if (next == LIVENESS) {
                        livenessQueued.set(false);
                        Pose p = lastSent;
                        if (p != null && session.liveness().stale() != lastSentStale) {
                            send(p);
                        }
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
