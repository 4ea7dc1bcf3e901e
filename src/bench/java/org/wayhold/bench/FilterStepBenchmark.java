package org.wayhold.bench;

import java.util.concurrent.TimeUnit;
import org.openjdk.jmh.annotations.Benchmark;
import org.openjdk.jmh.annotations.BenchmarkMode;
import org.openjdk.jmh.annotations.Fork;
import org.openjdk.jmh.annotations.Level;
import org.openjdk.jmh.annotations.Measurement;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.annotations.OutputTimeUnit;
import org.openjdk.jmh.annotations.Scope;
import org.openjdk.jmh.annotations.Setup;
import org.openjdk.jmh.annotations.State;
import org.openjdk.jmh.annotations.Warmup;
import org.wayhold.filter.GnssOutcome;
import org.wayhold.filter.NavigationFilter;
import org.wayhold.filter.StateIndex;
import org.wayhold.sample.GnssFix;
import org.wayhold.settings.Settings;

/**
 * One 100 Hz predict step, and one GNSS position update, of wayhold's filter. With {@code -prof gc}
 * JMH reports the bytes allocated per operation, which must be 0 in steady state.
 *
 * <p>Each invocation works on a filter that has driven a while (turning, moving) so the covariance is
 * realistic; the GNSS benchmark restores the filter before each update (not timed at the invocation
 * level: the restore is a copy of a few arrays and is timed separately as {@link #restoreOnly}).
 */
@State(Scope.Thread)
@BenchmarkMode(Mode.Throughput)
@OutputTimeUnit(TimeUnit.SECONDS)
@Warmup(iterations = 3, time = 1)
@Measurement(iterations = 5, time = 1)
@Fork(1)
public class FilterStepBenchmark {

    private final Settings settings = Settings.defaults();
    private NavigationFilter filter;
    private NavigationFilter start;
    private GnssFix fix;
    private double t;

    @Setup(Level.Trial)
    public void setUp() {
        start = new NavigationFilter(settings.filter(), settings.gating(), settings.outage(),
                settings.profileFor("default"));
        double[] x = new double[StateIndex.SIZE];
        x[StateIndex.YAW] = 0.3;
        x[StateIndex.SPEED_SCALE] = 1.0;
        double[] p = new double[StateIndex.SIZE * StateIndex.SIZE];
        double[] sig = {1.0, 1.0, 0.05, 0.005, 0.02, 0.8, 0.8};
        for (int i = 0; i < StateIndex.SIZE; i++) {
            p[i * StateIndex.SIZE + i] = sig[i] * sig[i];
        }
        start.initialize(0.0, x, p);
        start.setWheelSpeed(15.0);
        start.setYawRate(0.05);
        for (int k = 1; k <= 1000; k++) {
            start.predictTo(k * 0.01);
        }
        filter = start.copy();
        t = 10.0;
        fix = GnssFix.position(0.0, 0.0, 0.0, 1.0);
    }

    /** One 100 Hz step: propagate state and covariance by 10 ms. */
    @Benchmark
    public double predict100Hz() {
        t += 0.01;
        filter.predictTo(t);
        filter.setYawRate(0.05);
        return t;
    }

    /** One GNSS position update at the current state, then back to the start state. */
    @Benchmark
    public GnssOutcome.Kind gnssUpdate() {
        filter.restore(start);
        return filter.correct(fix, 149.0, 44.0, Double.NaN);
    }

    /** The restore that {@link #gnssUpdate} includes, to subtract it. */
    @Benchmark
    public NavigationFilter restoreOnly() {
        filter.restore(start);
        return filter;
    }
}
