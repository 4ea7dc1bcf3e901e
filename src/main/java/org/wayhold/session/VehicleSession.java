package org.wayhold.session;

import java.io.DataInput;
import java.io.DataOutput;
import java.io.IOException;
import java.time.Clock;
import java.util.ArrayDeque;
import java.util.List;
import java.util.Optional;
import java.util.OptionalLong;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.concurrent.ExecutionException;
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
 * <p>Write-ahead: a batch is recorded first and applied only once its record is durable. {@link #submit}
 * hands the batch to the recorder (the journal) under the session's lock, which numbers it, and queues
 * it; whoever waits on it ({@link Applied#admissions()}) applies the queued batches whose records are
 * durable, in the order they were queued, under the lock. A batch whose record failed is dropped
 * unapplied. So the per-vehicle order of the records is the order of application, and the session never
 * holds a batch that was not acknowledged: a restart that applies the records again rebuilds exactly
 * this state, and a batch answered 503 is neither here nor after a restart. (The alternative, applying
 * first and rolling back when the write fails, would need a copy of the whole state before every batch,
 * since a late sample re-filters and rewrites the recent history.) Without a journal the recording is
 * done at once and a batch is applied within {@link #submit}.
 *
 * <p>Quarantine: when applying a batch throws, or leaves the filter's state not finite, the session is
 * quarantined: it keeps the reason, takes no more batches ({@link VehicleQuarantinedException}) and is
 * shown as such, while every other vehicle goes on. Deleting the vehicle ends it.
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

    /** Records a batch before it is applied; runs under the session's lock, must not block on a device. */
    @FunctionalInterface
    public interface BatchRecorder {
        /**
         * @return completes with the record's sequence number (any negative number when records are not
         *         numbered) once the batch is durable, or exceptionally when it could not be recorded
         */
        CompletableFuture<Long> record(List<? extends Sample> batch);
    }

    /** A batch handed to {@link #submit}: applied once its record is durable. */
    public static final class Applied {
        private final VehicleSession session;
        private final Queued queued;

        private Applied(VehicleSession session, Queued queued) {
            this.session = session;
            this.queued = queued;
        }

        /**
         * Waits until the batch is recorded and applied.
         *
         * @return one admission per sample, in the order given
         * @throws IOException                 when it could not be recorded; it was not applied
         * @throws VehicleQuarantinedException when the session was quarantined before or while applying it
         */
        public List<Admission> admissions() throws IOException {
            if (!queued.applied.isDone()) {
                try {
                    queued.recorded.get();
                } catch (InterruptedException e) {
                    Thread.currentThread().interrupt();
                    throw new java.io.InterruptedIOException("interrupted while waiting for the session log");
                } catch (ExecutionException e) {
                    // Drained below: the failure reaches the result.
                }
                session.drain();
            }
            try {
                return queued.applied.join();
            } catch (java.util.concurrent.CompletionException e) {
                Throwable cause = e.getCause();
                if (cause instanceof IOException io) {
                    throw io;
                }
                if (cause instanceof RuntimeException r) {
                    throw r;
                }
                throw new IOException(String.valueOf(cause), cause);
            }
        }

        /** The recording; completes with the record's sequence number once durable. */
        public CompletableFuture<Long> recorded() {
            return queued.recorded;
        }
    }

    /**
     * A batch waiting for its record to be durable, with the wall time it arrived (ms since the epoch),
     * {@link #NOT_ARRIVED} when it did not come through the live path.
     */
    private record Queued(List<? extends Sample> samples, CompletableFuture<Long> recorded,
                          CompletableFuture<List<Admission>> applied, long arrivedAtMillis) {
    }

    /** Arrival time of a batch that did not arrive live (unrecorded submissions, journal replay). */
    private static final long NOT_ARRIVED = Long.MIN_VALUE;

    /** What {@link #writeSnapshot(DataOutput)} wrote: the last record held, or the quarantine reason. */
    public record Captured(long lastSeq, String quarantineReason) {
    }

    /** Version of the layout {@link #writeSnapshot} writes. */
    private static final int SNAPSHOT_FORMAT = 4;

    private final Object lock = new Object();
    private final String vehicleId;
    private final PoseHistory history;
    private final FixLog fixes;
    private final VehiclePipeline pipeline;
    private final List<Consumer<Pose>> listeners = new CopyOnWriteArrayList<>();
    private final ArrayDeque<Queued> queue = new ArrayDeque<>();
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
    /** True once the registry is dropping this session: it takes no more writes. */
    private boolean retired;
    /** Completes once a retirement is settled (the session dropped, or kept after a failed deletion). */
    private CompletableFuture<Void> retirement = CompletableFuture.completedFuture(null);
    /** Why the session is quarantined, or null. */
    private volatile String quarantine;
    /** Sequence number of the last record applied (or restored), -1 when none; read under the lock. */
    private long appliedSeq = -1;
    /** True once a batch was applied or a state restored. */
    private boolean holdsState;

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
     * Sets the sequence number below which no record is this session's: every record of it will be
     * numbered above {@code seq} (the journal's next number less one, read when it was created).
     */
    void startAfter(long seq) {
        synchronized (lock) {
            appliedSeq = seq;
        }
    }

    /**
     * Admits a batch of samples, unrecorded (tests, offline tools).
     *
     * @return one admission per sample, in the order given
     */
    public List<Admission> submit(List<? extends Sample> samples) {
        Applied applied = submit(samples, b -> SessionLog.DONE, false);
        if (applied == null) {
            throw new IllegalStateException("vehicle '" + vehicleId + "': the session was dropped");
        }
        try {
            return applied.admissions();
        } catch (IOException e) {
            throw new java.io.UncheckedIOException(e);
        }
    }

    /**
     * Applies a batch read back from the journal, with its sequence number (recovery). A replayed batch
     * did not arrive now: it leaves the arrival time (see {@link #liveness()}) as it is.
     *
     * @throws VehicleQuarantinedException when the session is quarantined, or is quarantined now because
     *                                     applying the batch failed
     */
    public List<Admission> replay(List<? extends Sample> samples, long seq) {
        synchronized (lock) {
            if (quarantine != null) {
                throw new VehicleQuarantinedException(vehicleId, quarantine, null);
            }
            return applyLocked(samples, seq, NOT_ARRIVED);
        }
    }

    /**
     * Records a batch that has just arrived and queues it to be applied once the record is durable (see
     * the class comment). The wall time of its arrival is taken now and noted when a sample of it is
     * applied (see {@link #liveness()}), before listeners hear of the poses.
     *
     * @return the queued batch, or null when the session has been retired (the caller must submit to the
     *         vehicle's current session instead, once the retirement is settled: {@link #retirement()})
     * @throws VehicleQuarantinedException when the session is quarantined (nothing is recorded)
     */
    public Applied submit(List<? extends Sample> samples, BatchRecorder recorder) {
        return submit(samples, recorder, true);
    }

    private Applied submit(List<? extends Sample> samples, BatchRecorder recorder, boolean arrived) {
        synchronized (lock) {
            if (retired) {
                return null;
            }
            if (quarantine != null) {
                throw new VehicleQuarantinedException(vehicleId, quarantine, null);
            }
            if (samples.isEmpty()) {
                return new Applied(this, new Queued(List.of(), SessionLog.DONE,
                        CompletableFuture.completedFuture(List.of()), NOT_ARRIVED));
            }
            // The batch arrives now, though it is applied once its record is durable.
            long arrivedAtMillis = arrived ? clock.millis() : NOT_ARRIVED;
            CompletableFuture<Long> recorded = recorder.record(samples);
            // The caller may reuse its list once this returns; a batch that waits keeps its own copy.
            List<? extends Sample> kept = recorded.isDone() && queue.isEmpty() ? samples : List.copyOf(samples);
            Queued q = new Queued(kept, recorded, new CompletableFuture<>(), arrivedAtMillis);
            queue.addLast(q);
            drainLocked();
            return new Applied(this, q);
        }
    }

    /**
     * Applies the queued batches whose records are done, oldest first; stops at the first one still
     * being written. Records complete in the order they were made, so a done record's predecessors are
     * done too.
     */
    void drain() {
        synchronized (lock) {
            drainLocked();
        }
    }

    private void drainLocked() {
        while (!queue.isEmpty() && queue.peekFirst().recorded().isDone()) {
            Queued q = queue.pollFirst();
            long seq;
            try {
                seq = q.recorded().join();
            } catch (java.util.concurrent.CompletionException | java.util.concurrent.CancellationException e) {
                Throwable cause = e.getCause() != null ? e.getCause() : e;
                q.applied().completeExceptionally(cause instanceof IOException ? cause
                        : new IOException(String.valueOf(cause), cause));
                continue;
            }
            if (quarantine != null) {
                q.applied().completeExceptionally(new VehicleQuarantinedException(vehicleId, quarantine, null));
                continue;
            }
            try {
                q.applied().complete(applyLocked(q.samples(), seq, q.arrivedAtMillis()));
            } catch (VehicleQuarantinedException e) {
                q.applied().completeExceptionally(e);
            }
        }
    }

    /**
     * Applies a durable batch. Anything thrown while applying (a defect, an inconsistent restored state,
     * even an error such as running out of memory) leaves the state unknown: the session is quarantined
     * rather than left to serve or journal on from it.
     */
    private List<Admission> applyLocked(List<? extends Sample> samples, long seq, long arrivedAtMillis) {
        List<Admission> result;
        try {
            result = pipeline.submit(samples);
            String bad = nonFinite(pipeline.snapshot());
            if (bad != null) {
                throw new IllegalStateException("the filter's " + bad + " is not finite after the batch");
            }
        } catch (Throwable e) {
            String reason = (seq >= 0 ? "applying journal record " + seq : "applying a batch") + " failed: " + e;
            quarantine = reason;
            version++;
            throw new VehicleQuarantinedException(vehicleId, reason, e);
        }
        if (seq >= 0) {
            appliedSeq = seq;
        }
        holdsState = true;
        // Noted before listeners hear of the poses, so that what they are given is not stale.
        if (arrivedAtMillis != NOT_ARRIVED && result.stream().anyMatch(a -> a.kind() == Admission.Kind.APPLIED)) {
            receivedAtMillis = arrivedAtMillis;
            quietSinceMillis = arrivedAtMillis;
        }
        refreshLatest();
        notifyListeners();
        return result;
    }

    /**
     * The first part of the filter's estimate that is not a finite number, or null. Before the filter
     * is initialised there is no estimate to check.
     */
    static String nonFinite(FilterSnapshot s) {
        if (!s.initialized()) {
            return null;
        }
        double[] values = {s.eastM(), s.northM(), s.yawRad(), s.gyroBiasRadPerS(), s.speedScale(), s.gnssErrEastM(),
            s.gnssErrNorthM(), s.covEastEastM2(), s.covEastNorthM2(), s.covNorthNorthM2(), s.varYawRad2(),
            s.varGyroBias(), s.varSpeedScale()};
        String[] names = {"east", "north", "yaw", "gyro bias", "speed scale", "GNSS error east", "GNSS error north",
            "east variance", "east-north covariance", "north variance", "yaw variance", "gyro bias variance",
            "speed scale variance"};
        for (int i = 0; i < values.length; i++) {
            if (!Double.isFinite(values[i])) {
                return names[i] + " (" + values[i] + ")";
            }
        }
        return null;
    }

    /**
     * Holds the session apart: it takes no more batches and serves no poses; why is kept and shown.
     * Used by recovery for a vehicle that cannot be rebuilt.
     */
    public void quarantine(String reason) {
        synchronized (lock) {
            if (quarantine == null) {
                quarantine = reason;
                version++;
            }
        }
    }

    /** Why the session is quarantined, if it is. */
    public Optional<String> quarantineReason() {
        return Optional.ofNullable(quarantine);
    }

    /**
     * Takes no more writes from now on; under the same lock, records the deletion. Until
     * {@link #settleRetirement} is called, {@link #retirement()} is pending.
     *
     * @return the recording, or null when the session was already retired
     */
    public CompletableFuture<Long> retire(Supplier<CompletableFuture<Long>> recordDeletion) {
        synchronized (lock) {
            if (retired) {
                return null;
            }
            retired = true;
            retirement = new CompletableFuture<>();
            return recordDeletion.get();
        }
    }

    /**
     * Ends a retirement: the session was dropped ({@code dropped}), or its deletion could not be recorded
     * and it takes writes again.
     */
    void settleRetirement(boolean dropped) {
        CompletableFuture<Void> r;
        synchronized (lock) {
            if (!dropped) {
                retired = false;
            }
            r = retirement;
        }
        r.complete(null);
    }

    /** Completes once the current retirement, if any, is settled. */
    CompletableFuture<Void> retirement() {
        synchronized (lock) {
            return retirement;
        }
    }

    /**
     * Retires the session if it has applied nothing and waits for nothing (a first batch that could not
     * be written), atomically with the check; the caller settles the retirement.
     *
     * @return true when it was retired
     */
    boolean retireIfPristine() {
        synchronized (lock) {
            if (retired || holdsState || !queue.isEmpty() || quarantine != null) {
                return false;
            }
            retired = true;
            retirement = new CompletableFuture<>();
            return true;
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
                try {
                    l.accept(p);
                } catch (RuntimeException e) {
                    // A listener's defect is its own: the batch is applied and recorded all the same.
                }
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
            // Durable batches are applied before the listener joins: their poses belong to the backlog.
            drainLocked();
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
            drainLocked();
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
            drainLocked();
            return history.at(tS);
        }
    }

    /** Fixes received with fromS <= t <= toS and the filter's decision on each, oldest first. */
    public List<FixRecord> fixes(double fromS, double toS) {
        synchronized (lock) {
            drainLocked();
            return fixes.between(fromS, toS);
        }
    }

    /** Poses from the history with fromS <= t <= toS. */
    public List<Pose> track(double fromS, double toS) {
        synchronized (lock) {
            drainLocked();
            return history.between(fromS, toS);
        }
    }

    /**
     * A consistent set of counters for metrics and the vehicle list: copied under the lock, nothing
     * more (the filter's counts alone, not a whole snapshot of its estimate).
     */
    public SessionStats stats() {
        synchronized (lock) {
            drainLocked();
            return new SessionStats(pipeline.applied(SampleType.WHEEL_SPEED), pipeline.applied(SampleType.YAW_RATE),
                    pipeline.applied(SampleType.GNSS), pipeline.applied(SampleType.REFERENCE), pipeline.duplicates(),
                    pipeline.rejected(), pipeline.rewinds(), pipeline.filterCounts(), history.size());
        }
    }

    /**
     * Writes the session's whole state (time ordering with its checkpoints, filter, frame, history and
     * counters), bit for bit, and reads a sequence number under the same lock. A session built with the
     * same id and settings and given the bytes to {@link #readSnapshot} continues exactly as this one
     * would; listeners are not part of it. Batches whose records are durable are applied first; batches
     * still being recorded are not in the state.
     *
     * @param sequence read under the lock after writing
     * @return the sequence number, or empty when the session has been retired (nothing was written)
     */
    public OptionalLong writeSnapshot(DataOutput out, LongSupplier sequence) throws IOException {
        synchronized (lock) {
            drainLocked();
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
     * Writes the session's whole state for a snapshot of all sessions (see
     * {@link #writeSnapshot(DataOutput, LongSupplier)}), with the sequence number of the last record it
     * holds; a quarantined session writes nothing and gives its reason. Batches whose records are durable
     * are applied first.
     *
     * @return what was written, or null when the session holds nothing worth keeping (it has applied
     *         nothing and waits for nothing: any record of it comes after the snapshot's floor)
     */
    public Captured writeSnapshot(DataOutput out) throws IOException {
        synchronized (lock) {
            drainLocked();
            if (quarantine != null) {
                return new Captured(appliedSeq, quarantine);
            }
            if (!holdsState && queue.isEmpty()) {
                return null;
            }
            out.writeInt(SNAPSHOT_FORMAT);
            out.writeUTF(vehicleId);
            pipeline.writeState(out);
            history.writeTo(out);
            fixes.writeTo(out);
            out.writeLong(version);
            return new Captured(appliedSeq, null);
        }
    }

    /**
     * Restores a state from a snapshot of all sessions (recovery), knowing the last record it holds.
     *
     * @throws IOException when the data is not a snapshot of this vehicle in this format, or does not make
     *                     a valid state (a filter estimate that is not finite, values out of range)
     */
    public void readSnapshot(DataInput in, long lastSeq) throws IOException {
        synchronized (lock) {
            try {
                readSnapshot(in);
            } catch (RuntimeException e) {
                // Record constructors validate what they read: a value out of range is a bad entry.
                throw new IOException("snapshot: " + e.getMessage(), e);
            }
            String bad = nonFinite(pipeline.snapshot());
            if (bad != null) {
                throw new IOException("snapshot: the filter's " + bad + " is not finite");
            }
            appliedSeq = lastSeq;
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
            holdsState = true;
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
