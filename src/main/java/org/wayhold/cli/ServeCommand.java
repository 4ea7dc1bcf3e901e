package org.wayhold.cli;

import java.io.IOException;
import java.io.PrintWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.concurrent.Callable;
import java.util.concurrent.CountDownLatch;
import org.wayhold.config.ConfigLoader;
import org.wayhold.http.BindRule;
import org.wayhold.http.BoardService;
import org.wayhold.http.PoseBoard;
import org.wayhold.http.HttpService;
import org.wayhold.ingest.LineError;
import org.wayhold.journal.Journal;
import org.wayhold.journal.SessionJournal;
import org.wayhold.ingest.NdjsonReader;
import org.wayhold.ingest.SampleSink;
import org.wayhold.ingest.UnknownFields;
import org.wayhold.sample.Sample;
import org.wayhold.session.LogReplay;
import org.wayhold.session.SessionRegistry;
import org.wayhold.session.VehicleSession;
import org.wayhold.settings.ServerSettings;
import org.wayhold.settings.Settings;
import org.wayhold.stream.PoseTopicReader;
import org.wayhold.stream.SampleProducer;
import picocli.CommandLine.Command;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Option;
import picocli.CommandLine.ParameterException;
import picocli.CommandLine.Spec;

/**
 * {@code wayhold serve}: runs the HTTP service until SIGTERM or Ctrl-C, optionally replaying a recorded
 * log into one vehicle so that poses (and an outage) can be watched with no logging rig attached.
 *
 * <p>Start-up: the journal in {@code --data DIR} is locked (a second service on the same directory
 * exits with a message naming the holder's process id), recovered (every session restored, damage read
 * around, a torn last record cut) and reported, with any acknowledged records that could not be
 * restored and any vehicle quarantined, before the connector accepts a request. Every accepted batch and deletion is in the
 * journal before its reply; snapshots every {@code journal.snapshot_interval_s} bound what a restart
 * replays.
 *
 * <p>Before anything listens, {@link BindRule} checks the address: a non-loopback {@code --bind} needs write
 * tokens or {@code --insecure}.
 *
 * <p>With {@code --from-kafka} it runs no vehicle: it serves, read-only, the poses that {@code wayhold
 * worker} instances write to Kafka ({@link BoardService}).
 *
 * <p>Shutdown runs from the JVM's shutdown hook: the replay stops, pose streams end cleanly, the
 * connector stops accepting, requests in flight get up to ten seconds to finish, and a last snapshot
 * is written.
 */
@Command(name = "serve", mixinStandardHelpOptions = true,
        description = "Runs the HTTP service (default http://127.0.0.1:8470) until SIGTERM or Ctrl-C.")
final class ServeCommand implements Callable<Integer> {

    @Spec
    private CommandSpec spec;

    @Option(names = "--config", paramLabel = "FILE",
            description = "YAML settings; built-in defaults when the file does not exist (default: ${DEFAULT-VALUE}).")
    private Path config = Path.of("config", "wayhold.yaml");

    @Option(names = "--port", paramLabel = "N", description = "TCP port, overrides server.port (0 picks a free one).")
    private Integer port;

    @Option(names = "--bind", paramLabel = "ADDR", description = "Address to listen on, overrides server.bind.")
    private String bind;

    @Option(names = "--insecure",
            description = "Allows a non-loopback --bind without write tokens (anyone reaching it may write).")
    private boolean insecure;

    @Option(names = "--data", paramLabel = "DIR",
            description = "Journal of accepted samples; a restart on the same DIR restores every session "
                    + "(default: ${DEFAULT-VALUE}).")
    private Path data = Path.of("data");

    @Option(names = "--replay", paramLabel = "FILE",
            description = "Replays this NDJSON log (.gz allowed) into one vehicle in scaled real time.")
    private Path replay;

    @Option(names = "--speed", paramLabel = "X", defaultValue = "1",
            description = "Replay speed as a multiple of real time (default: ${DEFAULT-VALUE}).")
    private double speed;

    @Option(names = "--vehicle", paramLabel = "ID", defaultValue = "replay",
            description = "Vehicle id that the replay feeds (default: ${DEFAULT-VALUE}).")
    private String vehicle;

    @Option(names = "--from-kafka", paramLabel = "HOST:PORT",
            description = "Serves the poses that wayhold workers write to Kafka (worker.poses_topic) instead of "
                    + "running vehicles here: read routes, pose streams and the live view; no journal, no ingest.")
    private String fromKafka;

    @Option(names = "--to-kafka",
            description = "With --from-kafka: POST .../samples hands each body to the samples topic "
                    + "(worker.samples_topic) and replies 202 once the broker acknowledged it.")
    private boolean toKafka;

    @Override
    public Integer call() throws Exception {
        if (toKafka && fromKafka == null) {
            throw new ParameterException(spec.commandLine(), "--to-kafka: needs --from-kafka HOST:PORT (the cluster"
                    + " the workers read from)");
        }
        if (fromKafka != null) {
            return servePosesFromKafka();
        }
        PrintWriter out = spec.commandLine().getOut();
        if (!(speed > 0.0 && Double.isFinite(speed))) {
            throw new ParameterException(spec.commandLine(), "--speed: must be a positive number, was " + speed);
        }
        if (replay != null && !Files.isRegularFile(replay)) {
            throw new ParameterException(spec.commandLine(), "--replay: no such file " + replay);
        }
        Settings settings = checkedSettings();
        PrintWriter err = spec.commandLine().getErr();
        List<Sample> log = replay == null ? List.of() : readLog(replay, settings, out);

        // Every session is restored before the connector opens: no request sees a half-recovered state.
        long recoveryStart = System.nanoTime();
        SessionJournal journal = SessionJournal.open(data, settings, null);
        printRecovery(out, journal, (System.nanoTime() - recoveryStart) / 1e9);
        SessionRegistry sessions = journal.sessions();
        if (replay != null && sessions.find(vehicle).isPresent()) {
            // A replay starts its drive from the beginning: the session an earlier replay left in the
            // journal sits at a later time, and would refuse the replayed samples as late until the
            // replay caught up with it.
            sessions.delete(vehicle);
            out.println("replay: dropped the restored session of vehicle '" + vehicle + "' to replay from the start");
        }
        HttpService service;
        try {
            service = new HttpService(journal).start();
        } catch (RuntimeException e) {
            journal.close();
            throw e;
        }
        journal.startSnapshots();
        out.println("wayhold serving on " + service.baseUrl() + "  (Ctrl-C to stop)");

        LogReplay replayer = null;
        Thread replayThread = null;
        if (replay != null) {
            replayer = new LogReplay(log, speed, batch -> replayBatch(sessions, batch, err));
            LogReplay r = replayer;
            long replayStart = System.nanoTime();
            double staleAfterS = settings.outage().staleAfterS();
            replayThread = new Thread(() -> {
                r.run();
                if (r.completed()) {
                    // The vehicle now goes quiet; say so, so that a watcher knows why it turns stale.
                    out.printf(Locale.ROOT, "replay: the drive has ended: %d samples of %s replayed into vehicle"
                                    + " '%s' (vehicle time %s to %s s) in %.1f s; the vehicle shows as stale after"
                                    + " %s s without samples (outage.stale_after_s)%n", r.size(), replay, vehicle,
                            plain(r.firstT()), plain(r.lastT()), (System.nanoTime() - replayStart) / 1e9,
                            plain(staleAfterS));
                    out.flush();
                }
            }, "replay-" + vehicle);
            replayThread.setDaemon(true);
            replayThread.start();
            out.printf(java.util.Locale.ROOT, "replaying %d samples of %s into vehicle '%s' at %sx: %s/v1/vehicles/%s/pose%n",
                    log.size(), replay, vehicle, speed, service.baseUrl(), vehicle);
        }
        out.flush();

        CountDownLatch stopped = new CountDownLatch(1);
        LogReplay finalReplayer = replayer;
        Thread finalReplayThread = replayThread;
        Runtime.getRuntime().addShutdownHook(new Thread(() -> {
            if (finalReplayer != null) {
                finalReplayer.stop();
                finalReplayThread.interrupt();
            }
            try {
                service.stop();
            } catch (Throwable e) {
                out.println("http: stopping failed: " + e);
            }
            // After the last request: the final snapshot holds everything, so the next start replays nothing.
            // Whatever the snapshot throws (even running out of memory), the journal is closed and the
            // directory released, and the hook ends normally.
            try {
                journal.close();
                out.println("journal: closed with a snapshot of " + sessions.size() + " sessions");
            } catch (Throwable e) {
                out.println("journal: closing failed: " + e);
            }
            out.println("wayhold stopped");
            out.flush();
            stopped.countDown();
        }, "wayhold-shutdown"));
        stopped.await();
        return 0;
    }

    /** A number in plain decimal without a needless ".0" (epoch times included). */
    static String plain(double v) {
        if (!Double.isFinite(v)) {
            return Double.toString(v);
        }
        return new java.math.BigDecimal(Double.toString(v)).stripTrailingZeros().toPlainString();
    }

    /**
     * The read side of the fleet mode: a {@link PoseBoard} filled from the poses topic by a
     * {@link PoseTopicReader}, served by a {@link BoardService}, until SIGTERM or Ctrl-C.
     */
    private int servePosesFromKafka() throws Exception {
        WorkerCommand.checkBootstrap(spec, "--from-kafka", fromKafka);
        if (replay != null) {
            throw new ParameterException(spec.commandLine(), "--replay: not with --from-kafka, which runs no vehicle"
                    + " here (send the log to the samples topic instead)");
        }
        PrintWriter out = spec.commandLine().getOut();
        Settings settings = checkedSettings();
        PoseBoard board = new PoseBoard(settings.history().maxPoses(), settings.outage().staleAfterS(),
                java.time.Clock.systemUTC());
        PoseTopicReader reader = new PoseTopicReader(fromKafka, settings.worker(), board).start();
        SampleProducer producer = toKafka ? new SampleProducer(fromKafka, settings.worker()) : null;
        BoardService service;
        try {
            service = new BoardService(settings.server(), board, "kafka topic " + settings.worker().posesTopic()
                    + " at " + fromKafka, producer).start();
        } catch (RuntimeException e) {
            reader.close();
            if (producer != null) {
                producer.close();
            }
            throw e;
        }
        out.println("wayhold serving on " + service.baseUrl() + "  (poses from kafka topic "
                + settings.worker().posesTopic() + (toKafka ? ", samples to " + settings.worker().samplesTopic() : "")
                + " at " + fromKafka + "; Ctrl-C to stop)");
        out.flush();
        CountDownLatch stopped = new CountDownLatch(1);
        Runtime.getRuntime().addShutdownHook(new Thread(() -> {
            service.close();
            reader.close();
            if (producer != null) {
                producer.close();
            }
            out.println("wayhold stopped");
            out.flush();
            stopped.countDown();
        }, "wayhold-shutdown"));
        stopped.await();
        return 0;
    }

    /**
     * One line of what was restored; then whether anything acknowledged was lost (and which records), the
     * vehicles quarantined, and one line per note (cuts, damage read around, fallbacks, ignored files).
     */
    private void printRecovery(PrintWriter out, SessionJournal journal, double seconds) {
        Journal.RecoveryReport r = journal.recovery();
        out.printf(Locale.ROOT, "journal %s: restored %d sessions (%d from the snapshot at record %d, "
                        + "then %d records with %d samples replayed, %d already in the snapshot), cut %d bytes"
                        + " in %.3f s%n",
                data, journal.sessions().size(), r.sessionsFromSnapshot(), r.snapshotFloorSeq(), r.recordsReplayed(),
                r.samplesReplayed(), r.recordsSkipped(), r.bytesCut(), seconds);
        if (r.lost().isEmpty()) {
            out.println("journal: nothing acknowledged was lost");
        }
        for (Journal.Loss loss : r.lost()) {
            out.println("journal: LOST " + loss.describe());
        }
        for (VehicleSession s : journal.sessions().sessions()) {
            s.quarantineReason().ifPresent(reason -> out.println("journal: vehicle '" + s.vehicleId()
                    + "' is QUARANTINED (its requests are answered 503 until it is deleted): " + reason));
        }
        for (String note : r.notes()) {
            out.println("journal: " + note);
        }
        out.flush();
    }

    /**
     * One batch of the replay, applied once durable like a request's. A batch the journal refuses is
     * skipped (the replay is a demonstration; the log says why).
     */
    private void replayBatch(SessionRegistry sessions, List<Sample> batch, PrintWriter err) {
        try {
            sessions.submit(vehicle, batch).awaitRecorded();
        } catch (IOException | RuntimeException e) {
            err.println("replay: a batch was not applied: " + e.getMessage());
            err.flush();
        }
    }

    private Settings withOverrides(Settings s) {
        if (port == null && bind == null) {
            return s;
        }
        ServerSettings v = s.server();
        ServerSettings server = v.withAddress(port != null ? port : v.port(), bind != null ? bind : v.bind());
        return s.withServer(server);
    }

    private static List<Sample> readLog(Path file, Settings settings, PrintWriter out) throws IOException {
        List<Sample> samples = new ArrayList<>();
        long[] rejected = new long[1];
        new NdjsonReader(settings.server().maxLineBytes(), settings.ingest()).readPath(file, new SampleSink() {
            @Override
            public void accept(long line, Sample s) {
                samples.add(s);
            }

            @Override
            public void reject(LineError e) {
                if (rejected[0]++ < 5) {
                    out.println("replay: " + file + " line " + e.line() + " skipped: " + e.detail());
                }
            }

            @Override
            public void unknownFields(UnknownFields u) {
                out.println("replay: " + file + ": " + u.describe());
            }
        });
        if (rejected[0] > 0) {
            out.println("replay: " + rejected[0] + " lines skipped in total");
        }
        return samples;
    }

    /** The settings with the command line's overrides, refused if the bind rule refuses them; its warnings on stderr. */
    private Settings checkedSettings() throws IOException {
        Settings settings = withOverrides(ConfigLoader.loadOrDefaults(config));
        List<String> warnings;
        try {
            warnings = BindRule.check(settings.server(), insecure);
        } catch (BindRule.Refused e) {
            throw new ParameterException(spec.commandLine(), e.getMessage());
        }
        PrintWriter err = spec.commandLine().getErr();
        for (String w : warnings) {
            err.println(w);
        }
        err.flush();
        return settings;
    }
}
