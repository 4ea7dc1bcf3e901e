package org.wayhold.journal;

import java.io.ByteArrayInputStream;
import java.io.Closeable;
import java.io.DataInputStream;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Path;
import java.util.ArrayDeque;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.LinkedHashMap;
import java.util.Map;
import java.util.Set;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.Executors;
import java.util.concurrent.ScheduledExecutorService;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicLong;
import java.util.function.LongConsumer;
import java.util.function.Supplier;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;
import org.wayhold.geo.Geodetic;
import org.wayhold.sample.Sample;
import org.wayhold.session.SessionLimitException;
import org.wayhold.session.SessionLog;
import org.wayhold.session.SessionRegistry;
import org.wayhold.session.VehicleQuarantinedException;
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
 * {@link VehicleSession#submit}, under the session's lock, and the session applies it only once the
 * record is durable, in the order recorded (write-ahead); so the journal holds each vehicle's batches
 * in application order, and a session is deterministic, so applying the same batches to its snapshot
 * rebuilds the same state. A snapshot captures each session under its lock with the sequence number of
 * the last record it applied: every earlier record of that vehicle is in the captured state and every
 * later one is not.
 *
 * <p>Replies kept for retries ({@link #recordReply}) ride along: they are no session state, but a
 * snapshot carries those still kept ({@link #keepRepliesFrom}) and recovery hands back those of the
 * snapshot and of the records after it ({@link #recoveredReplies}), so a kept reply outlives the segments
 * a start no longer reads.
 *
 * <p>Faults: a vehicle whose snapshot entry or journal records cannot be applied is quarantined and
 * every other vehicle is restored; a snapshot that fails for any reason (even running out of memory) is
 * reported in {@link #status()} and the log and tried again at the next interval.
 *
 * <p>Thread-safety: all methods may be called from any thread; snapshots are serialised.
 */
public final class SessionJournal implements Closeable {

    /**
     * What the journal is doing, for an admin view.
     *
     * @param writable          true while batches are written (false while a write failure lasts)
     * @param failure           kind of the write failure that makes writes refused now (the log has the
     *                          cause), or null
     * @param failedForS        wall time since writes started being refused (s), NaN while they are not
     * @param writeFailures     times writes started being refused since the start (count)
     * @param snapshotFailures  snapshots that failed since the start (count)
     * @param lastSnapshotAgeS  wall time since the last snapshot of this process (s), NaN before the first
     * @param lastSnapshotError the last snapshot's failure, or null when it succeeded
     */
    public record Status(Path dir, boolean writable, String failure, double failedForS, long writeFailures,
                         Journal.RecoveryReport recovery, long nextSeq, long snapshotsWritten, long snapshotFailures,
                         double lastSnapshotAgeS, String lastSnapshotError) {
    }

    private static final Logger LOG = LoggerFactory.getLogger(SessionJournal.class);

    /** Where snapshots take kept replies from until {@link #keepRepliesFrom} is called: nowhere. */
    private static final Supplier<List<Journal.KeptReply>> NO_REPLIES = List::of;

    private final Path dir;
    private final JournalSettings settings;
    private final Journal journal;
    private final SessionRegistry sessions;
    private final Journal.RecoveryReport recovery;
    private final List<Journal.KeptReply> recoveredReplies;
    private volatile Supplier<List<Journal.KeptReply>> keptReplies = NO_REPLIES;
    private final Object snapshotLock = new Object();
    private ScheduledExecutorService snapshots;
    private volatile long snapshotsWritten;
    private final AtomicLong snapshotFailures = new AtomicLong();
    private volatile long lastSnapshotNanos;
    private volatile String lastSnapshotError;
    private volatile boolean closed;

    private SessionJournal(Path dir, JournalSettings settings, Journal journal, SessionRegistry sessions,
                           Journal.RecoveryReport recovery, List<Journal.KeptReply> recoveredReplies) {
        this.dir = dir;
        this.settings = settings;
        this.journal = journal;
        this.sessions = sessions;
        this.recovery = recovery;
        this.recoveredReplies = recoveredReplies;
    }

    /** {@link #open(Path, Settings, Geodetic, JournalFiles)} on the operating system's file system. */
    public static SessionJournal open(Path dir, Settings settings, Geodetic configuredOrigin) throws IOException {
        return open(dir, settings, configuredOrigin, JournalFiles.SYSTEM);
    }

    /**
     * Opens the journal in {@code dir} (created when absent; its lock is taken, so a second service on
     * the same directory is refused), restores every session it holds into a new registry and makes that
     * registry record into it.
     *
     * @param settings         the sessions' settings; {@code journal} configures the files
     * @param configuredOrigin ENU origin for every session instead of its first fix, or null
     * @param files            how the journal writes its files (tests inject failures here)
     * @throws IOException when the directory cannot be read or written, another service holds it, or it
     *                     holds more sessions than {@code server.max_sessions}
     */
    public static SessionJournal open(Path dir, Settings settings, Geodetic configuredOrigin, JournalFiles files)
            throws IOException {
        Journal journal = Journal.open(dir, settings.journal(), files);
        SessionRegistry sessions = new SessionRegistry(settings, configuredOrigin, new SessionLog() {
            @Override
            public CompletableFuture<Long> batch(String vehicleId, List<? extends Sample> samples) {
                return journal.append(vehicleId, samples);
            }

            @Override
            public CompletableFuture<Long> delete(String vehicleId) {
                return journal.appendDelete(vehicleId);
            }

            @Override
            public long nextSequence() {
                return journal.nextSeq();
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

    /**
     * Replies found by recovery, oldest first: each once (the snapshot and a record after it may both
     * hold one), without those a later deletion of their vehicle voids and, oldest first, beyond a byte
     * bound (the service keeps no more than that anyway).
     */
    static final class Replies {
        private final long maxBytes;
        private final ArrayDeque<Journal.KeptReply> kept = new ArrayDeque<>();
        private final Set<Long> seqs = new HashSet<>();
        private long bytes;

        Replies(long maxBytes) {
            this.maxBytes = maxBytes;
        }

        void add(Journal.KeptReply r) {
            if (!seqs.add(r.seq())) {
                return;
            }
            kept.addLast(r);
            bytes += r.reply().length;
            while (bytes > maxBytes && !kept.isEmpty()) {
                Journal.KeptReply oldest = kept.pollFirst();
                bytes -= oldest.reply().length;
                seqs.remove(oldest.seq());
            }
        }

        /** Drops the vehicle's replies recorded before its deletion, record {@code seq}. */
        void voidVehicle(String vehicleId, long seq) {
            kept.removeIf(r -> {
                boolean drop = r.vehicleId().equals(vehicleId) && r.seq() < seq;
                if (drop) {
                    bytes -= r.reply().length;
                    seqs.remove(r.seq());
                }
                return drop;
            });
        }

        List<Journal.KeptReply> list() {
            return List.copyOf(kept);
        }
    }

    /** Applies what recovery reads, bypassing the log (it is already in the journal). */
    private record Restorer(SessionRegistry sessions, Replies replies) implements Journal.RecoveryTarget {

        @Override
        public void reply(Journal.KeptReply reply) {
            replies.add(reply);
        }

        @Override
        public void repliesVoided(String vehicleId, long seq) {
            replies.voidVehicle(vehicleId, seq);
        }

        @Override
        public void restore(String vehicleId, byte[] snapshot) throws IOException {
            restore(vehicleId, snapshot, -1);
        }

        @Override
        public void restore(String vehicleId, byte[] snapshot, long lastSeq) throws IOException {
            // A fresh session: an earlier attempt for this vehicle may have left a partial one.
            sessions.remove(vehicleId);
            VehicleSession s = create(vehicleId);
            try {
                s.readSnapshot(new DataInputStream(new ByteArrayInputStream(snapshot)), lastSeq);
            } catch (IOException e) {
                // Bytes that passed their checksum but do not make this vehicle's session (a settings or
                // version mismatch, a defect): recovery rebuilds it another way or quarantines it.
                sessions.remove(vehicleId);
                throw e;
            }
        }

        private VehicleSession create(String vehicleId) {
            try {
                return sessions.getOrCreate(vehicleId).session();
            } catch (SessionLimitException e) {
                // Not a fault of the data but of the settings: stop and say so.
                throw new UncheckedIOException(new IOException("the journal holds more sessions than "
                        + "server.max_sessions allows (" + e.getMessage() + "); raise the limit to restore them", e));
            }
        }

        @Override
        public void replay(String vehicleId, List<Sample> batch, long seq) {
            VehicleSession s = create(vehicleId);
            if (s.quarantineReason().isPresent()) {
                return;
            }
            try {
                s.replay(batch, seq);
            } catch (VehicleQuarantinedException e) {
                LOG.error("journal: vehicle '{}' quarantined while its journal was replayed: {}", vehicleId,
                        e.reason(), e.getCause());
            }
        }

        @Override
        public void delete(String vehicleId, long seq) {
            sessions.remove(vehicleId);
        }

        @Override
        public void quarantine(String vehicleId, String reason) {
            create(vehicleId).quarantine(reason);
        }
    }

    /** The registry to serve: restored, and recording every change in the journal. */
    public SessionRegistry sessions() {
        return sessions;
    }

    /** What {@link #open} restored, read around and lost. */
    public Journal.RecoveryReport recovery() {
        return recovery;
    }

    /**
     * Records a reply that the service keeps for retries of a vehicle's request, so that it survives a
     * restart ({@link #recoveredReplies}). Call after the request's batches were recorded.
     *
     * @param keep called with the record's sequence number once it is durable, before the journal
     *             counts it as written: it must put the reply where {@link #keepRepliesFrom}'s source
     *             finds it, so that a snapshot either carries the reply or recovery reads its record
     * @return completes once the reply is durable and {@code keep} has run
     */
    public CompletableFuture<Long> recordReply(String vehicleId, byte[] reply, LongConsumer keep) {
        return journal.appendReply(vehicleId, reply, keep);
    }

    /**
     * The replies that recovery found (those of the snapshot, then the records after it), oldest
     * first, without those of vehicles deleted after them; at most {@code ingest.idempotency_max_bytes}
     * of them.
     */
    public List<Journal.KeptReply> recoveredReplies() {
        return recoveredReplies;
    }

    /**
     * Where snapshots take the replies kept for retries (oldest first, each with the sequence number
     * of its record); none until this is called.
     */
    public void keepRepliesFrom(Supplier<List<Journal.KeptReply>> source) {
        keptReplies = source;
    }

    /**
     * Starts snapshots every {@code journal.snapshot_interval_s} of wall time on a background thread,
     * the first one at once when this start had to replay journal records: a service that crashes
     * more often than the interval would otherwise never write a snapshot, and replay a longer journal
     * at every start.
     */
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
        long firstMs = recovery.recordsReplayed() > 0 ? 0 : periodMs;
        snapshots.scheduleWithFixedDelay(this::snapshotQuietly, firstMs, periodMs, TimeUnit.MILLISECONDS);
    }

    /**
     * One scheduled snapshot. Whatever it throws is caught, even an Error such as running out of memory:
     * a scheduled task that throws is never run again, and the journal still holds everything, so only
     * the bound on replay time is lost until the next snapshot succeeds.
     */
    private void snapshotQuietly() {
        try {
            snapshot();
        } catch (Throwable e) {
            snapshotFailed(e);
        }
    }

    private void snapshotFailed(Throwable e) {
        lastSnapshotError = e.toString();
        snapshotFailures.incrementAndGet();
        LOG.error("journal {}: a snapshot failed, tried again in {} s (the journal still holds everything)", dir,
                settings.snapshotIntervalS(), e);
    }

    /**
     * Writes a snapshot of every session now, streamed to disk one session at a time, and lets the
     * journal drop segments it makes unnecessary.
     *
     * @return the number of sessions in the snapshot
     */
    public int snapshot() throws IOException {
        synchronized (snapshotLock) {
            // Read first: any record numbered below it belongs to a session captured below (applied, or
            // numbered above what it applied), or to a session deleted before it was captured.
            long floor = journal.nextSeq();
            // Every record below it is written or refused: a session captured below holds its own.
            long firstPending = journal.firstPendingSeq();
            Map<String, VehicleSession> byId = new LinkedHashMap<>();
            for (VehicleSession s : sessions.sessions()) {
                byId.put(s.vehicleId(), s);
            }
            // Read after firstPending: a reply whose record is numbered below it was kept before (see
            // recordReply); one numbered from it on is read again from its record at recovery.
            List<Journal.KeptReply> replies = keptReplies.get();
            int[] written = new int[1];
            journal.writeSnapshot(floor, firstPending, new ArrayList<>(byId.keySet()), (id, out) -> {
                VehicleSession.Captured c = byId.get(id).writeSnapshot(out);
                if (c == null) {
                    return null;
                }
                written[0]++;
                return new Journal.SnapshotEntry(c.lastSeq(), c.quarantineReason());
            }, replies);
            snapshotsWritten++;
            lastSnapshotNanos = System.nanoTime();
            lastSnapshotError = null;
            return written[0];
        }
    }

    /** Records this process has written to the journal (batches, deletions and kept replies), for metrics. */
    public long recordsWritten() {
        return journal.recordsWritten();
    }

    /** Bytes this process has written to the journal's segments, for metrics. */
    public long bytesWritten() {
        return journal.bytesWritten();
    }

    /** Snapshots that failed since the start (each is retried at the next interval). */
    public long snapshotFailures() {
        return snapshotFailures.get();
    }

    /** The journal's state for an admin view. */
    public Status status() {
        IOException failure = journal.failure().orElse(null);
        long last = lastSnapshotNanos;
        return new Status(dir, journal.writable() && !closed,
                failure == null ? (closed ? "closed" : null) : failure.getClass().getSimpleName(),
                journal.failedForS(), journal.writeFailures(), recovery, journal.nextSeq(), snapshotsWritten,
                snapshotFailures.get(), snapshotsWritten == 0 ? Double.NaN : (System.nanoTime() - last) / 1e9,
                lastSnapshotError);
    }

    /**
     * Stops the snapshots, takes a last one (so the next start replays nothing) and closes the journal,
     * which releases the directory. Call after serving has stopped. The journal is closed even when the
     * last snapshot fails; that failure is then thrown.
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
            snapshot();
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        } catch (IOException | RuntimeException | Error e) {
            snapshotFailed(e);
            throw e;
        } finally {
            journal.close();
        }
    }
}
