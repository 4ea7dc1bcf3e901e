package org.wayhold.bench;

import java.io.ByteArrayInputStream;
import java.io.IOException;
import java.io.InputStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.concurrent.TimeUnit;
import java.util.zip.GZIPInputStream;
import org.openjdk.jmh.annotations.Benchmark;
import org.openjdk.jmh.annotations.BenchmarkMode;
import org.openjdk.jmh.annotations.Fork;
import org.openjdk.jmh.annotations.Level;
import org.openjdk.jmh.annotations.Measurement;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.annotations.OutputTimeUnit;
import org.openjdk.jmh.annotations.Param;
import org.openjdk.jmh.annotations.Scope;
import org.openjdk.jmh.annotations.Setup;
import org.openjdk.jmh.annotations.State;
import org.openjdk.jmh.annotations.Warmup;
import org.openjdk.jmh.infra.Blackhole;
import org.wayhold.fusion.DriveFusion;
import org.wayhold.fusion.FusedDrive;
import org.wayhold.geo.Enu;
import org.wayhold.geo.LocalFrame;
import org.wayhold.ingest.NdjsonReader;
import org.wayhold.ingest.ReadResult;
import org.wayhold.pipeline.OrderedLog;
import org.wayhold.pipeline.TrackOutput;
import org.wayhold.pipeline.VehicleTrack;
import org.wayhold.pose.Pose;
import org.wayhold.sample.ReferencePoint;
import org.wayhold.sample.Sample;
import org.wayhold.settings.Settings;

/**
 * Replay of a recorded hour against reading it, side by side: the target is that replay takes at most
 * twice as long as parsing alone. The log is an NDJSON file written by {@code simulate} (parameter
 * {@code log}; see bench/RESULTS.md for the command), held in memory as bytes so that the disk is no
 * part of either figure. One operation is the whole hour.
 * <ul>
 *   <li>{@code parseOnly}: bytes to a list of samples with the reader every command uses
 *       ({@link NdjsonReader#readAll}), nothing else;</li>
 *   <li>{@code parseAndTrack}: the same, then the per-vehicle pipeline every path shares: the service's
 *       time ordering ({@link OrderedLog}) and a {@link VehicleTrack} fed every sample, no output (what
 *       {@code score}'s drive pass runs before it keeps any state);</li>
 *   <li>{@code parseAndFuse}: the same as {@code fuse} without {@code --smooth}: {@link DriveFusion}
 *       with its poses turned into track points (writing the files left out).</li>
 * </ul>
 * and, to tell where a replay's time goes, its parts on samples parsed once in the setup:
 * {@code orderOnly} (the time ordering alone), {@code trackOnly} (the vehicle track over the ordered
 * samples) and {@code fuseOnly} (ordering, track and points, no parsing).
 * {@link #setUp()} throws unless every line was read without a rejection, the ordering refused
 * nothing, and the track ends within {@value #CHECK_RADIUS_M} m of the log's last reference point.
 */
@State(Scope.Thread)
@BenchmarkMode(Mode.AverageTime)
@OutputTimeUnit(TimeUnit.MILLISECONDS)
@Warmup(iterations = 3, time = 5)
@Measurement(iterations = 6, time = 5)
@Fork(value = 1, jvmArgsAppend = {"-Xmx1g"})
public class HourReplayBenchmark {

    /** The open-sky end of the drive: an aided filter sits within a few metres of the truth. */
    private static final double CHECK_RADIUS_M = 5.0;

    /** The NDJSON log (plain or {@code .gz}), relative to the project root. */
    @Param("target/bench/hour-drive.ndjson")
    public String log;

    private final Settings settings = Settings.defaults();
    private final NdjsonReader reader = new NdjsonReader();
    private byte[] bytes;
    private List<Sample> parsed;
    private List<Sample> ordered;

    @Setup(Level.Trial)
    public void setUp() throws IOException {
        Path p = Path.of(log);
        if (!Files.isRegularFile(p)) {
            throw new IllegalStateException("benchmark log " + p.toAbsolutePath() + " not found: write it with"
                    + " java -jar target/wayhold.jar simulate (bench/RESULTS.md has the command)");
        }
        try (InputStream in = p.toString().endsWith(".gz") ? new GZIPInputStream(Files.newInputStream(p))
                : Files.newInputStream(p)) {
            bytes = in.readAllBytes();
        }
        ReadResult r = parse();
        require(r.rejected().isEmpty(), "parse: " + r.rejected().size() + " lines rejected");
        require(r.samples().get(r.samples().size() - 1).t() - r.samples().get(0).t() >= 3000.0,
                "the log covers less than 50 minutes");
        OrderedLog ordered = OrderedLog.order(r.samples(), settings.ordering());
        require(ordered.rejected().isEmpty() && ordered.duplicates() == 0,
                "ordering refused " + ordered.rejected().size() + " samples and dropped " + ordered.duplicates());
        ReferencePoint last = null;
        for (Sample s : r.samples()) {
            if (s instanceof ReferencePoint ref) {
                last = ref;
            }
        }
        require(last != null, "the log has no reference points");
        Pose pose = track().pose();
        Enu enu = new LocalFrame(pose.origin()).toEnu(last.latDeg(), last.lonDeg(), pose.origin().altM());
        double d = Math.hypot(enu.eastM() - pose.eastM(), enu.northM() - pose.northM());
        require(Math.abs(pose.t() - last.t()) < 0.2 && d < CHECK_RADIUS_M,
                "last pose at t " + pose.t() + " is " + d + " m from the reference at t " + last.t());
        FusedDrive f = fuse();
        require(f.forward().size() > 17_000, "fuse gave " + f.forward().size() + " points");
        parsed = r.samples();
        this.ordered = ordered.samples();
    }

    /** Bytes to samples: the reader's share. */
    @Benchmark
    public void parseOnly(Blackhole bh) {
        bh.consume(parse());
    }

    /** Bytes to samples, time ordering and a vehicle track fed every sample. */
    @Benchmark
    public void parseAndTrack(Blackhole bh) {
        bh.consume(track().snapshot());
    }

    /** Bytes to samples and the forward track of {@code fuse}. */
    @Benchmark
    public void parseAndFuse(Blackhole bh) {
        bh.consume(fuse());
    }

    /** The time ordering of samples already parsed. */
    @Benchmark
    public void orderOnly(Blackhole bh) {
        bh.consume(OrderedLog.order(parsed, settings.ordering()));
    }

    /** A vehicle track fed samples already parsed and ordered. */
    @Benchmark
    public void trackOnly(Blackhole bh) {
        bh.consume(feed(ordered).snapshot());
    }

    /** The forward track of {@code fuse} from samples already parsed. */
    @Benchmark
    public void fuseOnly(Blackhole bh) {
        bh.consume(DriveFusion.fuse("bench", parsed, settings, settings.profileFor(Settings.DEFAULT_PROFILE), false));
    }

    private ReadResult parse() {
        return reader.readAll(new ByteArrayInputStream(bytes));
    }

    private VehicleTrack track() {
        return feed(OrderedLog.order(parse().samples(), settings.ordering()).samples());
    }

    private VehicleTrack feed(List<Sample> samples) {
        VehicleTrack t = new VehicleTrack(settings, settings.profileFor(Settings.DEFAULT_PROFILE), null,
                TrackOutput.NONE);
        for (Sample s : samples) {
            t.apply(s);
        }
        return t;
    }

    private FusedDrive fuse() {
        return DriveFusion.fuse("bench", parse().samples(), settings, settings.profileFor(Settings.DEFAULT_PROFILE),
                false);
    }

    private static void require(boolean ok, String message) {
        if (!ok) {
            throw new IllegalStateException("benchmark self-check failed: " + message);
        }
    }
}
