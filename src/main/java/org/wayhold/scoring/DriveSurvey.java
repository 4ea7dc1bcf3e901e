package org.wayhold.scoring;

import java.util.ArrayList;
import java.util.List;
import org.wayhold.filter.FilterSnapshot;
import org.wayhold.geo.Geodetic;
import org.wayhold.pipeline.TrackOutput;
import org.wayhold.pipeline.VehicleTrack;
import org.wayhold.pose.NavState;
import org.wayhold.pose.PoseAssembler;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.settings.Settings;
import org.wayhold.settings.VehicleProfile;

/**
 * The first pass of a scoring: one plain replay of a log through a {@link VehicleTrack}, as the live
 * session would apply it, that learns where the filter was
 * {@code aided} and keeps its state at the times a window may start, so the windows can be chosen
 * afterwards and scored from those states with {@link OutageReplay#runFrom} without a second main pass.
 *
 * <p>Window starts lie on a grid of {@code gridStepS} from {@code gridStartT}. The state at a grid time
 * c is the main filter just before the first sample at or after c, predicted to c: exactly what
 * {@link OutageReplay#run} branches from. It is kept only where the filter has been aided for at least
 * {@code minAidedS}; states at the extra times (the starts of real gaps) are kept whatever the state.
 *
 * <p>The survey also finds the log's odometry gaps ({@link OdometryGaps}, under this configuration's
 * reading rates), where a simulated outage would measure missing readings rather than dead reckoning.
 *
 * <p>The navigation state is classified as the service does ({@link PoseAssembler}) just before and
 * just after each fix and at each grid time, so a run of {@code aided} is broken by any gap in the
 * fixes, however short the grid misses it by.
 */
public final class DriveSurvey {

    private final double gridStartT;
    private final double gridStepS;
    private final VehicleTrack[] gridStates;
    private final double[] extraTimes;
    private final VehicleTrack[] extraStates;
    private final List<TimeSpan> aidedSpans;
    private final List<OdometryGap> odometryGaps;

    private DriveSurvey(double gridStartT, double gridStepS, VehicleTrack[] gridStates, double[] extraTimes,
                        VehicleTrack[] extraStates, List<TimeSpan> aidedSpans, List<OdometryGap> odometryGaps) {
        this.gridStartT = gridStartT;
        this.gridStepS = gridStepS;
        this.gridStates = gridStates;
        this.extraTimes = extraTimes;
        this.extraStates = extraStates;
        this.aidedSpans = List.copyOf(aidedSpans);
        this.odometryGaps = List.copyOf(odometryGaps);
    }

    /**
     * Replays the samples once.
     *
     * @param samples    the log in processing order, as {@code pipeline.OrderedLog} gives it
     * @param settings   the configuration
     * @param profile    the vehicle's lever arm
     * @param origin     origin of the ENU frame, or null for the session's rule (the first fix with a
     *                   solution; see {@link VehicleTrack#frameFor})
     * @param gridStartT first grid time (s, vehicle clock)
     * @param gridStepS  grid spacing (s, > 0)
     * @param minAidedS  aided time needed before a grid time for its state to be kept (s, >= 0)
     * @param extraTimes further times whose states are kept (s, ascending)
     * @param output     receives the main track's poses and fix decisions
     * @param progress   hears about replayed samples
     */
    public static DriveSurvey run(List<? extends Sample> samples, Settings settings, VehicleProfile profile,
                                  Geodetic origin, double gridStartT, double gridStepS, double minAidedS, double[] extraTimes,
                                  TrackOutput output, ProgressListener progress) {
        if (!(gridStepS > 0.0)) {
            throw new IllegalArgumentException("gridStepS: must be a positive number of s, was " + gridStepS);
        }
        if (!(minAidedS >= 0.0)) {
            throw new IllegalArgumentException("min_aided: must be a non-negative number of s, was " + minAidedS);
        }
        int gridCount = samples.isEmpty() ? 0
                : (int) Math.floor((samples.get(samples.size() - 1).t() - gridStartT) / gridStepS) + 1;
        VehicleTrack[] grid = new VehicleTrack[Math.max(gridCount, 0)];
        VehicleTrack[] extra = new VehicleTrack[extraTimes.length];
        VehicleTrack main = new VehicleTrack(settings, profile, origin, output);
        AidedTracker aided = new AidedTracker(new PoseAssembler(settings.outage()));
        int k = 0;
        int x = 0;
        int unreported = 0;
        for (Sample s : samples) {
            while (k < grid.length && gridStartT + k * gridStepS <= s.t()) {
                double c = gridStartT + k * gridStepS;
                if (main.initialized()) {
                    VehicleTrack state = main.copyWithoutOutput();
                    state.predictTo(c);
                    aided.observe(c, state.snapshot());
                    if (aided.since(c) >= minAidedS) {
                        grid[k] = state;
                    }
                }
                k++;
            }
            while (x < extra.length && extraTimes[x] <= s.t()) {
                extra[x++] = main.copyWithoutOutput();
            }
            if (s instanceof GnssFix && main.initialized()) {
                // Predicting first changes nothing (feed predicts to the same time) but lets a gap
                // show before the fix ends it.
                main.predictTo(s.t());
                aided.observe(s.t(), main.snapshot());
            }
            main.apply(s);
            if (s instanceof GnssFix && main.initialized()) {
                aided.observe(s.t(), main.snapshot());
            }
            if (++unreported == ProgressListener.REPORT_EVERY) {
                progress.samplesDone(unreported);
                unreported = 0;
            }
        }
        progress.samplesDone(unreported);
        aided.close();
        return new DriveSurvey(gridStartT, gridStepS, grid, extraTimes.clone(), extra, aided.spans,
                OdometryGaps.find(samples, settings.filter()));
    }

    /** Where a wheel-speed or yaw-rate stream was silent ({@link OdometryGaps}), by start time. */
    public List<OdometryGap> odometryGaps() {
        return odometryGaps;
    }

    /** Runs of the {@code aided} state as observed (s, vehicle clock), in time order. */
    public List<TimeSpan> aidedSpans() {
        return aidedSpans;
    }

    /** Number of grid times. */
    public int gridCount() {
        return gridStates.length;
    }

    /** Grid time {@code k} (s, vehicle clock). */
    public double gridTime(int k) {
        return gridStartT + k * gridStepS;
    }

    /** True when a window may start at grid time {@code k}: the filter had been aided long enough. */
    public boolean startAllowed(int k) {
        return k >= 0 && k < gridStates.length && gridStates[k] != null;
    }

    /** The state at grid time {@code k}; only where {@link #startAllowed} (not to be modified). */
    public VehicleTrack gridState(int k) {
        if (!startAllowed(k)) {
            throw new IllegalArgumentException("k: no window may start at grid time " + k);
        }
        return gridStates[k];
    }

    /** The state at extra time {@code i}, null when the log ended before it (not to be modified). */
    public VehicleTrack extraState(int i) {
        return extraStates[i];
    }

    /** The extra times (s, vehicle clock). */
    public double[] extraTimes() {
        return extraTimes.clone();
    }

    /** Follows the navigation state through time and records its aided runs. */
    private static final class AidedTracker {
        final PoseAssembler assembler;
        final List<TimeSpan> spans = new ArrayList<>();
        double since = Double.NaN;
        double lastAidedT = Double.NaN;

        AidedTracker(PoseAssembler assembler) {
            this.assembler = assembler;
        }

        void observe(double t, FilterSnapshot s) {
            NavState state = assembler.classify(s);
            if (state == NavState.AIDED) {
                if (Double.isNaN(since)) {
                    since = t;
                }
                lastAidedT = t;
            } else {
                close();
            }
        }

        /** Aided time up to {@code t} (s), -infinity when not aided. */
        double since(double t) {
            return Double.isNaN(since) ? Double.NEGATIVE_INFINITY : t - since;
        }

        void close() {
            if (!Double.isNaN(since)) {
                spans.add(new TimeSpan(since, lastAidedT));
            }
            since = Double.NaN;
        }
    }
}
