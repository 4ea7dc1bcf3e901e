package org.wayhold.bench;

import java.io.ByteArrayInputStream;
import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.TimeUnit;
import java.util.zip.GZIPInputStream;
import org.openjdk.jmh.annotations.Benchmark;
import org.openjdk.jmh.annotations.BenchmarkMode;
import org.openjdk.jmh.annotations.Fork;
import org.openjdk.jmh.annotations.Level;
import org.openjdk.jmh.annotations.Measurement;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.annotations.OperationsPerInvocation;
import org.openjdk.jmh.annotations.OutputTimeUnit;
import org.openjdk.jmh.annotations.Scope;
import org.openjdk.jmh.annotations.Setup;
import org.openjdk.jmh.annotations.State;
import org.openjdk.jmh.annotations.Warmup;
import org.openjdk.jmh.infra.Blackhole;
import org.wayhold.pipeline.TrackOutput;
import org.wayhold.pipeline.VehicleTrack;
import org.wayhold.geo.Enu;
import org.wayhold.geo.Geodetic;
import org.wayhold.geo.LocalFrame;
import org.wayhold.ingest.LineError;
import org.wayhold.ingest.NdjsonReader;
import org.wayhold.ingest.SampleSink;
import org.wayhold.pose.Pose;
import org.wayhold.pose.PoseAssembler;
import org.wayhold.sample.FixType;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.ReferencePoint;
import org.wayhold.sample.Sample;
import org.wayhold.session.SessionStats;
import org.wayhold.session.VehicleSession;
import org.wayhold.settings.Settings;

/**
 * Replay of a whole demo log held in memory, from NDJSON bytes: parse only, parse and filter, and parse
 * and run a vehicle session (time ordering, checkpoints, filter, poses, history) in batches of 1000
 * lines as an HTTP client would post them. Scores are per sample: JMH divides each invocation by the
 * log's {@value #LINES} lines, so ops/s reads as samples per second.
 *
 * <p>The log is {@code sample-logs/two-tunnels.ndjson.gz} (two tunnels, so outages and reacquisitions
 * are part of the work). {@link #setUp()} runs each path once and throws unless every line was read
 * with no rejection, every sample reached the filter, and the last pose lies within
 * {@value #CHECK_RADIUS_M} m of the log's last reference point (taken at most 0.2 s earlier).
 */
@State(Scope.Thread)
@BenchmarkMode(Mode.Throughput)
@OutputTimeUnit(TimeUnit.SECONDS)
@Warmup(iterations = 3, time = 1)
@Measurement(iterations = 5, time = 1)
@Fork(1)
@OperationsPerInvocation(ReplayBenchmark.LINES)
public class ReplayBenchmark {

    /** Lines of the log, all samples (checked in setup). */
    static final int LINES = 58_800;
    private static final String LOG = "sample-logs/two-tunnels.ndjson.gz";
    private static final int BATCH = 1000;
    /** The open-sky end of the drive: an aided filter sits within a few metres of the truth. */
    private static final double CHECK_RADIUS_M = 5.0;

    private final Settings settings = Settings.defaults();
    private final NdjsonReader reader = new NdjsonReader();
    private byte[] bytes;

    @Setup(Level.Trial)
    public void setUp() throws IOException {
        try (InputStream in = new GZIPInputStream(Files.newInputStream(Path.of(LOG)))) {
            bytes = in.readAllBytes();
        }
        Counter counter = parse();
        require(counter.samples == LINES && counter.rejected == 0,
                "parse: " + counter.samples + " samples, " + counter.rejected + " rejected, expected " + LINES);
        require(counter.lastReference != null, "the log has no reference points");

        FilterFeed feed = filter();
        require(feed.fed == LINES, "filter: fed " + feed.fed + " samples");
        checkNear("filter", feed.pose(), counter.lastReference);

        SessionFeed session = session();
        SessionStats stats = session.session.stats();
        long applied = stats.wheelSpeedApplied() + stats.yawRateApplied() + stats.gnssApplied() + stats.referenceApplied();
        require(applied == LINES, "session: applied " + applied + " samples");
        checkNear("session", session.session.latest().orElseThrow(), counter.lastReference);
    }

    /** Bytes to samples, nothing else: the parser's share. */
    @Benchmark
    public void parseOnly(Blackhole bh) {
        Counter c = parse();
        bh.consume(c.samples);
        bh.consume(c.sumT);
    }

    /** Bytes to samples to the filter (a VehicleTrack, in arrival order), then the final pose. */
    @Benchmark
    public void parseAndFilter(Blackhole bh) {
        bh.consume(filter().pose());
    }

    /** Bytes to samples to a vehicle session in batches of 1000: ordering, filter, poses, history. */
    @Benchmark
    public void parseAndSession(Blackhole bh) {
        bh.consume(session().session.latest());
    }

    private Counter parse() {
        Counter c = new Counter();
        read(c);
        return c;
    }

    private FilterFeed filter() {
        FilterFeed f = new FilterFeed(settings);
        read(f);
        return f;
    }

    private SessionFeed session() {
        SessionFeed s = new SessionFeed(new VehicleSession("bench", settings, null));
        read(s);
        s.flush();
        return s;
    }

    private void read(SampleSink sink) {
        try {
            reader.read(new ByteArrayInputStream(bytes), sink);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    private static void checkNear(String path, Pose pose, ReferencePoint ref) {
        Enu enu = new LocalFrame(pose.origin()).toEnu(ref.latDeg(), ref.lonDeg(), pose.origin().altM());
        double d = Math.hypot(enu.eastM() - pose.eastM(), enu.northM() - pose.northM());
        require(Math.abs(pose.t() - ref.t()) < 0.2 && d < CHECK_RADIUS_M,
                path + ": last pose at t " + pose.t() + " is " + d + " m from the reference at t " + ref.t());
    }

    private static void require(boolean ok, String message) {
        if (!ok) {
            throw new IllegalStateException("benchmark self-check failed: " + message);
        }
    }

    private static final class Counter implements SampleSink {
        private int samples;
        private int rejected;
        private double sumT;
        private ReferencePoint lastReference;

        @Override
        public void accept(long line, Sample s) {
            samples++;
            sumT += s.t();
            if (s instanceof ReferencePoint r) {
                lastReference = r;
            }
        }

        @Override
        public void reject(LineError e) {
            rejected++;
        }
    }

    /** What a replay does without a session's ordering and history: the track in arrival order. */
    private static final class FilterFeed implements SampleSink {
        private final VehicleTrack track;
        private int fed;

        FilterFeed(Settings settings) {
            track = new VehicleTrack(settings, settings.profileFor(Settings.DEFAULT_PROFILE), null, TrackOutput.NONE);
        }

        @Override
        public void accept(long line, Sample s) {
            track.apply(s);
            fed++;
        }

        @Override
        public void reject(LineError e) {
            throw new IllegalStateException("rejected: " + e);
        }

        Pose pose() {
            return track.pose();
        }
    }

    private static final class SessionFeed implements SampleSink {
        private final VehicleSession session;
        private final List<Sample> batch = new ArrayList<>(BATCH);

        SessionFeed(VehicleSession session) {
            this.session = session;
        }

        @Override
        public void accept(long line, Sample s) {
            batch.add(s);
            if (batch.size() == BATCH) {
                flush();
            }
        }

        @Override
        public void reject(LineError e) {
            throw new IllegalStateException("rejected: " + e);
        }

        void flush() {
            if (!batch.isEmpty()) {
                session.submit(batch);
                batch.clear();
            }
        }
    }
}
