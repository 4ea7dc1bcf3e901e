package org.wayhold.scoring;

import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import org.wayhold.filter.FilterCounter;
import org.wayhold.filter.FilterSnapshot;
import org.wayhold.filter.RtsSmoother;
import org.wayhold.filter.SmoothedState;
import org.wayhold.filter.SmoothedTrack;
import org.wayhold.geo.Geodetic;
import org.wayhold.pipeline.TrackOutput;
import org.wayhold.pipeline.VehicleTrack;
import org.wayhold.pose.Ellipse95;
import org.wayhold.pose.NavState;
import org.wayhold.pose.PoseAssembler;
import org.wayhold.pose.Radius95;
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
 *
 * <p>Each window is scored twice, from the same branch. The forward estimate is the branch's own as it
 * dead-reckons through the window. The smoothed estimate (gap fill) is what the Rauch-Tung-Striebel
 * smoother makes of the window once the fixes after it are known: the branch keeps its forward pass
 * ({@link VehicleTrack#branchForGapFill}) with a node at every evaluation time, goes on after the
 * window's end with the fixes of the next {@code smoothTailS} seconds (the window's own fixes stay
 * withheld), and is then smoothed. Data before the window reach the smoother through the filtered
 * state the branch starts from, which holds all they say about the window.
 */
public final class OutageReplay {

    private final Settings settings;
    private final VehicleProfile profile;
    private final Geodetic origin;
    private final double evalStepS;
    private final double smoothTailS;
    private final PoseAssembler assembler;

    /** Seconds of fixes after a window the smoothed gap fill uses, unless told otherwise (s). */
    public static final double DEFAULT_SMOOTH_TAIL_S = 30.0;

    /**
     * @param settings  filter, gating and outage settings
     * @param profile   the vehicle's lever arm
     * @param origin    origin of the ENU frame the reference is given in, or null for the session's rule
     *                  (the first fix with a solution; see {@link VehicleTrack#frameFor})
     * @param evalStepS spacing of evaluation times inside a window (s)
     */
    public OutageReplay(Settings settings, VehicleProfile profile, Geodetic origin, double evalStepS) {
        this(settings, profile, origin, evalStepS, DEFAULT_SMOOTH_TAIL_S);
    }

    /**
     * @param settings    filter, gating and outage settings
     * @param profile     the vehicle's lever arm
     * @param origin      origin of the ENU frame the reference is given in, or null for the session's rule
     * @param evalStepS   spacing of evaluation times inside a window (s)
     * @param smoothTailS seconds after a window whose fixes the smoothed gap fill uses (s, >= 0)
     */
    public OutageReplay(Settings settings, VehicleProfile profile, Geodetic origin, double evalStepS,
                        double smoothTailS) {
        if (!(evalStepS > 0.0)) {
            throw new IllegalArgumentException("evalStepS: must be a positive number of s, was " + evalStepS);
        }
        if (!(smoothTailS >= 0.0) || Double.isInfinite(smoothTailS)) {
            throw new IllegalArgumentException("smooth_tail: must be a non-negative number of s, was " + smoothTailS);
        }
        this.settings = settings;
        this.profile = profile;
        this.origin = origin;
        this.evalStepS = evalStepS;
        this.smoothTailS = smoothTailS;
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
     * @param radius95M  95% horizontal radius (m, {@link Radius95})
     * @param smoothedEastM     smoothed east (m)
     * @param smoothedNorthM    smoothed north (m)
     * @param smoothedErrorM    horizontal error of the smoothed estimate (m)
     * @param smoothedRadius95M 95% horizontal radius of the smoothed estimate (m)
     */
    public record TracePoint(double t, double eastM, double northM, double refEastM, double refNorthM,
                             double errorM, double radius95M, double smoothedEastM, double smoothedNorthM,
                             double smoothedErrorM, double smoothedRadius95M) {
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
        List<Branch> tailing = new ArrayList<>();
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
                    Branch b = new Branch(w, from.branchForGapFill(w.endT()), reference, keepTraces);
                    b.track.predictTo(w.startT());
                    b.evaluateUpTo(w.startT());
                    active.add(b);
                } else {
                    unscored.add(new UnscoredWindow(w.startT(), w.lengthS(),
                            UnscoredWindow.Reason.REFERENCE_DOES_NOT_COVER));
                }
            }
            for (int i = tailing.size() - 1; i >= 0; i--) {
                Branch b = tailing.get(i);
                if (s.t() > b.window.endT() + smoothTailS) {
                    b.track.predictTo(b.window.endT() + smoothTailS);
                    finish(b, scores, traces, keepTraces);
                    tailing.remove(i);
                    continue;
                }
                b.track.apply(s);
            }
            for (int i = active.size() - 1; i >= 0; i--) {
                Branch b = active.get(i);
                if (s.t() > b.window.endT()) {
                    b.evaluateUpTo(b.window.endT());
                    b.track.predictTo(b.window.endT());
                    b.endForward();
                    active.remove(i);
                    if (s.t() > b.window.endT() + smoothTailS) {
                        finish(b, scores, traces, keepTraces);
                    } else {
                        tailing.add(b);
                        b.track.apply(s);
                    }
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
        // Gap fills whose tail the drive cut short are smoothed with the fixes there were.
        for (Branch b : tailing) {
            finish(b, scores, traces, keepTraces);
        }
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

    private static void finish(Branch b, List<WindowScore> scores, List<WindowTrace> traces, boolean keepTraces) {
        WindowScore score = b.smooth();
        scores.add(score);
        if (keepTraces) {
            traces.add(new WindowTrace(b.window, b.trace));
        }
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
        /** Per evaluation: its smoothing node, and the reference there (for the smoothed error). */
        final List<int[]> nodes = new ArrayList<>();
        final List<double[]> refs = new ArrayList<>();
        WindowScore forward;
        long fixesUsedAtEnd;

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
            nodes.add(new int[] {track.markSmoothingNode()});
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
            double radius = Radius95.of(a, b, c);
            double elapsed = t - window.startT();
            if (Double.isNaN(timeToLimit) && err > settings.outage().alertLimitM()) {
                timeToLimit = elapsed;
            }
            if (Double.isNaN(timeToUnreliable) && assembler.classify(s, radius) == NavState.UNRELIABLE) {
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
            refs.add(new double[] {t, refEast, refNorth});
            if (trace != null) {
                trace.add(new TracePoint(t, estEast, estNorth, refEast, refNorth, err, radius, Double.NaN, Double.NaN,
                        Double.NaN, Double.NaN));
            }
        }

        /** Ends the forward part at the window's end; the branch goes on with the fixes after it. */
        void endForward() {
            forward = finish();
            fixesUsedAtEnd = track.snapshot().counts().get(FilterCounter.FIXES_USED);
        }

        /** Smooths the branch and returns the window's score with both estimates. */
        WindowScore smooth() {
            long fixesAfter = track.snapshot().counts().get(FilterCounter.FIXES_USED) - fixesUsedAtEnd;
            track.smootherLog().finish();
            SmoothedTrack st = RtsSmoother.smooth(track.smootherLog());
            double maxErr = 0.0;
            double lastErr = Double.NaN;
            int inside = 0;
            int n = 0;
            double neesSum = 0.0;
            for (int i = 0; i < nodes.size(); i++) {
                int node = nodes.get(i)[0];
                if (!st.hasState(node)) {
                    continue;
                }
                SmoothedState sm = st.state(node);
                double estEast = sm.eastM();
                double estNorth = sm.northM();
                if (reference.atAntenna()) {
                    double c = Math.cos(sm.yawRad());
                    double sn = Math.sin(sm.yawRad());
                    estEast += profile.leverArmForwardM() * c - profile.leverArmLeftM() * sn;
                    estNorth += profile.leverArmForwardM() * sn + profile.leverArmLeftM() * c;
                }
                double[] ref = refs.get(i);
                double de = estEast - ref[1];
                double dn = estNorth - ref[2];
                double err = Math.hypot(de, dn);
                double a = sm.covEastEastM2();
                double b = sm.covEastNorthM2();
                double c = sm.covNorthNorthM2();
                double nees = (c * de * de - 2.0 * b * de * dn + a * dn * dn) / (a * c - b * b);
                neesSum += nees;
                inside += nees <= Ellipse95.SCALE_2DOF_95 ? 1 : 0;
                n++;
                maxErr = Math.max(maxErr, err);
                lastErr = err;
                if (trace != null) {
                    TracePoint p = trace.get(i);
                    trace.set(i, new TracePoint(p.t(), p.eastM(), p.northM(), p.refEastM(), p.refNorthM(), p.errorM(),
                            p.radius95M(), estEast, estNorth, err, Radius95.of(a, b, c)));
                }
            }
            return forward.withSmoothed(new WindowScore.Smoothed(lastErr, n == 0 ? Double.NaN : maxErr,
                    n == 0 ? Double.NaN : (double) inside / n, n == 0 ? Double.NaN : neesSum / n, (int) fixesAfter));
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
