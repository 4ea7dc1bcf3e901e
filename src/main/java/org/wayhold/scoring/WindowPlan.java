package org.wayhold.scoring;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.Comparator;
import java.util.List;
import java.util.Random;
import java.util.function.IntPredicate;

/**
 * Chooses the simulated outage windows of one log.
 *
 * <p>Starts lie on a grid (one start state per grid time is kept by {@link DriveSurvey}). A window may
 * start at grid time c with length L when: c is at least {@code skipS} after the grid's start; the
 * filter had been aided for the minimum time at c in every configuration compared (the caller's
 * predicate); [c, c + L] lies between the first and last fix and overlaps no real gap in the fixes and
 * no odometry gap (a wheel-speed or yaw-rate stream silent, {@link OdometryGaps}).
 *
 * <p>Fixed schedule: one window of each length at every {@code everyS} from the skip; a window that is
 * not allowed is left out and listed with its reason. Random: {@code perLength} distinct allowed starts
 * for each length, drawn with {@link java.util.Random} (its generator is specified by the Java platform,
 * so a seed gives the same windows on every JVM) seeded from the seed, the log's index and the length's
 * index; windows short of the ask are listed as {@link UnscoredWindow.Reason#TOO_FEW_STARTS}.
 *
 * @param windows  the windows, ordered by start then length
 * @param unscored planned windows left out, with the reason, ordered by start then length (the
 *                 random schedule's shortfalls last)
 */
public record WindowPlan(List<OutageWindow> windows, List<UnscoredWindow> unscored) {

    public WindowPlan {
        windows = List.copyOf(windows);
        unscored = List.copyOf(unscored);
    }

    /** Planned windows left out (count). */
    public int skipped() {
        return unscored.stream().mapToInt(UnscoredWindow::count).sum();
    }

    /**
     * The schedule.
     *
     * @param lengthsS  outage lengths (s, each > 0)
     * @param skipS     time from the log's first sample before any window (s, >= 0, a whole number of grid steps)
     * @param everyS    spacing of the fixed schedule (s, > 0, a whole number of grid steps)
     * @param perLength random windows per length (count), 0 for the fixed schedule
     * @param seed      seed of the random draw
     */
    public record Schedule(double[] lengthsS, double skipS, double everyS, int perLength, long seed) {

        public Schedule {
            if (lengthsS.length == 0) {
                throw new IllegalArgumentException("outage: at least one outage length in s is needed");
            }
            for (double l : lengthsS) {
                if (!(l > 0.0) || Double.isInfinite(l)) {
                    throw new IllegalArgumentException("outage: lengths must be positive numbers of s, was " + l);
                }
            }
            if (!(skipS >= 0.0) || Double.isInfinite(skipS)) {
                throw new IllegalArgumentException("skip: must be a non-negative number of s, was " + skipS);
            }
            if (!(everyS > 0.0) || Double.isInfinite(everyS)) {
                throw new IllegalArgumentException("every: must be a positive number of s, was " + everyS);
            }
            if (perLength < 0) {
                throw new IllegalArgumentException("random: must be a count >= 0, was " + perLength);
            }
            lengthsS = lengthsS.clone();
        }

        @Override
        public double[] lengthsS() {
            return lengthsS.clone();
        }

        @Override
        public boolean equals(Object o) {
            return o instanceof Schedule s && Arrays.equals(lengthsS, s.lengthsS) && skipS == s.skipS
                    && everyS == s.everyS && perLength == s.perLength && seed == s.seed;
        }

        @Override
        public int hashCode() {
            return Arrays.hashCode(lengthsS) * 31 + Long.hashCode(seed);
        }
    }

    /**
     * The log's side of the plan.
     *
     * @param gridStartT first grid time (s)
     * @param gridStepS  grid spacing (s)
     * @param gridCount  number of grid times
     * @param firstFixT  first fix (s)
     * @param lastFixT   last fix (s)
     * @param gaps       real gaps in the fixes
     * @param odometryGaps stretches where a wheel-speed or yaw-rate stream was silent
     * @param allowed    whether the filter state allows a start at grid index k in every configuration
     */
    public record Log(double gridStartT, double gridStepS, int gridCount, double firstFixT, double lastFixT,
                      List<TimeSpan> gaps, List<OdometryGap> odometryGaps, IntPredicate allowed) {

        public Log {
            gaps = List.copyOf(gaps);
            odometryGaps = List.copyOf(odometryGaps);
        }
    }

    /**
     * @param schedule the schedule
     * @param log      the log's grid, fixes and gaps
     * @param logIndex position of the log among those scored together (mixed into the random seed)
     */
    public static WindowPlan choose(Schedule schedule, Log log, int logIndex) {
        int skipSteps = wholeSteps("skip", schedule.skipS(), log.gridStepS());
        List<OutageWindow> out = new ArrayList<>();
        List<UnscoredWindow> left = new ArrayList<>();
        List<UnscoredWindow> shortfalls = new ArrayList<>();
        double[] lengths = schedule.lengthsS();
        if (schedule.perLength() == 0) {
            int everySteps = wholeSteps("every", schedule.everyS(), log.gridStepS());
            for (int k = skipSteps; k < log.gridCount(); k += everySteps) {
                double start = log.gridStartT() + k * log.gridStepS();
                for (double len : lengths) {
                    UnscoredWindow.Reason why = refusal(log, k, len);
                    if (why == null) {
                        out.add(new OutageWindow(start, len));
                    } else {
                        left.add(new UnscoredWindow(start, len, why));
                    }
                }
            }
            if (out.isEmpty() && left.isEmpty()) {
                // Not even one grid time after the skip: every window of the schedule is past the end.
                double start = log.gridStartT() + skipSteps * log.gridStepS();
                for (double len : lengths) {
                    left.add(new UnscoredWindow(start, len, UnscoredWindow.Reason.BEYOND_LOG_END));
                }
            }
        } else {
            for (int li = 0; li < lengths.length; li++) {
                double len = lengths[li];
                int[] candidates = new int[Math.max(log.gridCount() - skipSteps, 0)];
                int n = 0;
                for (int k = skipSteps; k < log.gridCount(); k++) {
                    if (refusal(log, k, len) == null) {
                        candidates[n++] = k;
                    }
                }
                Random random = new Random(mix(schedule.seed(), logIndex, li));
                int take = Math.min(schedule.perLength(), n);
                // Partial Fisher-Yates shuffle: the first `take` entries become a uniform draw without
                // replacement (Knuth, TAOCP vol. 2, 3.4.2, algorithm P).
                for (int i = 0; i < take; i++) {
                    int j = i + random.nextInt(n - i);
                    int tmp = candidates[i];
                    candidates[i] = candidates[j];
                    candidates[j] = tmp;
                    out.add(new OutageWindow(log.gridStartT() + candidates[i] * log.gridStepS(), len));
                }
                if (take < schedule.perLength()) {
                    shortfalls.add(new UnscoredWindow(Double.NaN, len, UnscoredWindow.Reason.TOO_FEW_STARTS,
                            schedule.perLength() - take));
                }
            }
        }
        out.sort(Comparator.comparingDouble(OutageWindow::startT).thenComparingDouble(OutageWindow::lengthS));
        left.sort(Comparator.comparingDouble(UnscoredWindow::startT).thenComparingDouble(UnscoredWindow::lengthS));
        left.addAll(shortfalls);
        return new WindowPlan(out, left);
    }

    /**
     * Why a window of length {@code len} may not start at grid time {@code k}, or null when it may. The
     * first reason that applies is given, data before filter: past the fixes, then a real gap in the
     * fixes, then an odometry gap, then the filter's aided time.
     */
    private static UnscoredWindow.Reason refusal(Log log, int k, double len) {
        double start = log.gridStartT() + k * log.gridStepS();
        double end = start + len;
        if (!(end <= log.lastFixT())) {
            return UnscoredWindow.Reason.BEYOND_LOG_END;
        }
        if (!(start >= log.firstFixT())) {
            return UnscoredWindow.Reason.BEFORE_FIRST_FIX;
        }
        for (TimeSpan g : log.gaps()) {
            if (g.overlaps(start, end)) {
                return UnscoredWindow.Reason.OVERLAPS_REAL_GAP;
            }
        }
        if (OdometryGaps.anyOverlaps(log.odometryGaps(), start, end)) {
            return UnscoredWindow.Reason.OVERLAPS_ODOMETRY_GAP;
        }
        if (!log.allowed().test(k)) {
            return UnscoredWindow.Reason.NOT_AIDED_LONG_ENOUGH;
        }
        return null;
    }

    /** A seed per log and length from the user's seed (SplitMix64 finaliser, Steele et al., OOPSLA 2014). */
    private static long mix(long seed, int logIndex, int lengthIndex) {
        long z = seed + 0x9E3779B97F4A7C15L * (1 + logIndex * 1_000_003L + lengthIndex);
        z = (z ^ (z >>> 30)) * 0xBF58476D1CE4E5B9L;
        z = (z ^ (z >>> 27)) * 0x94D049BB133111EBL;
        return z ^ (z >>> 31);
    }

    /** Throws unless {@code valueS} is a whole number of grid steps, naming the option. */
    public static void requireWholeSteps(String name, double valueS, double stepS) {
        wholeSteps(name, valueS, stepS);
    }

    private static int wholeSteps(String name, double valueS, double stepS) {
        double steps = valueS / stepS;
        long r = Math.round(steps);
        if (Math.abs(steps - r) > 1e-9) {
            throw new IllegalArgumentException(name + ": must be a whole number of " + stepS + " s steps, was "
                    + valueS + " s");
        }
        return (int) r;
    }
}
