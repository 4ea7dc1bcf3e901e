package org.wayhold.session;

import java.util.ArrayList;
import java.util.List;
import java.util.function.Consumer;
import org.wayhold.sample.Sample;

/**
 * Feeds a recorded log to a consumer in scaled real time, for demos without a logging rig.
 *
 * <p>Sample {@code i} is due at wall time {@code start + (t_i - t_0) / speed}: a speed of 1 replays as
 * recorded, 100 replays a ten-minute drive in six seconds. Samples that fall due together are handed
 * over as one batch, at most every {@link #BATCH_NANOS}, which keeps the per-call cost of a session
 * small at high speeds while a dashboard still sees a smooth stream. Samples are handed over in log
 * order; times that go backwards in the log are sent at once (the session's reorder window decides).
 */
public final class LogReplay implements Runnable {

    /** Shortest wall-clock spacing between two batches (ns): 20 ms, finer than a dashboard redraws. */
    static final long BATCH_NANOS = 20_000_000L;

    private final List<Sample> samples;
    private final double speed;
    private final Consumer<List<Sample>> target;
    private volatile boolean stopped;
    private volatile boolean completed;

    /**
     * @param samples the log, in recorded order
     * @param speed   replay speed as a multiple of real time (unitless, > 0, finite)
     * @param target  receives each due batch, from the replay thread
     */
    public LogReplay(List<? extends Sample> samples, double speed, Consumer<List<Sample>> target) {
        if (!(speed > 0.0 && Double.isFinite(speed))) {
            throw new IllegalArgumentException("speed: must be a positive multiple of real time, was " + speed);
        }
        this.samples = List.copyOf(samples);
        this.speed = speed;
        this.target = java.util.Objects.requireNonNull(target, "target");
    }

    /** Asks a running replay to stop after its current batch. */
    public void stop() {
        stopped = true;
    }

    /** True once every sample of the log has been handed over (false while running, or when stopped). */
    public boolean completed() {
        return completed;
    }

    /** Vehicle time of the first sample (s), NaN for an empty log. */
    public double firstT() {
        return samples.isEmpty() ? Double.NaN : samples.get(0).t();
    }

    /** Vehicle time of the last sample (s), NaN for an empty log. */
    public double lastT() {
        return samples.isEmpty() ? Double.NaN : samples.get(samples.size() - 1).t();
    }

    /** Samples in the log (count). */
    public int size() {
        return samples.size();
    }

    /** Replays the whole log on the calling thread; returns early when stopped or interrupted. */
    @Override
    public void run() {
        if (samples.isEmpty()) {
            completed = true;
            return;
        }
        double t0 = samples.get(0).t();
        long start = System.nanoTime();
        int next = 0;
        while (next < samples.size() && !stopped) {
            long now = System.nanoTime();
            List<Sample> due = new ArrayList<>();
            while (next < samples.size() && dueNanos(samples.get(next).t(), t0) <= now - start) {
                due.add(samples.get(next++));
            }
            if (!due.isEmpty()) {
                target.accept(due);
            }
            if (next >= samples.size()) {
                completed = true;
                return;
            }
            long wait = Math.max(BATCH_NANOS, dueNanos(samples.get(next).t(), t0) - (System.nanoTime() - start));
            try {
                Thread.sleep(wait / 1_000_000L, (int) (wait % 1_000_000L));
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
                return;
            }
        }
    }

    private long dueNanos(double t, double t0) {
        return (long) ((t - t0) / speed * 1e9);
    }
}
