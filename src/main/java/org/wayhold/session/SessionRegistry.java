package org.wayhold.session;

import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.Optional;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.atomic.AtomicLong;
import java.util.function.Consumer;
import org.wayhold.geo.Geodetic;
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

    private final Settings settings;
    private final Geodetic configuredOrigin;
    private final ConcurrentHashMap<String, Entry> sessions = new ConcurrentHashMap<>();
    private final AtomicLong serials = new AtomicLong();
    private final List<Consumer<String>> removalListeners = new java.util.concurrent.CopyOnWriteArrayList<>();

    /**
     * @param settings         settings of every session; {@code server.maxSessions} bounds the count
     * @param configuredOrigin ENU origin for every session instead of its first fix, or null
     */
    public SessionRegistry(Settings settings, Geodetic configuredOrigin) {
        this.settings = java.util.Objects.requireNonNull(settings, "settings");
        this.configuredOrigin = configuredOrigin;
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
            Entry created = new Entry(new VehicleSession(vehicleId, settings, configuredOrigin),
                    serials.incrementAndGet());
            sessions.put(vehicleId, created);
            return created;
        }
    }

    /** The vehicle's session, if it has one. */
    public Optional<Entry> find(String vehicleId) {
        return Optional.ofNullable(sessions.get(vehicleId));
    }

    /**
     * Drops the vehicle's session and tells the removal listeners.
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
