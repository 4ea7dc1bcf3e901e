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
     * A batch handed to {@link #submit}: recorded in the session log, and applied to the session once
     * the record is durable (write-ahead, see {@link VehicleSession}).
     */
    public final class Submission {
        private final Entry entry;
        private final VehicleSession.Applied applied;

        private Submission(Entry entry, VehicleSession.Applied applied) {
            this.entry = entry;
            this.applied = applied;
        }

        /**
         * Waits until the batch is durable and applied: call it before acknowledging the batch, outside
         * any lock.
         *
         * @return one admission per sample, in the order given
         * @throws IOException                 when it could not be written; it was not applied
         * @throws VehicleQuarantinedException when the vehicle's session is quarantined
         */
        public List<Admission> admissions() throws IOException {
            try {
                return applied.admissions();
            } catch (IOException e) {
                // A vehicle's first batch that could not be written leaves no empty session behind.
                dropIfPristine(entry);
                throw e;
            }
        }

        /** Waits until the batch is durable and applied; see {@link #admissions()}. */
        public void awaitRecorded() throws IOException {
            admissions();
        }
    }

    private final Settings settings;
    private final Geodetic configuredOrigin;
    private final SessionLog log;
    private final Clock clock;
    private final ConcurrentHashMap<String, Entry> sessions = new ConcurrentHashMap<>();
    private final AtomicLong serials = new AtomicLong();
    private final List<Consumer<VehicleSession>> removalListeners = new java.util.concurrent.CopyOnWriteArrayList<>();

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
            VehicleSession session = new VehicleSession(vehicleId, settings, configuredOrigin, clock);
            // Every record of the new session will be numbered from here on.
            session.startAfter(log.nextSequence() - 1);
            Entry created = new Entry(session, serials.incrementAndGet());
            sessions.put(vehicleId, created);
            return created;
        }
    }

    /**
     * Records a batch in the session log and queues it on the vehicle's session (created when absent),
     * under the session's lock ({@link VehicleSession#submit(List, VehicleSession.BatchRecorder)}); it is
     * applied once the record is durable, so the log's order per vehicle is the order of application and
     * a restart that applies the log again rebuilds the same state. The caller waits on
     * {@link Submission#admissions()} outside any lock before acknowledging.
     *
     * <p>A batch that races a {@link #delete} of its vehicle waits until the deletion is settled and then
     * goes to the session registered then, never to a dropped one.
     *
     * @throws SessionLimitException       when the vehicle has no session and the registry is full
     * @throws VehicleQuarantinedException when the vehicle's session is quarantined
     */
    public Submission submit(String vehicleId, List<? extends Sample> batch) {
        while (true) {
            Entry entry = getOrCreate(vehicleId);
            VehicleSession.Applied applied = entry.session().submit(batch, b -> log.batch(vehicleId, b));
            if (applied != null) {
                return new Submission(entry, applied);
            }
            // The session is being deleted: wait until the deletion is durable (then the session is gone)
            // or has failed (then it takes batches again).
            entry.session().retirement().join();
        }
    }

    /**
     * Records the deletion of the vehicle's session and, once it is durable, drops the session and tells
     * the removal listeners. Until then the session stays (reads see it; batches wait), and if the
     * deletion cannot be recorded it stays for good: a deletion answered with an error never takes
     * effect, before or after a restart.
     *
     * @return true when there was a session to drop
     * @throws IOException when the deletion could not be recorded (the session is kept)
     */
    public boolean delete(String vehicleId) throws IOException {
        while (true) {
            Entry entry = sessions.get(vehicleId);
            if (entry == null) {
                return false;
            }
            // Recorded before the entry leaves the map: a new session of the same id can only be created
            // afterwards, so its batches follow the deletion in the log. A retired session takes no more
            // batches, so none is recorded after its deletion.
            CompletableFuture<Long> recorded = entry.session().retire(() -> log.delete(vehicleId));
            if (recorded == null) {
                // Another deletion of it is under way: its outcome decides.
                entry.session().retirement().join();
                continue;
            }
            try {
                SessionLog.await(recorded);
            } catch (IOException e) {
                entry.session().settleRetirement(false);
                throw e;
            }
            synchronized (this) {
                sessions.remove(vehicleId, entry);
            }
            entry.session().settleRetirement(true);
            for (Consumer<VehicleSession> l : removalListeners) {
                l.accept(entry.session());
            }
            return true;
        }
    }

    /** Drops a session that holds nothing: its only batches could not be written. */
    private void dropIfPristine(Entry entry) {
        if (!entry.session().retireIfPristine()) {
            return;
        }
        synchronized (this) {
            sessions.remove(entry.session().vehicleId(), entry);
        }
        entry.session().settleRetirement(true);
        for (Consumer<VehicleSession> l : removalListeners) {
            l.accept(entry.session());
        }
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
        removed.session().settleRetirement(true);
        for (Consumer<VehicleSession> l : removalListeners) {
            l.accept(removed.session());
        }
        return true;
    }

    /**
     * Called with the dropped session after each removal ({@link #delete}, {@link #remove}, or a first
     * batch that could not be written). The session takes no more writes by then, so what it holds is
     * final.
     */
    public void addRemovalListener(Consumer<VehicleSession> listener) {
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
