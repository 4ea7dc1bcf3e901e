package org.wayhold.session;

import java.io.DataInput;
import java.io.DataOutput;
import java.io.IOException;
import java.time.Clock;
import java.util.List;
import java.util.Optional;
import java.util.OptionalLong;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.function.Consumer;
import java.util.function.LongSupplier;
import java.util.function.Supplier;
import org.wayhold.filter.FilterSnapshot;
import org.wayhold.geo.Geodetic;
import org.wayhold.ordering.Admission;
import org.wayhold.pipeline.FixRecord;
import org.wayhold.pipeline.TrackOutput;
import org.wayhold.pipeline.VehiclePipeline;
import org.wayhold.pose.Pose;
import org.wayhold.pose.PoseHistory;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.sample.SampleType;
import org.wayhold.settings.Settings;

/**
 * One vehicle as the service holds it: its {@link VehiclePipeline}, a bounded history of poses and
 * fixes, and listeners of new poses.
 *
 * <p>Thread-safety: writes and history queries are serialised on a private lock (one writer per
 * vehicle); {@link #latest()} reads a volatile snapshot and never waits for an ingest. Callers that
 * must record a change in the same order as it is applied (the journal) pass the recording step in,
 * and it runs under that lock ({@link #submit}, {@link #retire}, {@link #writeSnapshot}).
 *
 * <p>Besides the vehicle's own timeline the session notes, on the service's wall clock, when samples
 * last arrived through the live path ({@link #submit(List, BatchRecorder)}), so that a vehicle that
 * stopped sending can be told from one that is merely in a long outage ({@link #liveness()}). That time
 * is not part of the state: a session restored from a snapshot or the journal has none until its next
 * sample, and counts its silence from the moment it was restored.
 */
public final class VehicleSession {

    /** Records an applied batch; runs under the session's lock, must not block on a device. */
    @FunctionalInterface
    public interface BatchRecorder {
        /** @return completes once the batch is durable */
        CompletableFuture<?> record(List<? extends Sample> batch);
    }

    /** What {@link #submit} did: one admission per sample, and the recording of the batch. */
    public record Applied(List<Admission> admissions, CompletableFuture<?> recorded) {
    }

    /** Version of the layout {@link #writeSnapshot} writes. */
    private static final int SNAPSHOT_FORMAT = 4;

    private final Object lock = new Object();
    private final String vehicleId;
    private final PoseHistory history;
    private final FixLog fixes;
    private final VehiclePipeline pipeline;
    private final List<Consumer<Pose>> listeners = new CopyOnWriteArrayList<>();
    private final Clock clock;
    private final double staleAfterS;
    /** Wall time of the latest live arrival of an applied sample (ms since the epoch), MIN_VALUE if none. */
    private volatile long receivedAtMillis = Long.MIN_VALUE;
    /** Wall time silence is counted from: the latest arrival, else the session's creation (ms). */
    private volatile long quietSinceMillis;

    /** Time of the newest pose given to listeners (s, vehicle clock); not part of the state. */
    private double emittedUpToT = Double.NEGATIVE_INFINITY;
    private Pose lastEmitted;
    private volatile Pose latest;
    private volatile long version;
    /** True once the registry has dropped this session: it takes no more writes. */
    private boolean retired;

    /**
     * @param vehicleId        the vehicle's id
     * @param settings         filter, gating, outage, ordering and history settings
     * @param configuredOrigin ENU origin to use instead of the first fix, or null
     */
    public VehicleSession(String vehicleId, Settings settings, Geodetic configuredOrigin) {
        this(vehicleId, settings, configuredOrigin, Clock.systemUTC());
    }

    /**
     * @param vehicleId        the vehicle's id
     * @param settings         filter, gating, outage, ordering and history settings
     * @param configuredOrigin ENU origin to use instead of the first fix, or null
     * @param clock            the service's wall clock, for arrival times and staleness
     */
    public VehicleSession(String vehicleId, Settings settings, Geodetic configuredOrigin, Clock clock) {
        this.vehicleId = vehicleId;
        this.clock = java.util.Objects.requireNonNull(clock, "clock");
        this.staleAfterS = settings.outage().staleAfterS();
        this.quietSinceMillis = clock.millis();
        this.history = new PoseHistory(settings.history().maxPoses());
        this.fixes = new FixLog(settings.history().maxPoses());
        this.pipeline = new VehiclePipeline(settings, settings.profileFor(vehicleId), configuredOrigin,
                new TrackOutput() {
                    @Override
                    public void pose(Pose pose) {
                        history.add(pose);
                    }

                    @Override
                    public void fix(FixRecord record) {
                        fixes.add(record);
                    }

                    @Override
                    public void rewoundTo(double tS) {
                        history.truncateAfter(tS);
                        fixes.truncateAfter(tS);
                    }

                    @Override
                    public boolean holds(GnssFix fix) {
                        // The fix log remembers the recent fixes; the inputs leave no trace.
                        return fixes.contains(fix.t(), fix.latDeg(), fix.lonDeg());
                    }
                });
    }

    public String vehicleId() {
        return vehicleId;
    }

    /**
     * Admits a batch of samples, unrecorded (tests, offline tools, journal replay).
     *
     * @return one admission per sample, in the order given
     */
    public List<Admission> submit(List<? extends Sample> samples) {
        Applied applied = submit(samples, b -> SessionLog.DONE, false);
        if (applied == null) {
            throw new IllegalStateException("vehicle '" + vehicleId + "': the session was dropped");
        }
        return applied.admissions();
    }

    /**
     * Admits a batch of samples that has just arrived and, under the same lock, records it, so that the
     * record's order per vehicle is the order of application. When a sample of the batch is applied,
     * its arrival is noted on the wall clock (see {@link #liveness()}) before listeners hear of the poses.
     *
     * @return the admissions and the recording, or null when the session has been retired (the caller
     *         must submit to the vehicle's current session instead)
     */
    public Applied submit(List<? extends Sample> samples, BatchRecorder recorder) {
        return submit(samples, recorder, true);
    }

    private Applied submit(List<? extends Sample> samples, BatchRecorder recorder, boolean arrived) {
        synchronized (lock) {
            if (retired) {
                return null;
            }
            if (samples.isEmpty()) {
                return new Applied(List.of(), SessionLog.DONE);
            }
            List<Admission> result = pipeline.submit(samples);
            if (arrived && result.stream().anyMatch(a -> a.kind() == Admission.Kind.APPLIED)) {
                long now = clock.millis();
                receivedAtMillis = now;
                quietSinceMillis = now;
            }
            refreshLatest();
            CompletableFuture<?> recorded = recorder.record(samples);
            notifyListeners();
            return new Applied(result, recorded);
        }
    }

    /**
     * Takes no more writes from now on; under the same lock, records the deletion.
     *
     * @return the recording, or null when the session was already retired
     */
    public CompletableFuture<?> retire(Supplier<CompletableFuture<?>> recordDeletion) {
        synchronized (lock) {
            if (retired) {
                return null;
            }
            retired = true;
            return recordDeletion.get();
        }
    }

    private void refreshLatest() {
        Pose p = pipeline.latestPose();
        if (p != null) {
            latest = p;
            version++;
        }
    }

    /**
     * Gives listeners the history's poses that are new since the last call, oldest first, once each and
     * never going back in time. Re-filtering after a late sample re-creates poses (identical before the
     * late sample's time, corrected after it) inside a batch; listeners see only the final pose of each
     * instant, and a pose of the last instant they saw again only if it changed (a fix sent after the
     * inputs of its own time). The corrected past is in the history.
     */
    private void notifyListeners() {
        if (history.isEmpty()) {
            return;
        }
        if (listeners.isEmpty()) {
            // A listener that registers later starts from what is new then.
            lastEmitted = history.newest();
            emittedUpToT = lastEmitted.t();
            return;
        }
        for (Pose p : history.between(emittedUpToT, Double.POSITIVE_INFINITY)) {
            if (p.t() == emittedUpToT && p.equals(lastEmitted)) {
                continue;
            }
            for (Consumer<Pose> l : listeners) {
                l.accept(p);
            }
            lastEmitted = p;
            emittedUpToT = p.t();
        }
    }

    /**
     * Registers a listener called with the poses each batch added to the history (see
     * {@link #notifyListeners}). It is called under the session's lock, on the writer's thread, so it
     * must only hand the pose over (to a queue, say) and never block.
     */
    public void addListener(Consumer<Pose> listener) {
        listeners.add(listener);
    }

    /**
     * What a new subscriber starts from, taken under the same lock as the listener's registration, so
     * that the backlog and the poses the listener hears later neither overlap nor leave a hole.
     *
     * @param backlog the poses to send first, oldest first
     * @param resumed true when the backlog continues after the time the subscriber asked for, false
     *                when it is only the latest pose (no time given, or nothing held after it)
     * @param heldFromT oldest pose time the history holds (s, vehicle clock), NaN when empty
     */
    public record Subscription(List<Pose> backlog, boolean resumed, double heldFromT) {
    }

    /**
     * Registers a listener (as {@link #addListener}) and returns what it must be given first: the
     * history's poses after {@code afterT} when that is a number and the history holds the time (a
     * client resuming a stream it lost), else the latest pose alone.
     *
     * @param afterT time of the last pose the subscriber saw (s, vehicle clock), or NaN for none
     */
    public Subscription subscribe(Consumer<Pose> listener, double afterT) {
        synchronized (lock) {
            listeners.add(listener);
            double heldFrom = history.isEmpty() ? Double.NaN : history.oldestT();
            if (!Double.isNaN(afterT) && !history.isEmpty()) {
                List<Pose> after = new java.util.ArrayList<>();
                for (Pose p : history.between(afterT, Double.POSITIVE_INFINITY)) {
                    if (p.t() > afterT) {
                        after.add(p);
                    }
                }
                return new Subscription(after, true, heldFrom);
            }
            Pose p = latest;
            return new Subscription(p == null ? List.of() : List.of(p), false, heldFrom);
        }
    }

    /** Whether the vehicle is still sending, on the wall clock now ({@code outage.stale_after_s}). */
    public Liveness liveness() {
        return Liveness.of(receivedAtMillis, quietSinceMillis, clock.millis(), staleAfterS);
    }

    /**
     * The stretch of vehicle time the pose history holds now.
     *
     * @param fromT   oldest pose (s, vehicle clock), NaN when the history is empty
     * @param toT     newest pose (s), NaN when empty
     * @param full    true when the history is at its capacity, so older poses have been (or are being)
     *                let go to keep it bounded
     */
    public record HeldSpan(double fromT, double toT, boolean full) {
    }

    /** What the pose history holds (see {@link HeldSpan}). */
    public HeldSpan held() {
        synchronized (lock) {
            if (history.isEmpty()) {
                return new HeldSpan(Double.NaN, Double.NaN, false);
            }
            return new HeldSpan(history.oldestT(), history.newestT(), history.full());
        }
    }

    public void removeListener(Consumer<Pose> listener) {
        listeners.remove(listener);
    }

    /** The newest pose, empty before the first sample. */
    public Optional<Pose> latest() {
        return Optional.ofNullable(latest);
    }

    /** Changes whenever {@link #latest()} may have changed (for HTTP entity tags). */
    public long version() {
        return version;
    }

    /** The newest pose at or before {@code tS} from the history. */
    public Optional<Pose> at(double tS) {
        synchronized (lock) {
            return history.at(tS);
        }
    }

    /** Fixes received with fromS <= t <= toS and the filter's decision on each, oldest first. */
    public List<FixRecord> fixes(double fromS, double toS) {
        synchronized (lock) {
            return fixes.between(fromS, toS);
        }
    }

    /** Poses from the history with fromS <= t <= toS. */
    public List<Pose> track(double fromS, double toS) {
        synchronized (lock) {
            return history.between(fromS, toS);
        }
    }

    /** A consistent set of counters for metrics and the vehicle list. */
    public SessionStats stats() {
        synchronized (lock) {
            FilterSnapshot s = pipeline.snapshot();
            return new SessionStats(pipeline.applied(SampleType.WHEEL_SPEED), pipeline.applied(SampleType.YAW_RATE),
                    pipeline.applied(SampleType.GNSS), pipeline.applied(SampleType.REFERENCE), pipeline.duplicates(), pipeline.rejected(), pipeline.rewinds(), s.counts(),
                    history.size());
        }
    }

    /**
     * Writes the session's whole state (time ordering with its checkpoints, filter, frame, history and
     * counters), bit for bit, and reads a sequence number under the same lock: every record of this
     * vehicle made so far was made under the lock, so it lies before that number, and every later one
     * after. A session built with the same id and settings and given the bytes to
     * {@link #readSnapshot} continues exactly as this one would; listeners are not part of it.
     *
     * @param sequence read under the lock after writing (the journal's next sequence number, say)
     * @return the sequence number, or empty when the session has been retired (nothing was written)
     */
    public OptionalLong writeSnapshot(DataOutput out, LongSupplier sequence) throws IOException {
        synchronized (lock) {
            if (retired) {
                return OptionalLong.empty();
            }
            out.writeInt(SNAPSHOT_FORMAT);
            out.writeUTF(vehicleId);
            pipeline.writeState(out);
            history.writeTo(out);
            fixes.writeTo(out);
            out.writeLong(version);
            return OptionalLong.of(sequence.getAsLong());
        }
    }

    /**
     * Restores a state written by {@link #writeSnapshot} into this session, which must be new (no
     * sample yet) and built with the same id and settings.
     *
     * @throws IOException when the data is not a snapshot of this vehicle in this format
     */
    public void readSnapshot(DataInput in) throws IOException {
        synchronized (lock) {
            int format = in.readInt();
            if (format != SNAPSHOT_FORMAT) {
                throw new IOException("snapshot: format " + format + ", expected " + SNAPSHOT_FORMAT);
            }
            String id = in.readUTF();
            if (!id.equals(vehicleId)) {
                throw new IOException("snapshot: written for vehicle '" + id + "', not '" + vehicleId + "'");
            }
            pipeline.readState(in);
            history.readFrom(in);
            fixes.readFrom(in);
            long savedVersion = in.readLong();
            refreshLatest();
            version = savedVersion;
        }
    }
}
