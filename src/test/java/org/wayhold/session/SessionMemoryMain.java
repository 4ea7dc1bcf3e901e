package org.wayhold.session;

import java.io.ByteArrayInputStream;
import java.io.IOException;
import java.io.InputStream;
import java.lang.management.ManagementFactory;
import java.lang.ref.Reference;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.zip.GZIPInputStream;
import org.wayhold.ingest.LineError;
import org.wayhold.ingest.NdjsonReader;
import org.wayhold.ingest.SampleSink;
import org.wayhold.sample.Sample;
import org.wayhold.settings.HistorySettings;
import org.wayhold.settings.Settings;

/**
 * Heap held per idle vehicle session with the default settings: N sessions each replay the whole
 * {@code two-tunnels} demo drive (or a given log) in batches of
 * 200, then the used heap after full collections is compared with the heap before. Not a test: run
 * by hand (bench/README.md); it prints the figures.
 *
 * <p>Usage: {@code SessionMemoryMain [N] [pauseS] [LOG] [maxPoses]}; LOG (NDJSON, gzip when it ends in
 * .gz) replaces the demo drive, e.g. a longer one from {@code simulate}; maxPoses replaces the default
 * history.max_poses. With pauseS > 0 it waits that long at the end so a
 * class histogram can be taken ({@code jmap -histo:live PID}).
 */
public final class SessionMemoryMain {

    private SessionMemoryMain() {
    }

    public static void main(String[] args) throws Exception {
        int n = args.length > 0 ? Integer.parseInt(args[0]) : 50;
        int pauseS = args.length > 1 ? Integer.parseInt(args[1]) : 0;
        if (n < 1 || n > 2000 || pauseS < 0 || pauseS > 120) {
            throw new IllegalArgumentException("N in 1..2000 and pauseS in 0..120");
        }
        byte[] log = read(Path.of(args.length > 2 ? args[2] : "sample-logs/two-tunnels.ndjson.gz"));
        Settings settings = Settings.defaults();
        if (args.length > 3) {
            Settings d = settings;
            settings = new Settings(d.server(), d.filter(), d.gating(), d.outage(), d.ordering(),
                    new HistorySettings(d.history().intervalS(), Integer.parseInt(args[3])), d.vehicles());
        }
        // One session first and dropped: classes, interned strings and caches it loads are not per session.
        feed(log, new VehicleSession("warm-up", settings, null));
        long before = usedAfterGc();
        List<VehicleSession> sessions = new ArrayList<>(n);
        long samples = 0;
        for (int i = 0; i < n; i++) {
            // Each session parses its own samples, as over HTTP, so the samples it keeps are its own.
            VehicleSession s = new VehicleSession("v" + i, settings, null);
            samples = feed(log, s);
            sessions.add(s);
        }
        long after = usedAfterGc();
        SessionStats st = sessions.get(0).stats();
        System.out.printf("sessions %d, samples each %d, history poses %d, fixes %d%n", n, samples,
                st.historySize(), sessions.get(0).fixes(Double.NEGATIVE_INFINITY, Double.POSITIVE_INFINITY).size());
        System.out.printf("heap after GC: before %.1f MiB, after %.1f MiB, per session %.1f KB%n",
                before / 1048576.0, after / 1048576.0, (after - before) / (double) n / 1000.0);
        if (pauseS > 0) {
            System.out.println("pid " + ProcessHandle.current().pid() + ", waiting " + pauseS + " s");
            Thread.sleep(pauseS * 1000L);
        }
        Reference.reachabilityFence(sessions);
    }

    private static long usedAfterGc() throws InterruptedException {
        for (int i = 0; i < 4; i++) {
            System.gc();
            Thread.sleep(100);
        }
        return ManagementFactory.getMemoryMXBean().getHeapMemoryUsage().getUsed();
    }

    private static byte[] read(Path log) throws IOException {
        try (InputStream raw = Files.newInputStream(log);
             InputStream in = log.toString().endsWith(".gz") ? new GZIPInputStream(raw) : raw) {
            return in.readAllBytes();
        }
    }

    /** Parses the log into the session in batches of 200; returns the samples read. */
    private static long feed(byte[] log, VehicleSession session) throws IOException {
        List<Sample> batch = new ArrayList<>(200);
        long[] count = {0};
        new NdjsonReader().read(new ByteArrayInputStream(log), new SampleSink() {
            @Override
            public void accept(long line, Sample s) {
                batch.add(s);
                count[0]++;
                if (batch.size() == 200) {
                    session.submit(batch);
                    batch.clear();
                }
            }

            @Override
            public void reject(LineError e) {
                throw new IllegalStateException(e.toString());
            }
        });
        session.submit(batch);
        return count[0];
    }
}
