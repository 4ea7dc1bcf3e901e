package org.wayhold.session;

import java.io.IOException;
import java.time.Clock;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.Optional;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.atomic.AtomicLong;
import java.util.function.Consumer;
import org.wayhold.geo.Geodetic;
import org.wayhold.ordering.Admission;
import org.wayhold.sample.Sample;
import org.wayhold.settings.Settings;

/**
 * Every vehicle session of one service, keyed by vehicle id.
 *
 * <p>A session is created by the first sample of its vehicle and lives until it is removed. Vehicles
 * are independent: each has its own session object, whose {@link VehicleSession#submit} serialises
 * that vehicle's samples, so different vehicles can be fed from different threads at once. The number
 * of sessions is bounded by {@code server.max_sessions} so that memory stays bounded whatever ids
 * clients invent.
 *
 * <p>Thread-safety: all methods may be called from any thread.
 */
public final class SessionRegistry {

    /** A held session and the serial number of its creation (unique in this registry's life). */
    public record Entry(VehicleSession session, long serial) {
    }

    /**
     * What {@link #submit} did: one admission per sample, and the write of the batch to the session log,
     * which must complete before the batch is acknowledged ({@link #awaitRecorded}).
     */
    public record Submission(List<Admission> admissions, CompletableFuture<?> recorded) {
        /** Waits until the batch is in the session log; IOException when it could not be written. */
        public void awaitRecorded() throws IOException {
            SessionLog.await(recorded);
        }
    }

    private final Settings settings;
    private final Geodetic configuredOrigin;
    private final SessionLog log;
    private final Clock clock;
    private final ConcurrentHashMap<String, Entry> sessions = new ConcurrentHashMap<>();
    private final AtomicLong serials = new AtomicLong();
    private final List<Consumer<String>> removalListeners = new java.util.concurrent.CopyOnWriteArrayList<>();

    /**
     * @param settings         settings of every session; {@code server.maxSessions} bounds the count
     * @param configuredOrigin ENU origin for every session instead of its first fix, or null
     */
    public SessionRegistry(Settings settings, Geodetic configuredOrigin) {
        this(settings, configuredOrigin, SessionLog.NONE);
    }

    /**
     * @param settings         settings of every session; {@code server.maxSessions} bounds the count
     * @param configuredOrigin ENU origin for every session instead of its first fix, or null
     * @param log              where {@link #submit} and {@link #delete} record what they change
     */
    public SessionRegistry(Settings settings, Geodetic configuredOrigin, SessionLog log) {
        this(settings, configuredOrigin, log, Clock.systemUTC());
    }

    /**
     * @param settings         settings of every session; {@code server.maxSessions} bounds the count
     * @param configuredOrigin ENU origin for every session instead of its first fix, or null
     * @param log              where {@link #submit} and {@link #delete} record what they change
     * @param clock            the service's wall clock: when samples arrive, and which vehicles are stale
     */
    public SessionRegistry(Settings settings, Geodetic configuredOrigin, SessionLog log, Clock clock) {
        this.settings = java.util.Objects.requireNonNull(settings, "settings");
        this.configuredOrigin = configuredOrigin;
        this.log = java.util.Objects.requireNonNull(log, "log");
        this.clock = java.util.Objects.requireNonNull(clock, "clock");
    }

    /** The wall clock the sessions judge arrivals and staleness by. */
    public Clock clock() {
        return clock;
    }

    /** The settings each session is created with. */
    public Settings settings() {
        return settings;
    }

    /**
     * The vehicle's session, created when absent.
     *
     * @throws SessionLimitException when the vehicle has no session and {@code server.max_sessions}
     *                               sessions are already held
     */
    public Entry getOrCreate(String vehicleId) {
        Entry held = sessions.get(vehicleId);
        if (held != null) {
            return held;
        }
        int max = settings.server().maxSessions();
        // The size check and the insertion are not one atomic step; two creations racing at the limit may
        // both pass. Serialising creations keeps the bound exact without slowing the common lookup above.
        synchronized (this) {
            held = sessions.get(vehicleId);
            if (held != null) {
                return held;
            }
            if (sessions.size() >= max) {
                throw new SessionLimitException(max);
            }
            Entry created = new Entry(new VehicleSession(vehicleId, settings, configuredOrigin, clock),
                    serials.incrementAndGet());
            sessions.put(vehicleId, created);
            return created;
        }
    }

    /**
     * Applies a batch to the vehicle's session (created when absent) and records it in the session log,
     * both under the session's lock ({@link VehicleSession#submit(List, VehicleSession.BatchRecorder)}), so the log's order per vehicle is the order of application and a
     * restart that applies the log again rebuilds the same state. The caller waits on
     * {@link Submission#awaitRecorded} outside any lock before acknowledging.
     *
     * <p>A batch that races a {@link #delete} of its vehicle goes to the session that is registered
     * once the lock is held, never to a dropped one.
     *
     * @throws SessionLimitException when the vehicle has no session and the registry is full
     */
    public Submission submit(String vehicleId, List<? extends Sample> batch) {
        while (true) {
            Entry entry = getOrCreate(vehicleId);
            VehicleSession.Applied applied = entry.session().submit(batch, b -> log.batch(vehicleId, b));
            if (applied != null) {
                return new Submission(applied.admissions(), applied.recorded());
            }
            // The session was retired by a delete that raced this batch: go to the one registered now.
        }
    }

    /**
     * Drops the vehicle's session, records the deletion in the session log and tells the removal
     * listeners; waits (outside the lock) until the deletion is durable.
     *
     * @return true when there was a session to drop
     * @throws IOException when the deletion could not be recorded (the session is dropped all the same)
     */
    public boolean delete(String vehicleId) throws IOException {
        CompletableFuture<?> recorded = null;
        while (recorded == null) {
            Entry entry = sessions.get(vehicleId);
            if (entry == null) {
                return false;
            }
            // Logged before the entry leaves the map: a new session of the same id can only be created
            // afterwards, so its batches follow the deletion in the log. A retired session takes no
            // more batches, so none can be logged after its deletion.
            recorded = entry.session().retire(() -> log.delete(vehicleId));
            if (recorded != null) {
                synchronized (this) {
                    sessions.remove(vehicleId, entry);
                }
            }
        }
        for (Consumer<String> l : removalListeners) {
            l.accept(vehicleId);
        }
        SessionLog.await(recorded);
        return true;
    }

    /** The vehicle's session, if it has one. */
    public Optional<Entry> find(String vehicleId) {
        return Optional.ofNullable(sessions.get(vehicleId));
    }

    /**
     * Drops the vehicle's session and tells the removal listeners, without recording it in the session
     * log: for replaying a logged deletion. Requests use {@link #delete}.
     *
     * @return true when there was a session to drop
     */
    public boolean remove(String vehicleId) {
        Entry removed;
        synchronized (this) {
            removed = sessions.remove(vehicleId);
        }
        if (removed == null) {
            return false;
        }
        removed.session().retire(() -> SessionLog.DONE);
        for (Consumer<String> l : removalListeners) {
            l.accept(vehicleId);
        }
        return true;
    }

    /** Called with the vehicle id after each {@link #remove}. */
    public void addRemovalListener(Consumer<String> listener) {
        removalListeners.add(listener);
    }

    /** A snapshot of the held sessions, sorted by vehicle id. */
    public List<VehicleSession> sessions() {
        List<VehicleSession> all = new ArrayList<>(sessions.size());
        for (Entry e : sessions.values()) {
            all.add(e.session());
        }
        all.sort(Comparator.comparing(VehicleSession::vehicleId));
        return all;
    }

    /** Number of held sessions. */
    public int size() {
        return sessions.size();
    }
}
