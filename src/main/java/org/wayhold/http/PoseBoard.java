package org.wayhold.http;

import com.fasterxml.jackson.core.JsonParser;
import com.fasterxml.jackson.core.JsonToken;
import java.io.IOException;
import java.time.Clock;
import java.util.ArrayDeque;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.List;
import java.util.Optional;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.function.Consumer;
import org.wayhold.session.Liveness;
import org.wayhold.session.VehicleSession;

/**
 * The poses of a fleet as another process computed them (the stream workers' poses topic), kept as the
 * pose JSON they arrived in, for {@code serve --from-kafka}: per vehicle the newest
 * {@code history.max_poses} poses, the newest first to answer, and listeners for pose streams. The
 * JSON is passed through as it is, so whatever fields the workers write reach the readers unchanged;
 * the read routes add the vehicle's liveness ({@code received_at}, {@code stale}) as the service does.
 *
 * <p>Liveness: a vehicle's {@code received_at} is the timestamp of the record of its newest pose, which
 * a worker gives the timestamp of the samples record it came from: the time the samples were written
 * to the samples topic. So a read service that starts, or starts again, and reads the topic from its
 * beginning knows at once which vehicles went quiet, and how long ago. A vehicle is stale once that
 * time is more than {@code outage.stale_after_s} behind this service's wall clock.
 *
 * <p>Thread-safety: one feeding thread; readers on any thread. Each vehicle's poses are guarded by that
 * vehicle's own lock; listeners are called on the feeding thread, under that lock, and must only hand
 * the pose over.
 */
public final class PoseBoard {

    /** One pose: its time (s, vehicle clock) and its JSON (UTF-8). */
    record Entry(double t, byte[] json) {
    }

    /**
     * What a new pose stream starts from (see {@link VehicleSession#subscribe}).
     *
     * @param backlog   the poses to send first, oldest first
     * @param resumed   true when the backlog continues after the time the subscriber asked for
     * @param heldFromT oldest pose time held (s, vehicle clock), NaN when none
     */
    record Subscription(List<Entry> backlog, boolean resumed, double heldFromT) {
    }

    /** One vehicle's poses, oldest first. */
    final class Vehicle {
        final String id;
        private final ArrayDeque<Entry> poses = new ArrayDeque<>();
        private final List<Consumer<Entry>> listeners = new CopyOnWriteArrayList<>();
        private volatile Entry latest;
        private volatile long version;
        /** Timestamp of the newest pose's record (ms since the epoch). */
        private volatile long receivedAtMillis = Long.MIN_VALUE;

        Vehicle(String id) {
            this.id = id;
        }

        /** Whether the vehicle's samples still arrive, on this service's wall clock now. */
        Liveness liveness() {
            long received = receivedAtMillis;
            return Liveness.of(received, received, clock.millis(), staleAfterS);
        }

        /** What the kept poses span; full when older ones have been let go. */
        synchronized VehicleSession.HeldSpan held() {
            if (poses.isEmpty()) {
                return new VehicleSession.HeldSpan(Double.NaN, Double.NaN, false);
            }
            return new VehicleSession.HeldSpan(poses.peekFirst().t(), poses.peekLast().t(), poses.size() >= maxPoses);
        }

        /**
         * Registers a listener and returns what it must be sent first, under the lock the poses are
         * filed under, so that the two neither overlap nor leave a hole: the kept poses after
         * {@code afterT} when that is a number and poses are kept, else the newest pose alone.
         */
        synchronized Subscription subscribe(Consumer<Entry> listener, double afterT) {
            listeners.add(listener);
            double heldFrom = poses.isEmpty() ? Double.NaN : poses.peekFirst().t();
            if (!Double.isNaN(afterT) && !poses.isEmpty()) {
                List<Entry> after = new ArrayList<>();
                for (Entry e : poses) {
                    if (e.t() > afterT) {
                        after.add(e);
                    }
                }
                return new Subscription(after, true, heldFrom);
            }
            Entry newest = latest;
            return new Subscription(newest == null ? List.of() : List.of(newest), false, heldFrom);
        }

        Optional<Entry> latest() {
            return Optional.ofNullable(latest);
        }

        long version() {
            return version;
        }

        synchronized Optional<Entry> at(double tS) {
            Iterator<Entry> it = poses.descendingIterator();
            while (it.hasNext()) {
                Entry e = it.next();
                if (e.t() <= tS) {
                    return Optional.of(e);
                }
            }
            return Optional.empty();
        }

        synchronized List<Entry> between(double fromS, double toS) {
            List<Entry> out = new ArrayList<>();
            for (Entry e : poses) {
                if (e.t() >= fromS && e.t() <= toS) {
                    out.add(e);
                }
            }
            return out;
        }

        void removeListener(Consumer<Entry> l) {
            listeners.remove(l);
        }
    }

    private final int maxPoses;
    private final double staleAfterS;
    private final Clock clock;
    private final ConcurrentHashMap<String, Vehicle> vehicles = new ConcurrentHashMap<>();
    private volatile long posesRead;
    private volatile boolean caughtUp;

    /**
     * @param maxPoses    poses kept per vehicle (count, >= 1; {@code history.max_poses})
     * @param staleAfterS wall-clock silence after which a vehicle is stale (s, > 0; {@code outage.stale_after_s})
     * @param clock       this service's wall clock
     */
    public PoseBoard(int maxPoses, double staleAfterS, Clock clock) {
        if (maxPoses < 1) {
            throw new IllegalArgumentException("maxPoses: must be at least 1, was " + maxPoses);
        }
        if (!(staleAfterS > 0.0)) {
            throw new IllegalArgumentException("staleAfterS: must be a positive number of s, was " + staleAfterS);
        }
        this.maxPoses = maxPoses;
        this.staleAfterS = staleAfterS;
        this.clock = java.util.Objects.requireNonNull(clock, "clock");
    }

    /** {@code outage.stale_after_s} (s). */
    double staleAfterS() {
        return staleAfterS;
    }

    /** Files a pose of a vehicle that arrives now, on this service's clock (see {@link #put(String, byte[], long)}). */
    public boolean put(String vehicleId, byte[] json) {
        return put(vehicleId, json, clock.millis());
    }

    /**
     * Files a pose of a vehicle. A pose older than the newest held is a writer's repetition and is
     * dropped: the stream workers give each vehicle's poses once each, in time order.
     *
     * @param receivedAtMillis when the samples the pose came from arrived (ms since the epoch: the pose
     *                         record's timestamp); a negative value means now
     * @return whether the pose was filed (false for a malformed or an out-of-order one)
     */
    public boolean put(String vehicleId, byte[] json, long receivedAtMillis) {
        posesRead++;
        double t = timeOf(json);
        if (vehicleId == null || Double.isNaN(t)) {
            return false;
        }
        long received = receivedAtMillis >= 0 ? receivedAtMillis : clock.millis();
        Vehicle v = vehicles.computeIfAbsent(vehicleId, Vehicle::new);
        Entry e = new Entry(t, json);
        synchronized (v) {
            Entry newest = v.poses.peekLast();
            if (newest != null && t < newest.t()) {
                return false;
            }
            v.poses.addLast(e);
            while (v.poses.size() > maxPoses) {
                v.poses.removeFirst();
            }
            // Never backwards: records of one vehicle may carry timestamps a little out of order.
            v.receivedAtMillis = Math.max(v.receivedAtMillis, received);
            v.latest = e;
            v.version++;
            // Under the lock, so that a stream subscribing now gets this pose either in its backlog or
            // from its listener, never both and never neither.
            for (Consumer<Entry> l : v.listeners) {
                try {
                    l.accept(e);
                } catch (RuntimeException ex) {
                    // A listener's defect is its own: the pose is filed all the same.
                }
            }
        }
        return true;
    }

    /** Says that the feed has read everything there was when it started, for {@code /health}. */
    public void caughtUp() {
        caughtUp = true;
    }

    boolean isCaughtUp() {
        return caughtUp;
    }

    long posesRead() {
        return posesRead;
    }

    Optional<Vehicle> find(String vehicleId) {
        return Optional.ofNullable(vehicles.get(vehicleId));
    }

    /** Every vehicle, in no particular order. */
    List<Vehicle> all() {
        return List.copyOf(vehicles.values());
    }

    public int size() {
        return vehicles.size();
    }

    /** The pose's {@code t} (the first field the pose JSON has), NaN when there is none. */
    static double timeOf(byte[] json) {
        try (JsonParser p = PoseJson.FACTORY.createParser(json)) {
            if (p.nextToken() != JsonToken.START_OBJECT) {
                return Double.NaN;
            }
            while (p.nextToken() == JsonToken.FIELD_NAME) {
                String name = p.currentName();
                JsonToken value = p.nextToken();
                if (name.equals("t")) {
                    return value.isNumeric() ? p.getDoubleValue() : Double.NaN;
                }
                p.skipChildren();
            }
            return Double.NaN;
        } catch (IOException e) {
            return Double.NaN;
        }
    }
}
