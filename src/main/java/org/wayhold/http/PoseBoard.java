package org.wayhold.http;

import com.fasterxml.jackson.core.JsonParser;
import com.fasterxml.jackson.core.JsonToken;
import java.io.IOException;
import java.util.ArrayDeque;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.List;
import java.util.Optional;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.function.Consumer;

/**
 * The poses of a fleet as another process computed them (the stream workers' poses topic), kept as the
 * pose JSON they arrived in, for {@code serve --from-kafka}: per vehicle the newest
 * {@code history.max_poses} poses, the newest first to answer, and listeners for pose streams. The
 * JSON is passed through as it is, so whatever fields the workers write reach the readers unchanged.
 *
 * <p>Thread-safety: one feeding thread; readers on any thread. Each vehicle's poses are guarded by that
 * vehicle's own lock; listeners are called on the feeding thread and must only hand the pose over.
 */
public final class PoseBoard {

    /** One pose: its time (s, vehicle clock) and its JSON (UTF-8). */
    record Entry(double t, byte[] json) {
    }

    /** One vehicle's poses, oldest first. */
    static final class Vehicle {
        final String id;
        private final ArrayDeque<Entry> poses = new ArrayDeque<>();
        private final List<Consumer<byte[]>> listeners = new CopyOnWriteArrayList<>();
        private volatile Entry latest;
        private volatile long version;

        Vehicle(String id) {
            this.id = id;
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

        void addListener(Consumer<byte[]> l) {
            listeners.add(l);
        }

        void removeListener(Consumer<byte[]> l) {
            listeners.remove(l);
        }
    }

    private final int maxPoses;
    private final ConcurrentHashMap<String, Vehicle> vehicles = new ConcurrentHashMap<>();
    private volatile long posesRead;
    private volatile boolean caughtUp;

    /** @param maxPoses poses kept per vehicle (count, >= 1) */
    public PoseBoard(int maxPoses) {
        if (maxPoses < 1) {
            throw new IllegalArgumentException("maxPoses: must be at least 1, was " + maxPoses);
        }
        this.maxPoses = maxPoses;
    }

    /**
     * Files a pose of a vehicle. A pose older than the newest held is a writer's repetition and is
     * dropped: the stream workers give each vehicle's poses once each, in time order.
     *
     * @return whether the pose was filed (false for a malformed or an out-of-order one)
     */
    public boolean put(String vehicleId, byte[] json) {
        posesRead++;
        double t = timeOf(json);
        if (vehicleId == null || Double.isNaN(t)) {
            return false;
        }
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
            v.latest = e;
            v.version++;
        }
        for (Consumer<byte[]> l : v.listeners) {
            l.accept(json);
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
