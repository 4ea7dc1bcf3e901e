package org.wayhold.session;

import java.io.DataInput;
import java.io.DataOutput;
import java.io.IOException;
import java.util.List;
import java.util.Optional;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.function.Consumer;
import org.wayhold.filter.FilterSnapshot;
import org.wayhold.filter.GnssOutcome;
import org.wayhold.filter.NavigationFilter;
import org.wayhold.filter.SampleFeeder;
import org.wayhold.geo.Enu;
import org.wayhold.geo.Geodetic;
import org.wayhold.geo.LocalFrame;
import org.wayhold.ordering.Admission;
import org.wayhold.ordering.ReorderBuffer;
import org.wayhold.ordering.Replayable;
import org.wayhold.pose.Pose;
import org.wayhold.pose.PoseAssembler;
import org.wayhold.pose.PoseHistory;
import org.wayhold.sample.FixType;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.ReferencePoint;
import org.wayhold.sample.Sample;
import org.wayhold.sample.SampleType;
import org.wayhold.settings.Settings;

/**
 * One vehicle: samples in, in time order, through the filter, to poses and a bounded history.
 *
 * <p>Thread-safety: {@link #submit} and the history queries are serialised on this object (one
 * writer per vehicle); {@link #latest()} reads a volatile snapshot and never waits for an ingest.
 */
public final class VehicleSession {

    private final String vehicleId;
    private final Settings settings;
    private final Geodetic configuredOrigin;
    private final PoseAssembler assembler;
    private final PoseHistory history;
    private final FixLog fixes;
    private final Pipeline pipeline;
    private final ReorderBuffer<Checkpoint> ordering;
    private final List<Consumer<Pose>> listeners = new CopyOnWriteArrayList<>();

    /** Version of the layout {@link #writeSnapshot} writes. */
    private static final int SNAPSHOT_FORMAT = 3;

    private double epochT = Double.NaN;
    /** Time of the newest pose given to listeners (s, vehicle clock); not part of the state. */
    private double emittedUpToT = Double.NEGATIVE_INFINITY;
    private Pose lastEmitted;
    private volatile Pose latest;
    private volatile long version;
    /** Samples applied, by {@link SampleType} ordinal. */
    private final long[] appliedByType = new long[SampleType.values().length];

    /**
     * @param vehicleId        the vehicle's id
     * @param settings         filter, gating, outage, ordering and history settings
     * @param configuredOrigin ENU origin to use instead of the first fix, or null
     */
    public VehicleSession(String vehicleId, Settings settings, Geodetic configuredOrigin) {
        this.vehicleId = vehicleId;
        this.settings = settings;
        this.configuredOrigin = configuredOrigin;
        this.assembler = new PoseAssembler(settings.outage());
        this.history = new PoseHistory(settings.history().maxPoses());
        this.fixes = new FixLog(settings.history().maxPoses());
        this.pipeline = new Pipeline(new NavigationFilter(settings.filter(), settings.gating(), settings.outage(),
                settings.profileFor(vehicleId)));
        this.ordering = new ReorderBuffer<>(pipeline, settings.ordering());
    }

    public String vehicleId() {
        return vehicleId;
    }

    /**
     * Admits a batch of samples.
     *
     * @return one admission per sample, in the order given
     */
    public synchronized List<Admission> submit(List<? extends Sample> samples) {
        if (samples.isEmpty()) {
            return List.of();
        }
        List<Admission> result = ordering.submit(samples);
        refreshLatest();
        notifyListeners();
        return result;
    }

    private void refreshLatest() {
        if (Double.isNaN(epochT) || Double.isNaN(pipeline.filter.tRel())) {
            return;
        }
        latest = assembler.assemble(pipeline.filter.snapshot(), epochT, pipeline.frame);
        version++;
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
     * Registers a listener called, from the writer's thread at the end of each batch, with the poses the
     * batch added to the history (see {@link #notifyListeners}).
     */
    public void addListener(Consumer<Pose> listener) {
        listeners.add(listener);
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
    public synchronized Optional<Pose> at(double tS) {
        return history.at(tS);
    }

    /** Fixes received with fromS <= t <= toS and the filter's decision on each, oldest first. */
    public synchronized List<FixRecord> fixes(double fromS, double toS) {
        return fixes.between(fromS, toS);
    }

    /** Poses from the history with fromS <= t <= toS. */
    public synchronized List<Pose> track(double fromS, double toS) {
        return history.between(fromS, toS);
    }

    /** A consistent set of counters for metrics and the vehicle list. */
    public synchronized SessionStats stats() {
        FilterSnapshot s = pipeline.filter.snapshot();
        return new SessionStats(appliedByType[SampleType.WHEEL_SPEED.ordinal()],
                appliedByType[SampleType.YAW_RATE.ordinal()], appliedByType[SampleType.GNSS.ordinal()],
                appliedByType[SampleType.REFERENCE.ordinal()],
                ordering.duplicates(), ordering.rejected(), ordering.rewinds(), s.counts(), history.size());
    }

    /**
     * Writes the session's whole state (time ordering with its checkpoints, filter, frame, history and
     * counters), bit for bit. A session built with the same id and settings and given this to
     * {@link #readSnapshot} continues exactly as this one would; listeners are not part of it.
     */
    public synchronized void writeSnapshot(DataOutput out) throws IOException {
        out.writeInt(SNAPSHOT_FORMAT);
        out.writeUTF(vehicleId);
        out.writeDouble(epochT);
        writeCheckpoint(out, pipeline.checkpoint());
        ordering.writeState(out, VehicleSession::writeCheckpoint);
        history.writeTo(out);
        fixes.writeTo(out);
        out.writeLong(version);
    }

    /**
     * Restores a state written by {@link #writeSnapshot} into this session, which must be new (no
     * sample yet) and built with the same id and settings.
     *
     * @throws IOException when the data is not a snapshot of this vehicle in this format
     */
    public synchronized void readSnapshot(DataInput in) throws IOException {
        int format = in.readInt();
        if (format != SNAPSHOT_FORMAT) {
            throw new IOException("snapshot: format " + format + ", expected " + SNAPSHOT_FORMAT);
        }
        String id = in.readUTF();
        if (!id.equals(vehicleId)) {
            throw new IOException("snapshot: written for vehicle '" + id + "', not '" + vehicleId + "'");
        }
        epochT = in.readDouble();
        pipeline.restoreWithoutHistory(readCheckpoint(in));
        ordering.readState(in, this::readCheckpoint);
        history.readFrom(in);
        fixes.readFrom(in);
        long savedVersion = in.readLong();
        refreshLatest();
        version = savedVersion;
    }

    private static void writeCheckpoint(DataOutput out, Checkpoint c) throws IOException {
        c.filter.writeState(out);
        out.writeBoolean(c.frame != null);
        if (c.frame != null) {
            Geodetic o = c.frame.origin();
            out.writeDouble(o.latDeg());
            out.writeDouble(o.lonDeg());
            out.writeDouble(o.altM());
        }
        out.writeDouble(c.lastHistoryTRel);
        out.writeInt(c.appliedByType.length);
        for (long v : c.appliedByType) {
            out.writeLong(v);
        }
    }

    private Checkpoint readCheckpoint(DataInput in) throws IOException {
        NavigationFilter f = pipeline.filter.stateCopy();
        f.readState(in);
        LocalFrame frame = null;
        if (in.readBoolean()) {
            try {
                frame = new LocalFrame(new Geodetic(in.readDouble(), in.readDouble(), in.readDouble()));
            } catch (IllegalArgumentException e) {
                throw new IOException("snapshot: bad frame origin: " + e.getMessage(), e);
            }
        }
        double lastHistoryTRel = in.readDouble();
        int n = in.readInt();
        if (n != appliedByType.length) {
            throw new IOException("snapshot: " + n + " sample counters, expected " + appliedByType.length);
        }
        long[] applied = new long[n];
        for (int i = 0; i < n; i++) {
            applied[i] = in.readLong();
        }
        return new Checkpoint(f, frame, lastHistoryTRel, applied);
    }

    /** Everything a checkpoint must bring back. */
    private record Checkpoint(NavigationFilter filter, LocalFrame frame, double lastHistoryTRel,
                              long[] appliedByType) {
    }

    /** The in-order part: time ordering calls it sample by sample. */
    private final class Pipeline implements Replayable<Checkpoint> {
        private final NavigationFilter filter;
        private LocalFrame frame;
        private double lastHistoryTRel = Double.NEGATIVE_INFINITY;

        Pipeline(NavigationFilter filter) {
            this.filter = filter;
        }

        @Override
        public void apply(Sample sample) {
            if (Double.isNaN(epochT)) {
                // The first sample applied is the earliest the ordering kept of the first batch, so a
                // sample it refused (a wrong clock) never sets the epoch.
                epochT = Math.floor(sample.t());
            }
            if (frame == null && sample instanceof GnssFix g && g.fix() != FixType.NONE) {
                frame = new LocalFrame(configuredOrigin != null ? configuredOrigin
                        : new Geodetic(g.latDeg(), g.lonDeg(), g.hasAlt() ? g.altM() : 0.0));
            }
            GnssOutcome outcome = SampleFeeder.feed(filter, sample, epochT, frame);
            if (outcome != null && frame != null) {
                GnssFix g = (GnssFix) sample;
                Enu enu = frame.toEnu(g.latDeg(), g.lonDeg(), g.hasAlt() ? g.altM() : frame.origin().altM());
                fixes.add(new FixRecord(g.t(), g.latDeg(), g.lonDeg(), enu.eastM(), enu.northM(),
                        filter.horizontalSigmaM(g), outcome.kind(), outcome.nis()));
            }
            appliedByType[sample.type().ordinal()]++;
            if (sample instanceof ReferencePoint) {
                // Reference points are for scoring only: they reach the filter only as time.
                return;
            }
            double tRel = sample.t() - epochT;
            if (frame != null && (sample instanceof GnssFix || tRel - lastHistoryTRel >= settings.history().intervalS())) {
                Pose pose = assembler.assemble(filter.snapshot(), epochT, frame);
                history.add(pose);
                lastHistoryTRel = tRel;

            }
        }

        @Override
        public Checkpoint checkpoint() {
            return new Checkpoint(filter.stateCopy(), frame, lastHistoryTRel, appliedByType.clone());
        }

        @Override
        public void restore(Checkpoint c) {
            restoreWithoutHistory(c);
            double t = Double.isNaN(c.filter.tRel()) ? Double.NEGATIVE_INFINITY : epochT + c.filter.tRel();
            history.truncateAfter(t);
            fixes.truncateAfter(t);
        }

        @Override
        public boolean alreadyApplied(Sample sample) {
            // The fix log remembers the recent fixes; the inputs (wheel speed, yaw rate) leave no trace.
            return sample instanceof GnssFix g && fixes.contains(g.t(), g.latDeg(), g.lonDeg());
        }

        void restoreWithoutHistory(Checkpoint c) {
            filter.restore(c.filter);
            frame = c.frame;
            lastHistoryTRel = c.lastHistoryTRel;
            System.arraycopy(c.appliedByType, 0, appliedByType, 0, appliedByType.length);
        }
    }
}
