package org.wayhold.bench;

import java.util.List;
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
import org.openjdk.jmh.infra.Blackhole;
import org.wayhold.filter.RtsSmoother;
import org.wayhold.filter.SmootherLog;
import org.wayhold.fusion.DriveFusion;
import org.wayhold.fusion.FusedDrive;
import org.wayhold.pipeline.OrderedLog;
import org.wayhold.pipeline.TrackOutput;
import org.wayhold.pipeline.VehicleTrack;
import org.wayhold.sample.Sample;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;

/**
 * {@code fuse} on a one-hour drive held in memory (the simulator's default sensors: wheel speed at
 * 50 Hz, yaw rate at 100 Hz, GNSS at 5 Hz, reference at 10 Hz; six tunnels), side by side:
 * <ul>
 *   <li>{@code forwardReplay}: the plain forward replay fuse runs without {@code --smooth} (time
 *       ordering, the vehicle track, a point per pose);</li>
 *   <li>{@code fuseSmooth}: the same with the forward pass recorded and the Rauch-Tung-Striebel backward
 *       pass: the target is at most 2.5 times {@code forwardReplay};</li>
 *   <li>{@code recordOnly} and {@code backwardOnly}: the two halves of the smoothing's cost.</li>
 * </ul>
 * Parsing and writing files are left out: they are the same with and without smoothing. One operation
 * is one whole hour; {@link #setUp()} throws unless the smoothed track has a point per forward point.
 */
@State(Scope.Thread)
@BenchmarkMode(Mode.AverageTime)
@OutputTimeUnit(TimeUnit.MILLISECONDS)
@Warmup(iterations = 2, time = 5)
@Measurement(iterations = 5, time = 5)
@Fork(value = 1, jvmArgsAppend = {"-Xmx1g"})
public class FuseBenchmark {

    private final Settings settings = Settings.defaults();
    private List<Sample> samples;
    private List<Sample> ordered;
    private SmootherLog recorded;

    @Setup(Level.Trial)
    public void setUp() {
        SimulatedDrive d = DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(60).withWarmUpS(120)
                .withTunnelsS(30, 60, 90, 120, 60, 30), 2024L);
        samples = d.samples();
        ordered = OrderedLog.order(samples, settings.ordering()).samples();
        FusedDrive f = DriveFusion.fuse("bench", samples, settings, settings.profileFor("default"), true);
        if (f.smoothed().size() != f.forward().size() || f.forward().size() < 17_000) {
            throw new IllegalStateException("benchmark self-check failed: " + f.forward().size() + " forward and "
                    + f.smoothed().size() + " smoothed points");
        }
        recorded = record();
    }

    private SmootherLog record() {
        VehicleTrack track = new VehicleTrack(settings, settings.profileFor("default"), null, TrackOutput.NONE);
        SmootherLog log = track.recordForSmoothing();
        for (Sample s : ordered) {
            track.apply(s);
        }
        log.finish();
        return log;
    }

    @Benchmark
    public void forwardReplay(Blackhole bh) {
        bh.consume(DriveFusion.fuse("bench", samples, settings, settings.profileFor("default"), false));
    }

    @Benchmark
    public void fuseSmooth(Blackhole bh) {
        bh.consume(DriveFusion.fuse("bench", samples, settings, settings.profileFor("default"), true));
    }

    /** The ordered log through a recording track, no poses: the forward half of smoothing's cost. */
    @Benchmark
    public void recordOnly(Blackhole bh) {
        bh.consume(record());
    }

    /** The backward pass over a recorded hour. */
    @Benchmark
    public void backwardOnly(Blackhole bh) {
        bh.consume(RtsSmoother.smooth(recorded));
    }
}
