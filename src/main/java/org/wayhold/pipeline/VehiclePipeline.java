package org.wayhold.pipeline;

import java.io.DataInput;
import java.io.DataOutput;
import java.io.IOException;
import java.util.List;
import org.wayhold.filter.FilterCounts;
import org.wayhold.filter.FilterSnapshot;
import org.wayhold.geo.Geodetic;
import org.wayhold.ordering.Admission;
import org.wayhold.ordering.ReorderBuffer;
import org.wayhold.ordering.Replayable;
import org.wayhold.pose.Pose;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.sample.SampleType;
import org.wayhold.settings.Settings;
import org.wayhold.settings.VehicleProfile;

/**
 * One vehicle's pipeline: batches of samples in any order, through time ordering (reorder window,
 * duplicates, the first-batch time rule; see {@link ReorderBuffer}) into a {@link VehicleTrack}
 * (epoch, frame, filter), out as poses and fix decisions. The live session, {@code score} and the
 * stream worker all run this one class, so a log gives the same poses whichever of them reads it.
 *
 * <p>Not thread-safe: one writer per vehicle.
 */
public final class VehiclePipeline {

    private final VehicleTrack track;
    private final ReorderBuffer<VehicleTrack.Checkpoint> ordering;

    /**
     * @param settings         ordering, filter, gating, outage and history settings
     * @param profile          the vehicle's geometry
     * @param configuredOrigin ENU origin to use instead of the first fix, or null
     * @param output           receives poses and fix decisions, and hears of rewinds
     */
    public VehiclePipeline(Settings settings, VehicleProfile profile, Geodetic configuredOrigin, TrackOutput output) {
        this.track = new VehicleTrack(settings, profile, configuredOrigin, output);
        this.ordering = new ReorderBuffer<>(new Replayable<>() {
            @Override
            public void apply(Sample sample) {
                track.apply(sample);
            }

            @Override
            public VehicleTrack.Checkpoint checkpoint() {
                return track.checkpoint();
            }

            @Override
            public void restore(VehicleTrack.Checkpoint checkpoint) {
                track.restore(checkpoint);
            }

            @Override
            public boolean alreadyApplied(Sample sample) {
                return sample instanceof GnssFix g && output.holds(g);
            }
        }, settings.ordering());
    }

    /**
     * Admits a batch of samples.
     *
     * @return one admission per sample, in the order given
     */
    public List<Admission> submit(List<? extends Sample> batch) {
        return ordering.submit(batch);
    }

    /** The pose of the newest estimate, null before the first sample. */
    public Pose latestPose() {
        return track.pose();
    }

    /** The filter's newest estimate (times relative to {@link #epochT()}). */
    public FilterSnapshot snapshot() {
        return track.snapshot();
    }

    /** A copy of the filter's running counts (see {@link FilterCounts}). */
    public FilterCounts filterCounts() {
        return track.filterCounts();
    }

    /** The session epoch (s, vehicle clock), NaN before the first sample. */
    public double epochT() {
        return track.epochT();
    }

    /** Time of the newest applied sample (s, vehicle clock), NaN before any. */
    public double newestT() {
        return ordering.newestT();
    }

    /** Applied samples of a type (count). */
    public long applied(SampleType type) {
        return track.applied(type);
    }

    public long duplicates() {
        return ordering.duplicates();
    }

    public long rejected() {
        return ordering.rejected();
    }

    public long rewinds() {
        return ordering.rewinds();
    }

    /**
     * Writes the whole state (time ordering with its checkpoints, filter, epoch, frame, counters), bit
     * for bit. A pipeline built with the same settings and given this to {@link #readState} continues
     * exactly as this one would.
     */
    public void writeState(DataOutput out) throws IOException {
        VehicleTrack.writeCheckpoint(out, track.checkpoint());
        ordering.writeState(out, VehicleTrack::writeCheckpoint);
    }

    /**
     * Restores a state written by {@link #writeState} into this pipeline, which must be new and built
     * with the same settings. The output hears nothing.
     *
     * @throws IOException when the data is not a pipeline state of this layout
     */
    public void readState(DataInput in) throws IOException {
        track.restoreQuietly(track.readCheckpoint(in));
        ordering.readState(in, track::readCheckpoint);
    }
}
