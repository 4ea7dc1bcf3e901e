package org.wayhold.scoring;

import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import org.wayhold.filter.FilterSnapshot;
import org.wayhold.geo.Geodetic;
import org.wayhold.pipeline.TrackOutput;
import org.wayhold.pipeline.VehicleTrack;
import org.wayhold.pose.Ellipse95;
import org.wayhold.pose.NavState;
import org.wayhold.pose.PoseAssembler;
import org.wayhold.sample.Sample;
import org.wayhold.settings.Settings;
import org.wayhold.settings.VehicleProfile;

/**
 * Scores many outage windows in one replay of a drive.
 *
 * <p>The main {@link VehicleTrack} sees every sample. When a window opens, a copy of it branches off
 * ({@link VehicleTrack#branchWithoutGnss()}) and from then on sees every sample but the GNSS fixes;
 * when the window closes the branch is scored and dropped. So each window starts from exactly the
 * state the live filter had, and one replay serves any number of windows.
 *
 * <p>{@link #runFrom} does the same from start states saved beforehand (see {@link DriveSurvey}), so the
 * windows can be chosen after a first pass has shown where the filter was aided; it gives exactly the
 * scores {@link #run} gives for the same windows, without replaying the main filter again.
 *
 * <p>When the reference is not {@linkplain ReferenceTrack#continuous() continuous} (the withheld fixes)
 * a window is evaluated at the reference's own times inside it instead of on the regular step. When its
 * points are {@linkplain ReferenceTrack#atAntenna() antenna positions}, the branch's antenna position is
 * compared with them: its reference point moved by the configured lever arm at its estimated yaw.
 */
public final class OutageReplay {

    private final Settings settings;
    private final VehicleProfile profile;
    private final Geodetic origin;
    private final double evalStepS;
    private final PoseAssembler assembler;

    /**
     * @param settings  filter, gating and outage settings
     * @param profile   the vehicle's lever arm
     * @param origin    origin of the ENU frame the reference is given in, or null for the session's rule
     *                  (the first fix with a solution; see {@link VehicleTrack#frameFor})
     * @param evalStepS spacing of evaluation times inside a window (s)
     */
    public OutageReplay(Settings settings, VehicleProfile profile, Geodetic origin, double evalStepS) {
        if (!(evalStepS > 0.0)) {
            throw new IllegalArgumentException("evalStepS: must be a positive number of s, was " + evalStepS);
        }
        this.settings = settings;
        this.profile = profile;
        this.origin = origin;
        this.evalStepS = evalStepS;
        this.assembler = new PoseAssembler(settings.outage());
    }

    /**
     * Per-window scores, the traces of the branches when asked for, and the windows given that could not
     * be scored, with the reason (the filter not started or the reference not covering the window,
     * {@link UnscoredWindow.Reason#REFERENCE_DOES_NOT_COVER}; the log ending first,
     * {@link UnscoredWindow.Reason#LOG_ENDS_INSIDE}).
     */
    public record Result(List<WindowScore> scores, List<WindowTrace> traces, List<UnscoredWindow> unscored) {
    }

    /**
     * One evaluation point of a branch, for plots.
     *
     * @param t          time (s, vehicle clock)
     * @param eastM      estimated east (m)
     * @param northM     estimated north (m)
     * @param refEastM   reference east (m)
     * @param refNorthM  reference north (m)
     * @param errorM     horizontal error (m)
     * @param radius95M  95% radius (semi-major axis of the ellipse, m)
     */
    public record TracePoint(double t, double eastM, double northM, double refEastM, double refNorthM,
                             double errorM, double radius95M) {
    }

    /** The evaluation points of one window. */
    public record WindowTrace(OutageWindow window, List<TracePoint> points) {
    }

    /**
     * A window with the state to start it from.
     *
     * @param window the window
     * @param state  the main track as it was just before the first sample at or after the window's
     *               start (not modified)
     */
    public record Start(OutageWindow window, VehicleTrack state) {
    }

    /**
     * Replays the samples and scores the windows.
     *
     * @param samples    the drive, in processing order
     * @param windows    windows to score; those the reference does not cover are skipped
     * @param reference  where the vehicle really was
     * @param keepTraces true to return the evaluation points of each window
     */
    public Result run(List<? extends Sample> samples, List<OutageWindow> windows, ReferenceTrack reference,
                      boolean keepTraces) {
        List<Start> starts = new ArrayList<>();
        for (OutageWindow w : windows) {
            starts.add(new Start(w, null));
        }
        return replay(samples, starts, true, reference, keepTraces, ProgressListener.NONE);
    }

    /**
     * Scores windows from saved start states; only the branches are replayed.
     *
     * @param samples    the drive, in processing order (the same the start states came from)
     * @param starts     windows with their start states; those the reference does not cover are skipped
     * @param reference  where the vehicle really was
     * @param keepTraces true to return the evaluation points of each window
     * @param progress   hears about replayed samples
     */
    public Result runFrom(List<? extends Sample> samples, List<Start> starts, ReferenceTrack reference,
                          boolean keepTraces, ProgressListener progress) {
        for (Start st : starts) {
            if (st.state() == null) {
                throw new IllegalArgumentException("state: the window at " + st.window().startT()
                        + " s has no start state");
            }
        }
        return replay(samples, starts, false, reference, keepTraces, progress);
    }

    private Result replay(List<? extends Sample> samples, List<Start> starts, boolean withMain,
                          ReferenceTrack reference, boolean keepTraces, ProgressListener progress) {
        List<WindowScore> scores = new ArrayList<>();
        List<WindowTrace> traces = new ArrayList<>();
        List<UnscoredWindow> unscored = new ArrayList<>();
        if (samples.isEmpty()) {
            for (Start st : starts) {
                unscored.add(new UnscoredWindow(st.window().startT(), st.window().lengthS(),
                        UnscoredWindow.Reason.LOG_ENDS_INSIDE));
            }
            return new Result(scores, traces, unscored);
        }
        List<Start> pending = new ArrayList<>(starts);
        pending.sort(Comparator.comparingDouble(st -> st.window().startT()));
        VehicleTrack main = withMain ? new VehicleTrack(settings, profile, origin, TrackOutput.NONE) : null;
        List<Branch> active = new ArrayList<>();
        int next = 0;
        int unreported = 0;
        for (Sample s : samples) {
            while (next < pending.size() && pending.get(next).window().startT() <= s.t()) {
                Start st = pending.get(next++);
                OutageWindow w = st.window();
                VehicleTrack from = withMain ? main : st.state();
                if (!from.initialized()) {
                    unscored.add(new UnscoredWindow(w.startT(), w.lengthS(),
                            UnscoredWindow.Reason.NOT_AIDED_LONG_ENOUGH));
                } else if (reference.covers(w.startT()) && reference.covers(w.endT())) {
                    Branch b = new Branch(w, from.branchWithoutGnss(), reference, keepTraces);
                    b.track.predictTo(w.startT());
                    b.evaluateUpTo(w.startT());
                    active.add(b);
                } else {
                    unscored.add(new UnscoredWindow(w.startT(), w.lengthS(),
                            UnscoredWindow.Reason.REFERENCE_DOES_NOT_COVER));
                }
            }
            for (int i = active.size() - 1; i >= 0; i--) {
                Branch b = active.get(i);
                if (s.t() > b.window.endT()) {
                    b.evaluateUpTo(b.window.endT());
                    b.track.predictTo(b.window.endT());
                    scores.add(b.finish());
                    if (keepTraces) {
                        traces.add(new WindowTrace(b.window, b.trace));
                    }
                    active.remove(i);
                    continue;
                }
                b.evaluateUpTo(s.t());
                b.track.apply(s);
            }
            if (withMain) {
                main.apply(s);
            }
            if (++unreported == ProgressListener.REPORT_EVERY) {
                progress.samplesDone(unreported);
                unreported = 0;
            }
        }
        progress.samplesDone(unreported);
        // Windows still open when the drive ends, or not begun, are not scored: their length was not
        // reached.
        for (Branch b : active) {
            unscored.add(new UnscoredWindow(b.window.startT(), b.window.lengthS(),
                    UnscoredWindow.Reason.LOG_ENDS_INSIDE));
        }
        for (int i = next; i < pending.size(); i++) {
            OutageWindow w = pending.get(i).window();
            unscored.add(new UnscoredWindow(w.startT(), w.lengthS(), UnscoredWindow.Reason.LOG_ENDS_INSIDE));
        }
        unscored.sort(Comparator.comparingDouble(UnscoredWindow::startT).thenComparingDouble(UnscoredWindow::lengthS));
        scores.sort(Comparator.comparingDouble((WindowScore w) -> w.window().startT())
                .thenComparingDouble(w -> w.window().lengthS()));
        traces.sort(Comparator.comparingDouble((WindowTrace w) -> w.window().startT())
                .thenComparingDouble(w -> w.window().lengthS()));
        return new Result(scores, traces, unscored);
    }

    /** A filter running without GNSS through one window, with its running metrics. */
    private final class Branch {
        final OutageWindow window;
        final VehicleTrack track;
        final ReferenceTrack reference;
        final List<TracePoint> trace;
        /** Evaluation times when the reference is known only at its points, else null (regular step). */
        final double[] times;
        double nextEvalT;
        int count;
        int inside;
        double neesSum;
        double maxError;
        double distance;
        double lastRefEast = Double.NaN;
        double lastRefNorth = Double.NaN;
        double timeToLimit = Double.NaN;
        double timeToUnreliable = Double.NaN;
        double lastErrEast;
        double lastErrNorth;
        double lastError;
        double lastNees;
        double lastT = Double.NaN;
        double lastEstEast = Double.NaN;
        double lastEstNorth = Double.NaN;
        double lastRefEastFinal = Double.NaN;
        double lastRefNorthFinal = Double.NaN;

        Branch(OutageWindow window, VehicleTrack track, ReferenceTrack reference, boolean keepTrace) {
            this.window = window;
            this.track = track;
            this.reference = reference;
            this.trace = keepTrace ? new ArrayList<>() : null;
            this.nextEvalT = window.startT();
            this.times = reference.continuous() ? null : reference.timesWithin(window.startT(), window.endT());
        }

        /** Evaluates at every evaluation time up to and including {@code tS}. */
        void evaluateUpTo(double tS) {
            double end = Math.min(tS, window.endT());
            if (times != null) {
                while (count < times.length && times[count] <= end) {
                    evaluateAt(times[count]);
                    count++;
                }
                return;
            }
            while (nextEvalT <= end + 1e-9) {
                evaluateAt(Math.min(nextEvalT, window.endT()));
                count++;
                // Index-based times avoid accumulating rounding over long windows.
                nextEvalT = window.startT() + count * evalStepS;
            }
        }

        private void evaluateAt(double t) {
            track.predictTo(t);
            FilterSnapshot s = track.snapshot();
            double refEast = reference.eastAt(t);
            double refNorth = reference.northAt(t);
            if (!Double.isNaN(lastRefEast)) {
                distance += Math.hypot(refEast - lastRefEast, refNorth - lastRefNorth);
            }
            lastRefEast = refEast;
            lastRefNorth = refNorth;
            double estEast = s.eastM();
            double estNorth = s.northM();
            if (reference.atAntenna()) {
                double c = Math.cos(s.yawRad());
                double sn = Math.sin(s.yawRad());
                estEast += profile.leverArmForwardM() * c - profile.leverArmLeftM() * sn;
                estNorth += profile.leverArmForwardM() * sn + profile.leverArmLeftM() * c;
            }
            double de = estEast - refEast;
            double dn = estNorth - refNorth;
            double err = Math.hypot(de, dn);
            double a = s.covEastEastM2();
            double b = s.covEastNorthM2();
            double c = s.covNorthNorthM2();
            double det = a * c - b * b;
            // NEES = e' P^-1 e with the 2x2 inverse in closed form.
            double nees = (c * de * de - 2.0 * b * de * dn + a * dn * dn) / det;
            neesSum += nees;
            lastNees = nees;
            if (nees <= Ellipse95.SCALE_2DOF_95) {
                inside++;
            }
            maxError = Math.max(maxError, err);
            Ellipse95 ellipse = Ellipse95.of(a, b, c);
            double elapsed = t - window.startT();
            if (Double.isNaN(timeToLimit) && err > settings.outage().alertLimitM()) {
                timeToLimit = elapsed;
            }
            if (Double.isNaN(timeToUnreliable) && assembler.classify(s, ellipse) == NavState.UNRELIABLE) {
                timeToUnreliable = elapsed;
            }
            lastErrEast = de;
            lastErrNorth = dn;
            lastError = err;
            lastT = t;
            lastEstEast = estEast;
            lastEstNorth = estNorth;
            lastRefEastFinal = refEast;
            lastRefNorthFinal = refNorth;
            if (trace != null) {
                trace.add(new TracePoint(t, estEast, estNorth, refEast, refNorth, err, ellipse.semiMajorM()));
            }
        }

        WindowScore finish() {
            FilterSnapshot s = track.snapshot();
            double t = window.endT();
            // Split the error along the reference's direction where that error was measured.
            double yaw = times == null || Double.isNaN(lastT) ? reference.yawAt(t) : reference.yawAt(lastT);
            double along = Double.NaN;
            double cross = Double.NaN;
            if (!Double.isNaN(yaw)) {
                along = lastErrEast * Math.cos(yaw) + lastErrNorth * Math.sin(yaw);
                cross = -lastErrEast * Math.sin(yaw) + lastErrNorth * Math.cos(yaw);
            }
            // Late when the error passed the limit before the state said unreliable (or it never did).
            boolean late = !Double.isNaN(timeToLimit)
                    && (Double.isNaN(timeToUnreliable) || timeToUnreliable > timeToLimit);
            double pct = distance > 0.0 ? 100.0 * lastError / distance : Double.NaN;
            return new WindowScore(window, distance, lastError, maxError, pct, count == 0 ? Double.NaN
                    : (double) inside / count, count == 0 ? Double.NaN : neesSum / count, lastNees, timeToLimit,
                    timeToUnreliable, late, along, cross, s.eastM(), s.northM(), count, lastT, lastEstEast, lastEstNorth,
                    lastRefEastFinal, lastRefNorthFinal);
        }
    }
}
