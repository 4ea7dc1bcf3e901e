package org.wayhold.scoring;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Comparator;
import java.util.HashSet;
import java.util.List;
import java.util.Set;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.CompletionException;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Semaphore;
import org.wayhold.geo.LocalFrame;
import org.wayhold.pipeline.OrderedLog;
import org.wayhold.pipeline.TrackOutput;
import org.wayhold.pipeline.VehicleTrack;
import org.wayhold.sample.FixType;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.ReferencePoint;
import org.wayhold.sample.Sample;
import org.wayhold.settings.Settings;

/**
 * Scores several logs under one or more configurations, on all cores.
 *
 * <p>Per log: load it; survey it once per configuration ({@link DriveSurvey}, in parallel); choose the
 * windows once for all configurations ({@link WindowPlan}, a start must be allowed in every one, so the
 * configurations are compared on the same windows); score each configuration from its saved states
 * ({@link OutageReplay#runFrom}, in parallel). With a reference trajectory the log's real gaps are
 * scored too, each from just after its last fix to its first fix after. At most {@code threads + 1}
 * logs are held in memory at once.
 *
 * <p>Odometry gaps ({@link OdometryGaps}: a wheel-speed or yaw-rate stream silent for longer than the
 * filter allows, as found by each configuration's survey) keep simulated windows off them, like real
 * gaps in the fixes: dead reckoning over missing readings measures the missing readings. A real gap in
 * the fixes that contains one is still scored, because it is what the vehicle went through, but its
 * row says for how many of its seconds the odometry was silent (reports: {@code odometry_gap_s}); it
 * never enters the summaries, which hold simulated windows only.
 *
 * <p>The result does not depend on the number of threads or on timing: each task is deterministic and
 * the results are put in the order of the logs and configurations given.
 */
public final class ScoringRun {

    /** Spacing of the times a window may start at (s): one saved filter state per second of log. */
    public static final double GRID_STEP_S = 1.0;
    /**
     * Reference points farther apart than this are not interpolated across (s). A reference trajectory
     * normally comes at 10 Hz or more; a longer hole is a gap in the reference, not a straight road.
     */
    public static final double REFERENCE_MAX_GAP_S = 1.0;

    private ScoringRun() {
    }

    /** What the error is measured against. */
    public enum ReferenceKind {
        /** The log's {@code reference} lines, interpolated to each evaluation time. */
        REFERENCE("reference", "reference_point"),
        /**
         * The withheld GNSS fixes, at their own times, compared with the filter's antenna position (the
         * reference point moved by the configured lever arm).
         */
        WITHHELD_FIXES("withheld_fixes", "antenna");

        private final String wireName;
        private final String estimatePoint;

        ReferenceKind(String wireName, String estimatePoint) {
            this.wireName = wireName;
            this.estimatePoint = estimatePoint;
        }

        public String wireName() {
            return wireName;
        }

        /** Which point of the vehicle the estimate is taken at: {@code reference_point} or {@code antenna}. */
        public String estimatePoint() {
            return estimatePoint;
        }
    }

    /**
     * How to score.
     *
     * @param schedule   the windows
     * @param minAidedS  aided time before a window may start (s, >= 0)
     * @param evalStepS  evaluation step inside windows against a trajectory (s, > 0)
     * @param vehicle    the vehicle profile to use (name in the configuration)
     * @param keepTraces keep the evaluation points of every window (for plots)
     * @param threads    worker threads (>= 1)
     * @param smoothTailS seconds after each window whose fixes the smoothed gap fill uses (s, >= 0)
     */
    public record Options(WindowPlan.Schedule schedule, double minAidedS, double evalStepS, String vehicle,
                          boolean keepTraces, int threads, double smoothTailS) {

        /** With the default smoothing tail ({@link OutageReplay#DEFAULT_SMOOTH_TAIL_S}). */
        public Options(WindowPlan.Schedule schedule, double minAidedS, double evalStepS, String vehicle,
                       boolean keepTraces, int threads) {
            this(schedule, minAidedS, evalStepS, vehicle, keepTraces, threads, OutageReplay.DEFAULT_SMOOTH_TAIL_S);
        }

        public Options {
            if (!(smoothTailS >= 0.0) || Double.isInfinite(smoothTailS)) {
                throw new IllegalArgumentException("smooth_tail: must be a non-negative number of s, was " + smoothTailS);
            }
            if (!(minAidedS >= 0.0) || Double.isInfinite(minAidedS)) {
                throw new IllegalArgumentException("min_aided: must be a non-negative number of s, was " + minAidedS);
            }
            if (!(evalStepS > 0.0) || Double.isInfinite(evalStepS)) {
                throw new IllegalArgumentException("eval_step: must be a positive number of s, was " + evalStepS);
            }
            WindowPlan.requireWholeSteps("skip", schedule.skipS(), GRID_STEP_S);
            WindowPlan.requireWholeSteps("every", schedule.everyS(), GRID_STEP_S);
            if (threads < 1) {
                throw new IllegalArgumentException("threads: must be at least 1, was " + threads);
            }
        }
    }

    /**
     * A configuration under a name.
     *
     * @param name     short name shown in reports
     * @param source   where it came from (a file name, or "built-in defaults")
     * @param settings the settings
     */
    public record NamedSettings(String name, String source, Settings settings) {
    }

    /**
     * A log as read.
     *
     * @param name    name shown in reports
     * @param samples its samples in the order a rig would have posted them (file order); put in processing
     *                order here by the service's time ordering ({@link OrderedLog})
     * @param notes   what the reader wants said about the input (rejected lines and the like)
     * @param inputs  the files it was read from, with their rejected-line counts (empty when it did not
     *                come from files)
     */
    public record LoadedLog(String name, List<Sample> samples, List<String> notes, List<InputFile> inputs) {

        public LoadedLog {
            inputs = List.copyOf(inputs);
        }

        /** A log that did not come from files (tests, simulations). */
        public LoadedLog(String name, List<Sample> samples, List<String> notes) {
            this(name, samples, notes, List.of());
        }
    }

    /** Reads one log when its turn comes, so that not every log is in memory at once. */
    public interface LogSource {
        /** The name shown in progress and errors. */
        String name();

        /** Reads the log. */
        LoadedLog load() throws IOException;
    }

    /** Hears how far the run has come; called from worker threads. */
    public interface Listener {
        Listener NONE = new Listener() {
        };

        /** A log was read; it will be replayed {@code passes} times over {@code samples} samples. */
        default void logLoaded(String log, int samples, int passes) {
        }

        /** More samples were replayed (count). */
        default void samplesDone(int samples) {
        }

        /** Windows of a log and configuration were scored (count). */
        default void windowsScored(int windows) {
        }

        /** Everything of a log is done. */
        default void logDone(String log) {
        }
    }

    /**
     * One configuration's scores on one log.
     *
     * @param config        the configuration's name
     * @param windows       scores of the simulated windows, by start then length
     * @param realGaps      scores of the real gaps (empty without a reference trajectory)
     * @param traces        evaluation points of the simulated windows (empty unless kept)
     * @param realGapTraces evaluation points of the real gaps (empty unless kept)
     * @param aidedSpans    where this configuration's filter was aided
     * @param unscored      planned windows this configuration's replay could not score, with the reason
     */
    public record ConfigScores(String config, List<WindowScore> windows, List<WindowScore> realGaps,
                               List<OutageReplay.WindowTrace> traces,
                               List<OutageReplay.WindowTrace> realGapTraces, List<TimeSpan> aidedSpans,
                               List<UnscoredWindow> unscored) {
    }

    /**
     * Everything scored on one log.
     *
     * @param name      the log's name
     * @param index     its position among the logs
     * @param samples   its sample count
     * @param startT    first sample (s)
     * @param endT      last sample (s)
     * @param frame     its ENU frame (origin at its first fix)
     * @param reference what the error was measured against
     * @param track     the reference as interpolated
     * @param gaps      its real GNSS gaps
     * @param odometryGaps where its wheel-speed or yaw-rate stream was silent, in any configuration's
     *                  survey, by start time
     * @param plan      the simulated windows
     * @param configs   scores per configuration, in the order given
     * @param notes     the reader's notes
     * @param inputs    the files the log was read from
     * @param timeDecimals decimals of the log's own times (the most any sample time has, at most 9): the
     *                  precision a report gives its times in
     */
    public record LogScores(String name, int index, int samples, double startT, double endT, LocalFrame frame,
                            ReferenceKind reference, InterpolatedTrack track, List<TimeSpan> gaps,
                            List<OdometryGap> odometryGaps, WindowPlan plan, List<ConfigScores> configs,
                            List<String> notes, List<InputFile> inputs, int timeDecimals) {

        public LogScores {
            odometryGaps = List.copyOf(odometryGaps);
        }

        /** Seconds of the window in which the odometry was silent (an odometry gap covered it). */
        public double odometryGapS(OutageWindow w) {
            return OdometryGaps.silentS(odometryGaps, w.startT(), w.endT());
        }

        /**
         * Every planned window that was not scored, with the reason: those the plan left out, then those
         * the scoring of the first configuration could not score (the windows and the reference are the
         * same for every configuration), by start then length.
         */
        public List<UnscoredWindow> unscored() {
            List<UnscoredWindow> all = new ArrayList<>(plan.unscored());
            if (!configs.isEmpty()) {
                all.addAll(configs.get(0).unscored());
            }
            all.sort(Comparator.comparing((UnscoredWindow u) -> Double.isNaN(u.startT()))
                    .thenComparingDouble(UnscoredWindow::startT).thenComparingDouble(UnscoredWindow::lengthS));
            return all;
        }
    }

    /**
     * Scores the logs.
     *
     * @throws IllegalArgumentException naming the log when one cannot be scored (no fix, say)
     * @throws UncheckedIOException     naming the log when one cannot be read
     */
    public static List<LogScores> run(List<? extends LogSource> logs, List<NamedSettings> configs, Options options,
                                      Listener listener) {
        if (configs.isEmpty()) {
            throw new IllegalArgumentException("config: at least one configuration is needed");
        }
        ExecutorService pool = Executors.newFixedThreadPool(options.threads(), r -> {
            Thread t = new Thread(r, "wayhold-score");
            t.setDaemon(true);
            return t;
        });
        Semaphore inFlight = new Semaphore(options.threads() + 1);
        List<CompletableFuture<LogScores>> futures = new ArrayList<>();
        try {
            for (int i = 0; i < logs.size(); i++) {
                LogSource src = logs.get(i);
                int index = i;
                inFlight.acquireUninterruptibly();
                CompletableFuture<LogScores> f = CompletableFuture
                        .supplyAsync(() -> load(src), pool)
                        .thenCompose(log -> scoreLog(log, index, configs, options, listener, pool))
                        .whenComplete((r, e) -> {
                            inFlight.release();
                            if (r != null) {
                                listener.logDone(r.name());
                            }
                        });
                futures.add(f);
                if (f.isCompletedExceptionally()) {
                    break;
                }
            }
            List<LogScores> out = new ArrayList<>();
            for (CompletableFuture<LogScores> f : futures) {
                try {
                    out.add(f.join());
                } catch (CompletionException e) {
                    if (e.getCause() instanceof RuntimeException re) {
                        throw re;
                    }
                    throw e;
                }
            }
            return out;
        } finally {
            pool.shutdownNow();
        }
    }

    private static LoadedLog load(LogSource src) {
        try {
            return src.load();
        } catch (IOException e) {
            throw new UncheckedIOException(src.name() + ": cannot be read: " + e.getMessage(), e);
        }
    }

    private static CompletableFuture<LogScores> scoreLog(LoadedLog log, int index, List<NamedSettings> configs,
                                                         Options options, Listener listener, ExecutorService pool) {
        Prepared p = prepare(log, configs, options);
        listener.logLoaded(log.name(), p.samples.size(), 2 * configs.size());
        List<CompletableFuture<DriveSurvey>> surveys = new ArrayList<>();
        for (NamedSettings c : configs) {
            surveys.add(CompletableFuture.supplyAsync(() -> DriveSurvey.run(p.samples, c.settings(),
                    c.settings().profileFor(options.vehicle()), null, p.startT, GRID_STEP_S, options.minAidedS(),
                    p.extraTimes, TrackOutput.NONE, listener::samplesDone), pool));
        }
        return CompletableFuture.allOf(surveys.toArray(CompletableFuture[]::new)).thenCompose(done -> {
            List<DriveSurvey> ss = surveys.stream().map(CompletableFuture::join).toList();
            int gridCount = ss.get(0).gridCount();
            List<OdometryGap> odometryGaps = union(ss);
            List<String> notes = new ArrayList<>(p.notes);
            if (!odometryGaps.isEmpty()) {
                notes.add(odometryNote(odometryGaps, p.startT, p.timeDecimals));
            }
            WindowPlan plan = WindowPlan.choose(options.schedule(),
                    new WindowPlan.Log(p.startT, GRID_STEP_S, gridCount, p.firstFixT, p.lastFixT, p.gaps,
                            odometryGaps, k -> ss.stream().allMatch(s -> s.startAllowed(k))), index);
            List<CompletableFuture<ConfigScores>> scored = new ArrayList<>();
            for (int c = 0; c < configs.size(); c++) {
                NamedSettings cfg = configs.get(c);
                DriveSurvey survey = ss.get(c);
                scored.add(CompletableFuture.supplyAsync(() -> {
                    ConfigScores cs = scoreConfig(p, cfg, survey, plan, options, listener);
                    listener.windowsScored(cs.windows().size() + cs.realGaps().size());
                    return cs;
                }, pool));
            }
            return CompletableFuture.allOf(scored.toArray(CompletableFuture[]::new)).thenApply(d2 ->
                    new LogScores(log.name(), index, p.samples.size(), p.startT, p.endT, p.frame, p.kind, p.track,
                            p.gaps, odometryGaps, plan, scored.stream().map(CompletableFuture::join).toList(), notes,
                            log.inputs(), p.timeDecimals));
        });
    }

    /** The odometry gaps of every configuration's survey, each once, by start time. */
    private static List<OdometryGap> union(List<DriveSurvey> surveys) {
        java.util.LinkedHashSet<OdometryGap> all = new java.util.LinkedHashSet<>();
        for (DriveSurvey s : surveys) {
            all.addAll(s.odometryGaps());
        }
        List<OdometryGap> out = new ArrayList<>(all);
        out.sort(Comparator.comparingDouble(OdometryGap::startT).thenComparing(OdometryGap::stream)
                .thenComparingDouble(OdometryGap::endT));
        return out;
    }

    /** The note a log with odometry gaps carries: how many, how long, the longest, and what was done. */
    static String odometryNote(List<OdometryGap> gaps, double logStartT, int timeDecimals) {
        OdometryGap longest = gaps.get(0);
        for (OdometryGap g : gaps) {
            if (g.lengthS() > longest.lengthS()) {
                longest = g;
            }
        }
        String format = "%." + timeDecimals + "f";
        return String.format(java.util.Locale.ROOT, "%d odometry %s (a wheel-speed or yaw-rate stream silent for"
                        + " longer than the filter allows, the poses' odometry_interrupted; or not yet begun), %s s"
                        + " in all, the longest %s s of %s from %s s after the log's start: planned windows over"
                        + " them are not scored (overlaps_odometry_gap); a real gap in the fixes that contains one"
                        + " is scored and gives the silent seconds as odometry_gap_s",
                gaps.size(), gaps.size() == 1 ? "gap" : "gaps",
                String.format(java.util.Locale.ROOT, format, OdometryGaps.silentS(gaps, Double.NEGATIVE_INFINITY,
                        Double.POSITIVE_INFINITY)),
                String.format(java.util.Locale.ROOT, format, longest.lengthS()), longest.stream().wireName(),
                String.format(java.util.Locale.ROOT, format, longest.startT() - logStartT));
    }

    private static ConfigScores scoreConfig(Prepared p, NamedSettings cfg, DriveSurvey survey, WindowPlan plan,
                                            Options options, Listener listener) {
        Settings s = cfg.settings();
        List<OutageReplay.Start> starts = new ArrayList<>();
        for (OutageWindow w : plan.windows()) {
            int k = (int) Math.round((w.startT() - p.startT) / GRID_STEP_S);
            starts.add(new OutageReplay.Start(w, survey.gridState(k)));
        }
        Set<OutageWindow> real = new HashSet<>();
        for (int i = 0; i < p.realGapWindows.size(); i++) {
            if (survey.extraState(i) != null) {
                starts.add(new OutageReplay.Start(p.realGapWindows.get(i), survey.extraState(i)));
                real.add(p.realGapWindows.get(i));
            }
        }
        OutageReplay replay = new OutageReplay(s, s.profileFor(options.vehicle()), null, options.evalStepS(),
                options.smoothTailS());
        OutageReplay.Result r = replay.runFrom(p.samples, starts, p.track, options.keepTraces(),
                listener::samplesDone);
        List<WindowScore> windows = new ArrayList<>();
        List<WindowScore> gaps = new ArrayList<>();
        List<UnscoredWindow> unscored = new ArrayList<>();
        for (UnscoredWindow u : r.unscored()) {
            if (!real.contains(new OutageWindow(u.startT(), u.lengthS()))) {
                unscored.add(u);
            }
        }
        for (WindowScore w : r.scores()) {
            // A window with no withheld fix inside has nothing to be scored against.
            if (w.samples() == 0) {
                if (!real.contains(w.window())) {
                    unscored.add(new UnscoredWindow(w.window().startT(), w.window().lengthS(),
                            UnscoredWindow.Reason.NO_REFERENCE_INSIDE));
                }
                continue;
            }
            (real.contains(w.window()) ? gaps : windows).add(w);
        }
        List<OutageReplay.WindowTrace> traces = new ArrayList<>();
        List<OutageReplay.WindowTrace> gapTraces = new ArrayList<>();
        for (OutageReplay.WindowTrace t : r.traces()) {
            (real.contains(t.window()) ? gapTraces : traces).add(t);
        }
        return new ConfigScores(cfg.name(), windows, gaps, traces, gapTraces, survey.aidedSpans(), unscored);
    }

    /** What every configuration of a log shares. */
    private static final class Prepared {
        List<Sample> samples;
        double startT;
        double endT;
        double firstFixT;
        double lastFixT;
        LocalFrame frame;
        ReferenceKind kind;
        InterpolatedTrack track;
        List<TimeSpan> gaps;
        List<OutageWindow> realGapWindows = new ArrayList<>();
        List<String> notes;
        double[] extraTimes = new double[0];
        int timeDecimals;
    }

    /** Most decimals a time may carry in a report (a nanosecond). */
    static final int MAX_TIME_DECIMALS = 9;

    /**
     * Decimals of the log's own times: the most that any of its sample times has in its shortest
     * decimal form ({@link Double#toString}), at most {@link #MAX_TIME_DECIMALS}.
     */
    static int timeDecimals(List<? extends Sample> samples) {
        int most = 0;
        for (Sample s : samples) {
            int d = decimals(s.t());
            if (d > most) {
                most = d;
                if (most >= MAX_TIME_DECIMALS) {
                    return MAX_TIME_DECIMALS;
                }
            }
        }
        return most;
    }

    /** Decimals of a number's shortest decimal form (0 for a whole number). */
    static int decimals(double v) {
        if (!Double.isFinite(v)) {
            return 0;
        }
        return Math.max(0, new java.math.BigDecimal(Double.toString(v)).stripTrailingZeros().scale());
    }

    private static Prepared prepare(LoadedLog log, List<NamedSettings> configs, Options options) {
        Prepared p = new Prepared();
        // The service's time ordering, with the first configuration's reorder window: duplicates dropped,
        // implausible times refused, samples put in processing order.
        OrderedLog ordered = OrderedLog.order(log.samples(), configs.get(0).settings().ordering());
        p.samples = ordered.samples();
        p.timeDecimals = timeDecimals(p.samples);
        p.notes = new ArrayList<>(log.notes());
        if (ordered.duplicates() > 0) {
            p.notes.add(ordered.duplicates() + " duplicate samples ignored, as the service ignores them");
        }
        if (!ordered.rejected().isEmpty()) {
            OrderedLog.Refused first = ordered.rejected().get(0);
            p.notes.add(ordered.rejected().size() + " samples refused by the time ordering, as the service would"
                    + " refuse them; the first, sample " + (first.index() + 1) + " of the log: "
                    + first.admission().reason());
        }
        if (p.samples.isEmpty()) {
            throw new IllegalArgumentException(log.name() + ": has no sample the time ordering accepts, nothing to score");
        }
        List<GnssFix> fixes = new ArrayList<>();
        List<ReferencePoint> refs = new ArrayList<>();
        for (Sample s : p.samples) {
            if (s instanceof GnssFix f && f.fix() != FixType.NONE) {
                fixes.add(f);
            } else if (s instanceof ReferencePoint r) {
                refs.add(r);
            }
        }
        if (fixes.isEmpty()) {
            throw new IllegalArgumentException(log.name() + ": has no GNSS fix with a solution, nothing to score");
        }
        GnssFix first = fixes.get(0);
        p.frame = VehicleTrack.frameFor(first, null);
        p.startT = p.samples.get(0).t();
        p.endT = p.samples.get(p.samples.size() - 1).t();
        p.firstFixT = first.t();
        p.lastFixT = fixes.get(fixes.size() - 1).t();
        // With several configurations the shortest gap is used, so no window of any of them overlaps one.
        double gapS = configs.stream().mapToDouble(c -> c.settings().outage().gapS()).min().orElseThrow();
        p.gaps = GnssGaps.find(p.samples, gapS);
        if (refs.size() >= 2) {
            p.kind = ReferenceKind.REFERENCE;
            p.track = InterpolatedTrack.ofReference(refs, p.frame, REFERENCE_MAX_GAP_S);
            double[] extra = new double[p.gaps.size()];
            for (int i = 0; i < p.gaps.size(); i++) {
                TimeSpan g = p.gaps.get(i);
                // Just after the last fix: the branch has seen it, and nothing else is withheld.
                double start = Math.nextUp(g.startT());
                extra[i] = start;
                p.realGapWindows.add(new OutageWindow(start, g.endT() - start));
            }
            p.extraTimes = extra;
        } else {
            p.kind = ReferenceKind.WITHHELD_FIXES;
            p.track = InterpolatedTrack.ofFixes(fixes, p.frame, gapS);
        }
        return p;
    }

    /** The lengths of the schedule, for summaries. */
    public static double[] lengths(Options options) {
        return Arrays.copyOf(options.schedule().lengthsS(), options.schedule().lengthsS().length);
    }
}
