package org.wayhold.pipeline;

import java.io.DataInput;
import java.io.DataOutput;
import java.io.IOException;
import org.wayhold.filter.FilterCounts;
import org.wayhold.filter.FilterSnapshot;
import org.wayhold.filter.FilterState;
import org.wayhold.filter.GnssOutcome;
import org.wayhold.filter.NavigationFilter;
import org.wayhold.filter.SmootherLog;
import org.wayhold.geo.Enu;
import org.wayhold.geo.Geodetic;
import org.wayhold.geo.LocalFrame;
import org.wayhold.pose.Pose;
import org.wayhold.pose.PoseAssembler;
import org.wayhold.sample.FixType;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.ReferencePoint;
import org.wayhold.sample.Sample;
import org.wayhold.sample.SampleType;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;
import org.wayhold.settings.Settings;
import org.wayhold.settings.VehicleProfile;

/**
 * The in-order half of a vehicle's pipeline: samples, already in processing order, through the
 * session epoch and ENU frame into the filter, and out as poses and fix decisions.
 *
 * <ul>
 *   <li>Epoch: the floor of the first applied sample's time; the filter works in seconds since it,
 *       so epoch times near 1.8e9 s lose no precision.</li>
 *   <li>Frame: the configured origin, else the first fix with a solution (at its height, or 0 m).</li>
 *   <li>History points: every fix, and the first sample at least {@code history.interval_s} after the
 *       previous point, once a frame exists. Reference points reach the filter only as time.</li>
 * </ul>
 *
 * <p>The live session drives it through {@link VehiclePipeline}'s time ordering; offline scoring drives
 * it over the ordering's output and branches it with {@link #branchWithoutGnss()}, so both apply
 * samples alike. Not thread-safe: one writer.
 */
public final class VehicleTrack {

    private final Settings settings;
    private final VehicleProfile profile;
    private final Geodetic configuredOrigin;
    private final PoseAssembler assembler;
    private final NavigationFilter filter;
    /** Fixes up to this time (s, vehicle clock) are withheld: -infinity for none, +infinity for all. */
    private final double withholdGnssThroughT;
    private final TrackOutput output;
    /** The forward pass kept for smoothing, null unless recording. */
    private SmootherLog smoothing;
    /** True when every history point is a smoothing node (a whole-drive replay). */
    private boolean nodeAtHistoryPoints;

    private double epochT = Double.NaN;
    private LocalFrame frame;
    private double lastHistoryTRel = Double.NEGATIVE_INFINITY;
    /** Applied samples, by {@link SampleType} ordinal. */
    private final long[] appliedByType = new long[SampleType.values().length];

    /**
     * @param settings         filter, gating, outage and history settings
     * @param profile          the vehicle's geometry
     * @param configuredOrigin ENU origin to use instead of the first fix, or null
     * @param output           receives poses and fix decisions
     */
    public VehicleTrack(Settings settings, VehicleProfile profile, Geodetic configuredOrigin, TrackOutput output) {
        this(settings, profile, configuredOrigin, output, Double.NEGATIVE_INFINITY,
                new NavigationFilter(settings.filter(), settings.gating(), settings.outage(), profile));
    }

    private VehicleTrack(Settings settings, VehicleProfile profile, Geodetic configuredOrigin, TrackOutput output,
                         double withholdGnssThroughT, NavigationFilter filter) {
        this.settings = settings;
        this.profile = profile;
        this.configuredOrigin = configuredOrigin;
        this.assembler = new PoseAssembler(settings.outage());
        this.output = java.util.Objects.requireNonNull(output, "output");
        this.withholdGnssThroughT = withholdGnssThroughT;
        this.filter = filter;
    }

    /**
     * A copy that goes on from this track's state but never sees a GNSS fix and produces no output: a
     * scoring branch through a simulated outage.
     */
    public VehicleTrack branchWithoutGnss() {
        return branch(Double.POSITIVE_INFINITY);
    }

    /**
     * A copy that goes on from this track's state without the fixes up to {@code withholdThroughT} and
     * with those after it, produces no output, and keeps its forward pass for smoothing with a node
     * wherever {@link #markSmoothingNode()} is called: a scoring branch that dead-reckons through an
     * outage and is then smoothed with the fixes after it (gap fill).
     *
     * @param withholdThroughT fixes stamped at or before this time are withheld (s, vehicle clock)
     */
    public VehicleTrack branchForGapFill(double withholdThroughT) {
        VehicleTrack b = branch(withholdThroughT);
        b.smoothing = b.filter.recordForSmoothing();
        return b;
    }

    private VehicleTrack branch(double withholdThroughT) {
        VehicleTrack b = new VehicleTrack(settings, profile, configuredOrigin, TrackOutput.NONE, withholdThroughT,
                filter.copy());
        b.epochT = epochT;
        b.frame = frame;
        b.lastHistoryTRel = lastHistoryTRel;
        System.arraycopy(appliedByType, 0, b.appliedByType, 0, appliedByType.length);
        return b;
    }

    /**
     * Keeps the forward pass from now on for the Rauch-Tung-Striebel smoother, with a node at every
     * history point (every pose given to the output, in the same order), so that the smoothed estimate
     * of each pose can be had once the drive is over: {@code fuse --smooth}.
     *
     * @return the log; {@link SmootherLog#finish()} it after the last sample
     */
    public SmootherLog recordForSmoothing() {
        smoothing = filter.recordForSmoothing();
        nodeAtHistoryPoints = true;
        return smoothing;
    }

    /**
     * Takes a smoothing node at the current time and state (see {@link #branchForGapFill}).
     *
     * @return the node's index in {@link #smootherLog()}
     * @throws IllegalStateException when this track does not record for smoothing
     */
    public int markSmoothingNode() {
        if (smoothing == null) {
            throw new IllegalStateException("this track does not record for smoothing");
        }
        return smoothing.mark();
    }

    /** The forward pass kept for smoothing, null when this track does not record. */
    public SmootherLog smootherLog() {
        return smoothing;
    }

    /** A copy that goes on from this track's state with GNSS and produces no output. */
    public VehicleTrack copyWithoutOutput() {
        VehicleTrack b = new VehicleTrack(settings, profile, configuredOrigin, TrackOutput.NONE, withholdGnssThroughT,
                filter.copy());
        b.epochT = epochT;
        b.frame = frame;
        b.lastHistoryTRel = lastHistoryTRel;
        System.arraycopy(appliedByType, 0, b.appliedByType, 0, appliedByType.length);
        return b;
    }

    /**
     * Applies one sample; samples must come in processing order ({@code ordering.SampleOrder}).
     *
     * @return the filter's decision on a fix, null for other samples and for withheld fixes (which a branch
     *         skips: not even its time reaches the filter)
     */
    public GnssOutcome.Kind apply(Sample sample) {
        if (Double.isNaN(epochT)) {
            epochT = Math.floor(sample.t());
        }
        GnssFix fix = sample instanceof GnssFix g ? g : null;
        if (fix != null && fix.t() <= withholdGnssThroughT) {
            return null;
        }
        if (frame == null && fix != null && fix.fix() != FixType.NONE) {
            frame = frameFor(fix, configuredOrigin);
        }
        double tRel = sample.t() - epochT;
        filter.predictTo(tRel);
        GnssOutcome.Kind outcome = null;
        appliedByType[sample.type().ordinal()]++;
        if (sample instanceof WheelSpeed w) {
            filter.setWheelSpeed(w.speedMps());
        } else if (sample instanceof YawRate y) {
            filter.setYawRate(y.yawRateRadPerS());
        } else if (fix != null) {
            outcome = correct(fix);
        } else if (sample instanceof ReferencePoint) {
            // Reference points are for scoring only: they reach the filter only as time.
            return null;
        } else {
            throw new IllegalArgumentException("type: unknown sample type " + sample.getClass().getSimpleName());
        }
        if (frame != null && (fix != null || tRel - lastHistoryTRel >= settings.history().intervalS())) {
            if (nodeAtHistoryPoints) {
                smoothing.mark();
            }
            if (output != TrackOutput.NONE) {
                output.pose(assembler.assemble(filter.snapshot(), epochT, frame));
            }
            lastHistoryTRel = tRel;
        }
        return outcome;
    }

    /**
     * The ENU frame a session takes at its first fix with a solution: the configured origin, else that
     * fix at its height (or 0 m when it has none).
     */
    public static LocalFrame frameFor(GnssFix firstFix, Geodetic configuredOrigin) {
        return new LocalFrame(configuredOrigin != null ? configuredOrigin
                : new Geodetic(firstFix.latDeg(), firstFix.lonDeg(), firstFix.hasAlt() ? firstFix.altM() : 0.0));
    }

    private GnssOutcome.Kind correct(GnssFix fix) {
        if (frame == null) {
            return filter.correct(fix, Double.NaN, Double.NaN, Double.NaN);
        }
        double alt = fix.hasAlt() ? fix.altM() : frame.origin().altM();
        Enu enu = frame.toEnu(fix.latDeg(), fix.lonDeg(), alt);
        GnssOutcome.Kind kind = filter.correct(fix, enu.eastM(), enu.northM(), fix.hasAlt() ? enu.upM() : Double.NaN);
        if (output == TrackOutput.NONE) {
            return kind;
        }
        output.fix(new FixRecord(fix.t(), fix.latDeg(), fix.lonDeg(), enu.eastM(), enu.northM(),
                filter.horizontalSigmaM(fix), kind, filter.lastNis()));
        return kind;
    }

    /**
     * Predicts the filter to a time without a sample (a branch evaluated between samples).
     *
     * @param tS time (s, vehicle clock), not before the last applied sample
     */
    public void predictTo(double tS) {
        filter.predictTo(tS - epochT);
    }

    /** Normalised innovation squared of the last fix's position (unitless), NaN when not computed. */
    public double lastFixNis() {
        return filter.lastNis();
    }

    /** ln det of the last fix's position innovation covariance (ln m^4), NaN when not computed. */
    public double lastFixLogDetS() {
        return filter.lastLogDetS();
    }

    /** A copy of the filter's state covariance, row-major, layout {@code filter.StateIndex}. */
    public double[] stateCovariance() {
        return filter.covariance();
    }

    /** True once the filter has a position and a yaw. */
    public boolean initialized() {
        return filter.initialized();
    }

    /** The filter's current estimate (times relative to {@link #epochT()}). */
    public FilterSnapshot snapshot() {
        return filter.snapshot();
    }

    /** A copy of the filter's running counts (see {@link FilterCounts}). */
    public FilterCounts filterCounts() {
        return filter.counts();
    }

    /** The pose of the current estimate; null before an epoch exists. */
    public Pose pose() {
        if (Double.isNaN(epochT) || Double.isNaN(filter.tRel())) {
            return null;
        }
        return assembler.assemble(filter.snapshot(), epochT, frame);
    }

    /** Time of the current estimate (s, vehicle clock), NaN before the first sample. */
    public double t() {
        return epochT + filter.tRel();
    }

    /** The session epoch (s, vehicle clock), NaN before the first sample. */
    public double epochT() {
        return epochT;
    }

    /** The ENU frame, null before the first fix with a solution. */
    public LocalFrame frame() {
        return frame;
    }

    /** The vehicle's geometry. */
    public VehicleProfile profile() {
        return profile;
    }

    /** Applied samples of a type (count). */
    long applied(SampleType type) {
        return appliedByType[type.ordinal()];
    }

    /** An immutable capture of the whole state, for returning to it. */
    public Checkpoint checkpoint() {
        return new Checkpoint(filter.saveState(), epochT, frame, lastHistoryTRel, appliedByType.clone());
    }

    /** Returns to a checkpoint and tells the output that what came after it is void. */
    public void restore(Checkpoint c) {
        restoreQuietly(c);
        double t = Double.isNaN(c.filter.tRel()) ? Double.NEGATIVE_INFINITY : c.epochT + c.filter.tRel();
        output.rewoundTo(t);
    }

    /** Returns to a checkpoint without telling the output (restoring a snapshot). */
    void restoreQuietly(Checkpoint c) {
        filter.restore(c.filter);
        epochT = c.epochT;
        frame = c.frame;
        lastHistoryTRel = c.lastHistoryTRel;
        System.arraycopy(c.appliedByType, 0, appliedByType, 0, appliedByType.length);
    }

    /** Everything a checkpoint must bring back. */
    public record Checkpoint(FilterState filter, double epochT, LocalFrame frame, double lastHistoryTRel,
                             long[] appliedByType) {
    }

    /** Writes a checkpoint, bit for bit. */
    static void writeCheckpoint(DataOutput out, Checkpoint c) throws IOException {
        NavigationFilter.writeState(c.filter, out);
        out.writeDouble(c.epochT);
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

    /** Reads what {@link #writeCheckpoint} wrote, for a track with this one's settings. */
    Checkpoint readCheckpoint(DataInput in) throws IOException {
        FilterState f = filter.readState(in);
        double epoch = in.readDouble();
        LocalFrame fr = null;
        if (in.readBoolean()) {
            try {
                fr = new LocalFrame(new Geodetic(in.readDouble(), in.readDouble(), in.readDouble()));
            } catch (IllegalArgumentException e) {
                throw new IOException("snapshot: bad frame origin: " + e.getMessage(), e);
            }
        }
        double lastHistory = in.readDouble();
        int n = in.readInt();
        if (n != appliedByType.length) {
            throw new IOException("snapshot: " + n + " sample counters, expected " + appliedByType.length);
        }
        long[] applied = new long[n];
        for (int i = 0; i < n; i++) {
            applied[i] = in.readLong();
        }
        return new Checkpoint(f, epoch, fr, lastHistory, applied);
    }
}
