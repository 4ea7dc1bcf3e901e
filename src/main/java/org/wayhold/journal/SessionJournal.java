package org.wayhold.journal;

import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.Closeable;
import java.io.DataInputStream;
import java.io.DataOutputStream;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.OptionalLong;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.Executors;
import java.util.concurrent.ScheduledExecutorService;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicBoolean;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;
import org.wayhold.geo.Geodetic;
import org.wayhold.sample.Sample;
import org.wayhold.session.SessionLimitException;
import org.wayhold.session.SessionLog;
import org.wayhold.session.SessionRegistry;
import org.wayhold.session.VehicleSession;
import org.wayhold.settings.JournalSettings;
import org.wayhold.settings.Settings;

/**
 * A {@link SessionRegistry} whose every change is in a {@link Journal}: what the service acknowledged
 * survives a crash, and a restart on the same directory brings every session back bit for bit.
 *
 * <p>Use: {@link #open} recovers the sessions (before anything is served), {@link #sessions()} is the
 * registry to serve, {@link #startSnapshots()} starts the periodic snapshots, {@link #close()} takes a
 * last snapshot and closes the journal once serving has stopped.
 *
 * <p>Why recovery is exact: the registry records each batch exactly as it handed it to
 * {@link VehicleSession#submit}, under the session's lock, so the journal holds each vehicle's batches in
 * application order; a session is deterministic, so applying the same batches to its snapshot rebuilds
 * the same state. A snapshot captures each session under its lock together with the journal's next
 * sequence at that moment: every earlier record of that vehicle is in the captured state and every
 * later one is not.
 *
 * <p>Thread-safety: all methods may be called from any thread; snapshots are serialised.
 */
public final class SessionJournal implements Closeable {

    /**
     * What the journal is doing, for an admin view.
     *
     * @param failure           kind of the write failure that stopped the journal (the log has the
     *                          cause), or null
     * @param lastSnapshotAgeS  wall time since the last snapshot of this process (s), NaN before the first
     * @param lastSnapshotError the last periodic snapshot's failure, or null when it succeeded
     */
    public record Status(Path dir, boolean writable, String failure, Journal.RecoveryReport recovery,
                         long nextSeq, long snapshotsWritten, double lastSnapshotAgeS, String lastSnapshotError) {
    }

    /** A reply kept for retries that recovery found in the journal ({@link #recordReply}). */
    public record RecoveredReply(String vehicleId, byte[] reply) {
    }

    private final Path dir;
    private final JournalSettings settings;
    private final Journal journal;
    private final SessionRegistry sessions;
    private final Journal.RecoveryReport recovery;
    private final List<RecoveredReply> recoveredReplies;
    private final Object snapshotLock = new Object();
    private ScheduledExecutorService snapshots;
    private volatile long snapshotsWritten;
    private final java.util.concurrent.atomic.AtomicLong snapshotFailures = new java.util.concurrent.atomic.AtomicLong();
    private volatile long lastSnapshotNanos;
    private volatile String lastSnapshotError;
    private volatile boolean closed;

    private SessionJournal(Path dir, JournalSettings settings, Journal journal, SessionRegistry sessions,
                           Journal.RecoveryReport recovery, List<RecoveredReply> recoveredReplies) {
        this.dir = dir;
        this.settings = settings;
        this.journal = journal;
        this.sessions = sessions;
        this.recovery = recovery;
        this.recoveredReplies = recoveredReplies;
    }

    /**
     * Opens the journal in {@code dir} (created when absent), restores every session it holds into a new
     * registry and makes that registry record into it.
     *
     * @param settings         the sessions' settings; {@code journal} configures the files
     * @param configuredOrigin ENU origin for every session instead of its first fix, or null
     * @throws IOException when the directory cannot be read or written, or a snapshot does not fit these
     *                     settings
     */
    public static SessionJournal open(Path dir, Settings settings, Geodetic configuredOrigin) throws IOException {
        Journal journal = Journal.open(dir, settings.journal());
        AtomicBoolean failureLogged = new AtomicBoolean();
        SessionRegistry sessions = new SessionRegistry(settings, configuredOrigin, new SessionLog() {
            @Override
            public CompletableFuture<?> batch(String vehicleId, List<? extends Sample> samples) {
                return logFirstFailure(journal.append(vehicleId, samples), failureLogged);
            }

            @Override
            public CompletableFuture<?> delete(String vehicleId) {
                return logFirstFailure(journal.appendDelete(vehicleId), failureLogged);
            }
        });
        Journal.RecoveryReport report;
        boolean recovered = false;
        Restorer restorer = new Restorer(sessions, new Replies(settings.ingest().idempotencyMaxBytes()));
        try {
            report = journal.recover(restorer);
            recovered = true;
        } catch (UncheckedIOException e) {
            throw e.getCause();
        } finally {
            if (!recovered) {
                journal.close();
            }
        }
        return new SessionJournal(dir, settings.journal(), journal, sessions, report, restorer.replies().list());
    }

    private static final Logger LOG = LoggerFactory.getLogger(SessionJournal.class);

    /** Logs the journal's first write failure with its cause; every later append fails the same way. */
    private static CompletableFuture<Long> logFirstFailure(CompletableFuture<Long> appended, AtomicBoolean logged) {
        appended.whenComplete((seq, error) -> {
            if (error != null && logged.compareAndSet(false, true)) {
                LOG.error("journal: a write failed; writes are refused with 503 until a restart", error);
            }
        });
        return appended;
    }

    /**
     * Replies found by recovery, in journal order, dropped when their vehicle's deletion follows and,
     * oldest first, beyond a byte bound (the service keeps no more than that anyway).
     */
    private static final class Replies {
        private final long maxBytes;
        private final java.util.ArrayDeque<RecoveredReply> kept = new java.util.ArrayDeque<>();
        private long bytes;

        Replies(long maxBytes) {
            this.maxBytes = maxBytes;
        }

        void add(RecoveredReply r) {
            kept.addLast(r);
            bytes += r.reply().length;
            while (bytes > maxBytes && !kept.isEmpty()) {
                bytes -= kept.pollFirst().reply().length;
            }
        }

        void voidVehicle(String vehicleId) {
            kept.removeIf(r -> {
                boolean drop = r.vehicleId().equals(vehicleId);
                if (drop) {
                    bytes -= r.reply().length;
                }
                return drop;
            });
        }

        List<RecoveredReply> list() {
            return List.copyOf(kept);
        }
    }

    /** Applies what recovery reads, bypassing the log (it is already in the journal). */
    private record Restorer(SessionRegistry sessions, Replies replies) implements Journal.RecoveryTarget {

        @Override
        public void reply(String vehicleId, byte[] reply) {
            replies.add(new RecoveredReply(vehicleId, reply));
        }

        @Override
        public void repliesVoided(String vehicleId) {
            replies.voidVehicle(vehicleId);
        }

        @Override
        public void restore(String vehicleId, byte[] snapshot) {
            try {
                VehicleSession s = sessions.getOrCreate(vehicleId).session();
                s.readSnapshot(new DataInputStream(new ByteArrayInputStream(snapshot)));
            } catch (IOException e) {
                // Not an IOException on purpose: the journal would fall back to an older snapshot on top of
                // the sessions already restored from this one. A snapshot whose bytes passed their
                // checksum but do not fit the session is a settings or version mismatch: stop and say so.
                throw new UncheckedIOException(new IOException("snapshot of vehicle '" + vehicleId
                        + "' does not fit this version or these settings: " + e.getMessage(), e));
            } catch (SessionLimitException e) {
                throw tooMany(e);
            }
        }

        private static UncheckedIOException tooMany(SessionLimitException e) {
            return new UncheckedIOException(new IOException("the journal holds more sessions than "
                    + "server.max_sessions allows (" + e.getMessage() + "); raise the limit to restore them", e));
        }

        @Override
        public void replay(String vehicleId, List<Sample> batch, long seq) {
            try {
                sessions.getOrCreate(vehicleId).session().submit(batch);
            } catch (SessionLimitException e) {
                throw tooMany(e);
            }
        }

        @Override
        public void delete(String vehicleId, long seq) {
            sessions.remove(vehicleId);
        }
    }

    /** The registry to serve: restored, and recording every change in the journal. */
    public SessionRegistry sessions() {
        return sessions;
    }

    /**
     * Records a reply that the service keeps for retries of a vehicle's request, so that it survives a
     * restart ({@link #recoveredReplies}); the future completes once it is durable. Call after the
     * request's batches were recorded.
     */
    public CompletableFuture<?> recordReply(String vehicleId, byte[] reply) {
        return journal.appendReply(vehicleId, reply);
    }

    /**
     * The replies recorded by {@link #recordReply} that the journal still holds, oldest first, without
     * those of vehicles deleted after them; at most {@code ingest.idempotency_max_bytes} of them.
     */
    public List<RecoveredReply> recoveredReplies() {
        return recoveredReplies;
    }

    /** What {@link #open} restored and cut. */
    public Journal.RecoveryReport recovery() {
        return recovery;
    }

    /** Starts snapshots every {@code journal.snapshot_interval_s} of wall time on a background thread. */
    public synchronized void startSnapshots() {
        if (snapshots != null || closed) {
            return;
        }
        snapshots = Executors.newSingleThreadScheduledExecutor(r -> {
            Thread t = new Thread(r, "wayhold-snapshots");
            t.setDaemon(true);
            return t;
        });
        long periodMs = Math.max(1, Math.round(settings.snapshotIntervalS() * 1000.0));
        snapshots.scheduleWithFixedDelay(this::snapshotQuietly, periodMs, periodMs, TimeUnit.MILLISECONDS);
    }

    private void snapshotQuietly() {
        try {
            snapshot();
        } catch (IOException | RuntimeException e) {
            // The journal still holds everything; only the bound on replay time is lost until the next one.
            lastSnapshotError = e.toString();
            snapshotFailures.incrementAndGet();
        }
    }

    /**
     * Writes a snapshot of every session now and lets the journal drop segments it makes unnecessary.
     *
     * @return the number of sessions in the snapshot
     */
    public int snapshot() throws IOException {
        synchronized (snapshotLock) {
            // Read first: any record numbered below it belongs to a session captured below, or to a session
            // deleted before it was captured (whose deletion record then comes later).
            long floor = journal.nextSeq();
            List<Journal.SessionSnapshot> captured = new ArrayList<>();
            for (VehicleSession s : sessions.sessions()) {
                String id = s.vehicleId();
                ByteArrayOutputStream bytes = new ByteArrayOutputStream(64 * 1024);
                // Every record of this vehicle so far was queued under the session's lock, so it is numbered
                // below the number read under it; every later one will be numbered at or above it.
                OptionalLong at = s.writeSnapshot(new DataOutputStream(bytes), () -> journal.nextSeq() - 1);
                if (at.isEmpty()) {
                    continue;
                }
                long lastSeq = at.getAsLong();
                captured.add(new Journal.SessionSnapshot(id, lastSeq, bytes.toByteArray()));
            }
            journal.writeSnapshot(floor, captured);
            snapshotsWritten++;
            lastSnapshotNanos = System.nanoTime();
            lastSnapshotError = null;
            return captured.size();
        }
    }

    /** Records this process has written to the journal (batches and deletions), for metrics. */
    public long recordsWritten() {
        return journal.recordsWritten();
    }

    /** Bytes this process has written to the journal's segments, for metrics. */
    public long bytesWritten() {
        return journal.bytesWritten();
    }

    /** Periodic snapshots that failed since the start (each is retried at the next interval). */
    public long snapshotFailures() {
        return snapshotFailures.get();
    }

    /** The journal's state for an admin view. */
    public Status status() {
        IOException failure = journal.failure().orElse(null);
        long last = lastSnapshotNanos;
        return new Status(dir, failure == null && !closed, failure == null ? null : failure.getClass().getSimpleName(),
                recovery,
                journal.nextSeq(), snapshotsWritten, snapshotsWritten == 0 ? Double.NaN
                : (System.nanoTime() - last) / 1e9, lastSnapshotError);
    }

    /**
     * Stops the snapshots, takes a last one (so the next start replays nothing) unless the journal has
     * failed, and closes the journal. Call after serving has stopped.
     */
    @Override
    public void close() throws IOException {
        synchronized (this) {
            if (closed) {
                return;
            }
            closed = true;
            if (snapshots != null) {
                // No interrupt: a snapshot being written is let finish rather than torn.
                snapshots.shutdown();
            }
        }
        try {
            if (snapshots != null) {
                snapshots.awaitTermination(30, TimeUnit.SECONDS);
            }
            if (journal.failure().isEmpty()) {
                snapshot();
            }
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        } finally {
            journal.close();
        }
    }
}
