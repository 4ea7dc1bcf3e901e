package org.wayhold.journal;

import java.io.BufferedOutputStream;
import java.io.ByteArrayOutputStream;
import java.io.Closeable;
import java.io.DataOutput;
import java.io.DataOutputStream;
import java.io.IOException;
import java.io.InterruptedIOException;
import java.io.OutputStream;
import java.nio.ByteBuffer;
import java.nio.channels.Channels;
import java.nio.channels.FileChannel;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.nio.file.StandardOpenOption;
import java.util.ArrayList;
import java.util.EnumSet;
import java.util.List;
import java.util.Locale;
import java.util.Optional;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.LinkedBlockingQueue;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicLong;
import java.util.function.LongConsumer;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;
import org.wayhold.sample.Sample;
import org.wayhold.sample.SampleCodec;
import org.wayhold.settings.JournalSettings;

/**
 * An append-only journal of accepted sample batches with snapshots of all sessions.
 *
 * <p>Use: {@link #open} the directory (which takes its lock: one service per directory), {@link #recover}
 * into the sessions before serving, then {@link #append} each batch under the vehicle's lock and apply
 * it once the returned future completes (write-ahead: see {@code VehicleSession}). Thread-safe.
 *
 * <p>A failed write or force (a full disk, a failing device) fails the records it was writing and every
 * record queued behind them; none of them is acknowledged and none is applied. The journal then cuts
 * whatever of them reached the file and retries, at the next append and at least every
 * {@link #RETRY_INTERVAL_MS}; once a write succeeds again it writes a record naming the refused
 * sequence numbers (so that recovery does not take them for lost) and takes appends again, without a
 * restart.
 */
public final class Journal implements Closeable {

    static final String SEGMENT_PREFIX = "segment-";
    static final String SEGMENT_SUFFIX = ".wal";
    static final String SNAPSHOT_PREFIX = "snapshot-";
    static final String SNAPSHOT_SUFFIX = ".bin";
    /** Names the newest segment, so that a deleted newest segment shows (no gap can). */
    static final String HEAD_FILE = "journal.head";
    static final byte KIND_BATCH = 1;
    static final byte KIND_DELETE = 2;
    /** Sequence numbers from a given one up to this record's own were refused and never written. */
    static final byte KIND_REFUSED = 3;
    /**
     * A reply kept for retries of a request ({@link #appendReply}): no session state, it rides along so
     * that it survives a restart. (The earlier layout gave replies kind 3; this layout numbers records and
     * reads no earlier segment, so the byte is free to mean something else here.)
     */
    static final byte KIND_REPLY = 4;
    /** Longest wait between two attempts to write again after a failure (ms). */
    static final long RETRY_INTERVAL_MS = 1000;
    /** Shortest spacing of attempts triggered by appends (ms): a full disk is not hammered per request. */
    static final long MIN_RETRY_SPACING_MS = 100;

    private static final Logger LOG = LoggerFactory.getLogger(Journal.class);

    private final Path dir;
    private final JournalSettings settings;
    private final JournalFiles files;
    private final DataDirectoryLock lock;
    private final LinkedBlockingQueue<Pending> queue = new LinkedBlockingQueue<>();
    private final Object appendLock = new Object();
    private Thread writer;
    private volatile boolean closed;

    // Writer-thread state.
    private FileChannel segment;
    private Path segmentPath;
    /** Bytes written to the current segment so far (including records not yet forced). */
    private long segmentBytes;
    /** Bytes of the current segment known durable: a failure cuts the file back to this. */
    private long goodBytes;
    private long lastForceNanos;
    private long lastAttemptNanos;
    /** Highest sequence number whose record was refused, while failed. */
    private long lastRefusedSeq = -1;

    // Shared state, guarded by appendLock.
    private long nextSeq;
    private volatile IOException failure;
    private long refusedFromSeq = -1;
    private volatile long failedSinceNanos;

    /** The lowest sequence number not yet written or refused; only the writer advances it. */
    private final AtomicLong firstPending = new AtomicLong();
    private final AtomicLong recordsWritten = new AtomicLong();
    private final AtomicLong bytesWritten = new AtomicLong();
    private final AtomicLong writeFailures = new AtomicLong();

    private record Pending(long seq, byte[] frame, CompletableFuture<Long> done) {
    }

    /** Tells the writer to finish and stop. */
    private static final Pending CLOSE = new Pending(-1, new byte[0], new CompletableFuture<>());

    /**
     * Sequence numbers recovery could not restore, {@code fromSeq} to {@code toSeq} inclusive; when
     * {@code toKnown} is false the damage ran to the end of the journal and {@code toSeq} is
     * meaningless (every record from {@code fromSeq} on that the journal held is lost).
     */
    public record Loss(long fromSeq, long toSeq, boolean toKnown, String cause) {
        /** Records lost, or -1 when the end is not known. */
        public long count() {
            return toKnown ? toSeq - fromSeq + 1 : -1;
        }

        public String describe() {
            String seqs = !toKnown ? fromSeq + " and any after it"
                    : fromSeq == toSeq ? Long.toString(fromSeq) : fromSeq + " to " + toSeq;
            return "records " + seqs + " lost: " + cause;
        }
    }

    /**
     * What recovery found.
     *
     * @param recordsSkipped records already held by the snapshot (count)
     * @param bytesCut       bytes cut from the end of the last segment: a torn last record, or damage
     *                       at the end of the journal (bytes)
     * @param damagedBytes   bytes of damage left in place in older segments, read around (bytes)
     * @param lost           sequence numbers that nothing restored; empty when nothing acknowledged was lost
     * @param notes          one line per thing worth telling: cuts, damage, fallbacks, ignored files
     */
    public record RecoveryReport(int sessionsFromSnapshot, long snapshotFloorSeq, long recordsReplayed,
                                 long samplesReplayed, long recordsSkipped, long bytesCut, long damagedBytes,
                                 List<Loss> lost, List<String> notes) {
        public RecoveryReport {
            lost = List.copyOf(lost);
            notes = List.copyOf(notes);
        }
    }

    /** Where recovery puts what it reads. */
    public interface RecoveryTarget {
        /**
         * Restores one session from its snapshot bytes.
         *
         * @throws IOException when the bytes do not make a valid session; recovery then rebuilds that
         *                     vehicle from an older snapshot and the journal, or quarantines it
         */
        void restore(String vehicleId, byte[] snapshot) throws IOException;

        /** As {@link #restore(String, byte[])}, knowing the sequence of the last record the state holds. */
        default void restore(String vehicleId, byte[] snapshot, long lastSeq) throws IOException {
            restore(vehicleId, snapshot);
        }

        /** Re-applies one journaled batch. */
        void replay(String vehicleId, List<Sample> batch, long seq);

        /** Re-applies a journaled deletion of a session. */
        void delete(String vehicleId, long seq);

        /**
         * The vehicle's session cannot be rebuilt: hold it apart with this reason, and let later
         * records of it change nothing until a deletion.
         */
        default void quarantine(String vehicleId, String reason) {
        }

        /**
         * Hands over a kept reply ({@link #appendReply}), from the snapshot in use or a record read after
         * it, in journal order (those of the snapshot first). Replies are no session state: they come
         * whether or not the snapshot covers their record, and the same reply may come twice (from the
         * snapshot and from its record).
         */
        default void reply(KeptReply reply) {
        }

        /**
         * Says that a vehicle's session was deleted by record {@code seq}, whether or not a snapshot
         * covers the deletion: the vehicle's replies handed over with a lower sequence number are void.
         */
        default void repliesVoided(String vehicleId, long seq) {
        }
    }

    /**
     * A reply kept for retries (opaque bytes) and the sequence number of its record, so that a deletion
     * of the vehicle voids exactly the replies recorded before it.
     */
    public record KeptReply(String vehicleId, long seq, byte[] reply) {
    }

    /** What a snapshot holds of one session: the last record in its state, or why it is quarantined. */
    public record SnapshotEntry(long lastSeq, String quarantineReason) {
    }

    /** Writes the sessions of a snapshot, one at a time. */
    @FunctionalInterface
    public interface SnapshotSource {
        /**
         * Writes the vehicle's state to {@code out} (nothing when it is quarantined).
         *
         * @return what was written, or null to leave the vehicle out of the snapshot
         */
        SnapshotEntry write(String vehicleId, DataOutput out) throws IOException;
    }

    /** One session's part of a snapshot, for callers that hold it in memory already. */
    public record SessionSnapshot(String vehicleId, long lastSeq, byte[] state) {
    }

    private Journal(Path dir, JournalSettings settings, JournalFiles files, DataDirectoryLock lock) {
        this.dir = dir;
        this.settings = settings;
        this.files = files;
        this.lock = lock;
    }

    /** Opens (creating if needed) a journal directory on the operating system's file system. */
    public static Journal open(Path dir, JournalSettings settings) throws IOException {
        return open(dir, settings, JournalFiles.SYSTEM);
    }

    /**
     * Opens (creating if needed) a journal directory and takes its lock; call {@link #recover} next.
     *
     * @throws IOException when the directory cannot be created, or another service holds it (the message
     *                     names the directory and the holder's process id)
     */
    public static Journal open(Path dir, JournalSettings settings, JournalFiles files) throws IOException {
        Files.createDirectories(dir);
        return new Journal(dir, settings, files, DataDirectoryLock.acquire(dir));
    }

    /**
     * Reads the newest usable snapshot and every record after it into {@code target}, reading around
     * damage and reporting what it lost, and starts a fresh segment for new appends. Must be called once,
     * before appends. See {@link Recovery} for the rules.
     */
    public synchronized RecoveryReport recover(RecoveryTarget target) throws IOException {
        if (writer != null) {
            throw new IllegalStateException("journal already recovered");
        }
        Recovery.Result r = new Recovery(dir, target).run();
        for (Loss loss : r.report().lost()) {
            LOG.error("journal {}: {}", dir, loss.describe());
        }
        synchronized (appendLock) {
            nextSeq = r.nextSeq();
        }
        firstPending.set(nextSeq);
        segmentPath = dir.resolve(name(SEGMENT_PREFIX, nextSeq, SEGMENT_SUFFIX));
        segment = createSegment(segmentPath, nextSeq);
        segmentBytes = segment.size();
        goodBytes = segmentBytes;
        writer = new Thread(this::writeLoop, "wayhold-journal");
        writer.setDaemon(true);
        writer.start();
        return r.report();
    }

    /**
     * Queues a batch of one vehicle. Call under the vehicle's lock, so that the journal's order per
     * vehicle is the order of the calls. The future completes with the batch's sequence number once it
     * is written (and forced, when {@code fsync} is set), or exceptionally when the journal could not
     * write it: then it is not in the journal and must not be applied.
     */
    public CompletableFuture<Long> append(String vehicleId, List<? extends Sample> batch) {
        try {
            ByteArrayOutputStream bytes = new ByteArrayOutputStream(16 + 96 * batch.size());
            DataOutputStream out = new DataOutputStream(bytes);
            out.writeByte(KIND_BATCH);
            out.writeUTF(vehicleId);
            out.writeInt(batch.size());
            for (Sample s : batch) {
                SampleCodec.write(out, s);
            }
            out.flush();
            return enqueue(bytes.toByteArray());
        } catch (IOException e) {
            return CompletableFuture.failedFuture(e);
        }
    }

    /**
     * Queues a reply the service keeps for retries of a vehicle's request (opaque bytes); same contract
     * as {@link #append}. It is no session state: recovery hands it over wherever it lies
     * ({@link RecoveryTarget#reply}), and snapshots carry the replies still kept when they are written,
     * so that a reply outlives the segments a start no longer reads.
     *
     * @param whenDurable called with the record's sequence number once it is durable, on the writer's
     *                    thread and before the journal counts the record as written
     *                    ({@link #firstPendingSeq}): a snapshot that began after that point finds the
     *                    reply where {@code whenDurable} keeps it, and one that began before reads the
     *                    record again at recovery. The returned future completes after it has run.
     */
    public CompletableFuture<Long> appendReply(String vehicleId, byte[] reply, LongConsumer whenDurable) {
        try {
            ByteArrayOutputStream bytes = new ByteArrayOutputStream(16 + reply.length);
            DataOutputStream out = new DataOutputStream(bytes);
            out.writeByte(KIND_REPLY);
            out.writeUTF(vehicleId);
            out.writeInt(reply.length);
            out.write(reply);
            out.flush();
            return enqueue(bytes.toByteArray(), whenDurable);
        } catch (IOException e) {
            return CompletableFuture.failedFuture(e);
        }
    }

    /** Queues the deletion of a vehicle's session; same contract as {@link #append}. */
    public CompletableFuture<Long> appendDelete(String vehicleId) {
        try {
            ByteArrayOutputStream bytes = new ByteArrayOutputStream();
            DataOutputStream out = new DataOutputStream(bytes);
            out.writeByte(KIND_DELETE);
            out.writeUTF(vehicleId);
            out.flush();
            return enqueue(bytes.toByteArray());
        } catch (IOException e) {
            return CompletableFuture.failedFuture(e);
        }
    }

    private CompletableFuture<Long> enqueue(byte[] body) {
        return enqueue(body, null);
    }

    /**
     * @param body        the payload after the sequence number: kind and content
     * @param whenDurable run with the sequence number as the record becomes durable, or null
     */
    private CompletableFuture<Long> enqueue(byte[] body, LongConsumer whenDurable) {
        if (writer == null) {
            throw new IllegalStateException("recover the journal before appending");
        }
        byte[] frame = RecordFrame.allocate(8 + body.length);
        System.arraycopy(body, 0, frame, RecordFrame.KIND_OFFSET, body.length);
        CompletableFuture<Long> done = new CompletableFuture<>();
        // Attached before the record is queued, so the writer runs it inside complete(), before it moves
        // firstPending past the record.
        CompletableFuture<Long> result = whenDurable == null ? done : done.thenApply(seq -> {
            whenDurable.accept(seq);
            return seq;
        });
        // Closing also takes this lock, so nothing is queued behind the writer's last drain (a future
        // queued there would never complete and its request would hang). While failed, records are still
        // queued: the writer tries to write again before refusing them (at most every MIN_RETRY_SPACING_MS).
        synchronized (appendLock) {
            if (closed) {
                return CompletableFuture.failedFuture(new IOException("journal is closed"));
            }
            long seq = nextSeq++;
            ByteBuffer.wrap(frame).putLong(RecordFrame.SEQ_OFFSET, seq);
            queue.add(new Pending(seq, frame, done));
        }
        return result;
    }

    /** The failure that makes writes refused now, if any; empty again once writes resume. */
    public Optional<IOException> failure() {
        return Optional.ofNullable(failure);
    }

    /** True while appends are written (not closed and not failed). */
    public boolean writable() {
        return !closed && failure == null;
    }

    /** Wall time since writes started being refused (s), NaN while they are not. */
    public double failedForS() {
        IOException f = failure;
        return f == null ? Double.NaN : (System.nanoTime() - failedSinceNanos) / 1e9;
    }

    /** Times a write or force failed and writes started being refused, since the start (count). */
    public long writeFailures() {
        return writeFailures.get();
    }

    /** Waits for an appended batch to be durable; rethrows the journal's failure as IOException. */
    public static long await(CompletableFuture<Long> future) throws IOException {
        try {
            return future.get();
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            throw new InterruptedIOException("interrupted while waiting for the journal");
        } catch (ExecutionException e) {
            Throwable cause = e.getCause();
            throw cause instanceof IOException io ? io : new IOException(cause);
        }
    }

    /** Records (batches, deletions and kept replies) this process has written to segments, for metrics. */
    public long recordsWritten() {
        return recordsWritten.get();
    }

    /** Bytes of records, headers included, this process has written to segments, for metrics. */
    public long bytesWritten() {
        return bytesWritten.get();
    }

    /**
     * Every record numbered below this one has been written (and forced) or refused, and its future is
     * complete: a session captured after reading it has applied every record of its own below it.
     */
    public long firstPendingSeq() {
        return firstPending.get();
    }

    /** The sequence number the next append will get. */
    public long nextSeq() {
        synchronized (appendLock) {
            return nextSeq;
        }
    }

    private void writeLoop() {
        List<Pending> group = new ArrayList<>();
        boolean stop = false;
        while (!stop) {
            Pending first;
            try {
                if (failure == null) {
                    first = queue.take();
                } else {
                    long waitMs = RETRY_INTERVAL_MS - (System.nanoTime() - lastAttemptNanos) / 1_000_000;
                    first = queue.poll(Math.max(1, waitMs), TimeUnit.MILLISECONDS);
                    if (first == null) {
                        tryResume();
                        continue;
                    }
                }
                group.add(first);
                long waitNanos = (long) (settings.groupCommitMaxS() * 1e9) - (System.nanoTime() - lastForceNanos);
                if (first != CLOSE && failure == null && settings.fsync() && waitNanos > 0) {
                    // Forces are rate-limited: gather what arrives until the next force is due.
                    Thread.sleep(waitNanos / 1_000_000, (int) (waitNanos % 1_000_000));
                }
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
                refuse(group, new InterruptedIOException("journal writer interrupted"));
                closeQuietly();
                return;
            }
            queue.drainTo(group);
            while (group.remove(CLOSE)) {
                stop = true;
            }
            if (!group.isEmpty()) {
                boolean resumed = failure == null
                        || (System.nanoTime() - lastAttemptNanos >= MIN_RETRY_SPACING_MS * 1_000_000 && tryResume());
                if (!resumed) {
                    refuse(group, failure);
                } else {
                    writeGroup(group);
                }
            }
            group.clear();
        }
    }

    /** Writes a group and forces it; on failure refuses what was not yet durable. */
    private void writeGroup(List<Pending> group) {
        int durable = 0;
        try {
            for (int i = 0; i < group.size(); i++) {
                Pending p = group.get(i);
                if (segmentBytes >= settings.segmentBytes()) {
                    // Everything written to the full segment is forced first, and acknowledged, so that a
                    // failure further on never refuses a record that is durable in the old segment.
                    segment.force(true);
                    complete(group, durable, i);
                    durable = i;
                    rollOver(p.seq);
                }
                RecordFrame.seal(p.frame, p.seq);
                ByteBuffer b = ByteBuffer.wrap(p.frame);
                while (b.hasRemaining()) {
                    segment.write(b);
                }
                segmentBytes += p.frame.length;
            }
            if (settings.fsync()) {
                segment.force(false);
            }
            lastForceNanos = System.nanoTime();
            complete(group, durable, group.size());
        } catch (IOException | RuntimeException e) {
            IOException io = e instanceof IOException x ? x : new IOException(e.toString(), e);
            startRefusing(group.get(durable).seq, io);
            refuse(group.subList(durable, group.size()), io);
            cutBackQuietly();
        }
    }

    private void complete(List<Pending> group, int from, int to) {
        goodBytes = segmentBytes;
        long bytes = 0;
        for (int i = from; i < to; i++) {
            bytes += group.get(i).frame.length;
        }
        recordsWritten.addAndGet(to - from);
        bytesWritten.addAndGet(bytes);
        for (int i = from; i < to; i++) {
            group.get(i).done.complete(group.get(i).seq);
        }
        if (to > from) {
            firstPending.set(group.get(to - 1).seq + 1);
        }
    }

    private void startRefusing(long firstRefusedSeq, IOException cause) {
        synchronized (appendLock) {
            if (failure == null) {
                failure = cause;
                refusedFromSeq = firstRefusedSeq;
                failedSinceNanos = System.nanoTime();
                writeFailures.incrementAndGet();
                LOG.error("journal {}: a write failed; batches are refused with 503 (and not applied) until the"
                        + " journal can write again, retried at least every {} ms", dir, RETRY_INTERVAL_MS, cause);
            }
        }
        lastAttemptNanos = System.nanoTime();
    }

    /** Fails every record of the group: none of them is in the journal. */
    private void refuse(List<Pending> group, IOException cause) {
        for (Pending p : group) {
            lastRefusedSeq = Math.max(lastRefusedSeq, p.seq);
            p.done.completeExceptionally(cause);
        }
        if (!group.isEmpty()) {
            firstPending.set(Math.max(firstPending.get(), group.get(group.size() - 1).seq + 1));
        }
    }

    /** Cuts what a failed group left after the last durable byte, if the device lets it now. */
    private void cutBackQuietly() {
        try {
            segment.truncate(goodBytes);
            segmentBytes = goodBytes;
        } catch (IOException | RuntimeException e) {
            // Retried by tryResume, which must succeed in cutting before anything is written again.
        }
    }

    /**
     * Tries to write again after a failure: cuts the refused records' bytes from the segment, writes
     * the record naming them as refused, and forces it. Refused records must never reach a recovery
     * (their clients were told 503), so nothing is written before the cut succeeds.
     *
     * @return true when writes resumed
     */
    private boolean tryResume() {
        lastAttemptNanos = System.nanoTime();
        long refusedFrom;
        synchronized (appendLock) {
            refusedFrom = refusedFromSeq;
        }
        try {
            if (segment == null || !segment.isOpen()) {
                segment = files.open(segmentPath, EnumSet.of(StandardOpenOption.CREATE, StandardOpenOption.WRITE));
            }
            segment.truncate(goodBytes);
            segment.position(goodBytes);
            segment.force(true);
            segmentBytes = goodBytes;
            long lastRefused = Math.max(lastRefusedSeq, refusedFrom);
            byte[] frame = RecordFrame.allocate(8 + 1 + 8);
            ByteBuffer.wrap(frame).put(RecordFrame.KIND_OFFSET, KIND_REFUSED).putLong(RecordFrame.KIND_OFFSET + 1,
                    refusedFrom);
            // The marker takes the last refused number as its own: no record was ever written with it,
            // and every record after it in the file has a higher one.
            RecordFrame.seal(frame, lastRefused);
            ByteBuffer b = ByteBuffer.wrap(frame);
            while (b.hasRemaining()) {
                segment.write(b);
            }
            segment.force(true);
            segmentBytes += frame.length;
            goodBytes = segmentBytes;
            bytesWritten.addAndGet(frame.length);
            double seconds;
            synchronized (appendLock) {
                seconds = (System.nanoTime() - failedSinceNanos) / 1e9;
                failure = null;
                refusedFromSeq = -1;
            }
            lastRefusedSeq = -1;
            LOG.warn(String.format(Locale.ROOT, "journal %s: writes resumed after %.1f s; records %d to %d were"
                    + " refused (answered 503, not applied)", dir, seconds, refusedFrom, lastRefused));
            return true;
        } catch (IOException | RuntimeException e) {
            LOG.debug("journal {}: still cannot write: {}", dir, e.toString());
            return false;
        }
    }

    private void rollOver(long firstSeq) throws IOException {
        Path nextPath = dir.resolve(name(SEGMENT_PREFIX, firstSeq, SEGMENT_SUFFIX));
        FileChannel next = createSegment(nextPath, firstSeq);
        FileChannel old = segment;
        segment = next;
        segmentPath = nextPath;
        segmentBytes = 0;
        goodBytes = 0;
        try {
            old.close();
        } catch (IOException e) {
            // Its content was forced before the roll-over; a failing close loses nothing.
        }
    }

    /**
     * Creates (or reopens, when empty) a segment, makes its name durable (directory force) and records it
     * as the newest in the head file.
     */
    private FileChannel createSegment(Path path, long firstSeq) throws IOException {
        FileChannel ch = files.open(path, EnumSet.of(StandardOpenOption.CREATE, StandardOpenOption.WRITE,
                StandardOpenOption.APPEND));
        try {
            files.forceDirectory(dir);
            writeHead(firstSeq);
            return ch;
        } catch (IOException | RuntimeException e) {
            ch.close();
            throw e;
        }
    }

    private void writeHead(long newestSegmentSeq) throws IOException {
        Path head = dir.resolve(HEAD_FILE);
        Path tmp = dir.resolve(HEAD_FILE + ".tmp");
        String text = Recovery.headText(newestSegmentSeq);
        try (FileChannel ch = files.open(tmp, EnumSet.of(StandardOpenOption.CREATE, StandardOpenOption.WRITE,
                StandardOpenOption.TRUNCATE_EXISTING))) {
            ByteBuffer b = ByteBuffer.wrap(text.getBytes(StandardCharsets.US_ASCII));
            while (b.hasRemaining()) {
                ch.write(b);
            }
            ch.force(true);
        }
        Files.move(tmp, head, StandardCopyOption.ATOMIC_MOVE, StandardCopyOption.REPLACE_EXISTING);
        files.forceDirectory(dir);
    }

    /**
     * Writes a snapshot of sessions held in memory already; see {@link #writeSnapshot(long, List,
     * SnapshotSource)}.
     */
    public void writeSnapshot(long floorSeq, List<SessionSnapshot> sessions) throws IOException {
        List<String> ids = new ArrayList<>(sessions.size());
        for (SessionSnapshot s : sessions) {
            ids.add(s.vehicleId());
        }
        writeSnapshot(floorSeq, floorSeq, ids, (id, out) -> {
            SessionSnapshot s = sessions.get(ids.indexOf(id));
            out.write(s.state());
            return new SnapshotEntry(s.lastSeq(), null);
        }, List.of());
    }

    /**
     * Writes a snapshot without kept replies; see {@link #writeSnapshot(long, long, List, SnapshotSource,
     * List)}.
     */
    public void writeSnapshot(long floorSeq, long firstPendingSeq, List<String> vehicleIds, SnapshotSource source)
            throws IOException {
        writeSnapshot(floorSeq, firstPendingSeq, vehicleIds, source, List.of());
    }

    /**
     * Writes a snapshot of sessions to disk as a stream, one session at a time through a buffer into a
     * temporary file (so memory holds one session's state, not all of them), then the replies kept for
     * retries; forces it, renames it into place and forces the directory; then deletes segments and older
     * snapshots it makes unnecessary within the retention limits. On any failure the temporary file is
     * removed and the journal is as it was.
     *
     * @param floorSeq        {@link #nextSeq()} read before the first session was captured: every record
     *                        before it belongs to a session in the snapshot or to one deleted before it
     * @param firstPendingSeq {@link #firstPendingSeq()} read before the first session was captured (at
     *                        most {@code floorSeq}): a recovery from this snapshot needs no record before it
     * @param vehicleIds      the sessions to write, in this order
     * @param source          writes each session's state, with the sequence of the last record it holds
     * @param replies         the replies kept for retries, read after {@code firstPendingSeq}, oldest first
     */
    public synchronized void writeSnapshot(long floorSeq, long firstPendingSeq, List<String> vehicleIds,
                                           SnapshotSource source, List<KeptReply> replies) throws IOException {
        Path target = dir.resolve(name(SNAPSHOT_PREFIX, floorSeq, SNAPSHOT_SUFFIX));
        Path tmp = dir.resolve(target.getFileName() + ".tmp");
        boolean done = false;
        try {
            try (FileChannel ch = files.open(tmp, EnumSet.of(StandardOpenOption.CREATE, StandardOpenOption.WRITE,
                    StandardOpenOption.TRUNCATE_EXISTING))) {
                OutputStream out = new BufferedOutputStream(Channels.newOutputStream(ch), 64 * 1024);
                SnapshotFile.Writer w = new SnapshotFile.Writer(out, floorSeq, Math.min(floorSeq, firstPendingSeq));
                for (String id : vehicleIds) {
                    w.entry(id, source);
                }
                for (KeptReply r : replies) {
                    w.reply(r);
                }
                w.finish();
                ch.force(true);
            }
            Files.move(tmp, target, StandardCopyOption.ATOMIC_MOVE, StandardCopyOption.REPLACE_EXISTING);
            done = true;
        } finally {
            if (!done) {
                try {
                    Files.deleteIfExists(tmp);
                } catch (IOException | RuntimeException e) {
                    // Removed by the next recovery as a leftover of an interrupted snapshot.
                }
            }
        }
        files.forceDirectory(dir);
        applyRetention(floorSeq);
    }

    /**
     * Keeps the newest two snapshots and deletes older ones, then deletes segments whose every record
     * precedes the older kept snapshot's floor once they are older than the retention age or push the
     * journal past the retention size, oldest first. Two, because a snapshot that cannot be read at
     * the next start (a bad sector, a damaged copy of the directory) makes recovery fall back to the one
     * before it, and that one needs every record after its own floor; while there is only one snapshot,
     * no segment is deleted, since the fallback is then a replay from the start.
     *
     * @param floorSeq the floor of the snapshot just written (the newest)
     */
    private void applyRetention(long floorSeq) throws IOException {
        Recovery.Listing listing = Recovery.listing(dir);
        List<Path> snapshots = listing.snapshots();
        Path older = snapshots.size() < 2 ? null : snapshots.get(snapshots.size() - 2);
        boolean deleted = false;
        if (older != null) {
            long olderFloor = seqOf(older, SNAPSHOT_PREFIX, SNAPSHOT_SUFFIX);
            for (Path p : snapshots) {
                if (seqOf(p, SNAPSHOT_PREFIX, SNAPSHOT_SUFFIX) < Math.min(floorSeq, olderFloor)) {
                    deleted |= Files.deleteIfExists(p);
                }
            }
        }
        // A recovery from the older kept snapshot needs the records from its first pending one on.
        long keptFloor = older == null ? 0 : Math.min(floorSeq, SnapshotFile.firstNeededSeq(older));
        List<Path> segments = listing.segments();
        long total = 0;
        for (Path p : segments) {
            total += Files.size(p);
        }
        long now = System.currentTimeMillis();
        for (int i = 0; i + 1 < segments.size(); i++) {
            Path p = segments.get(i);
            long nextFirst = seqOf(segments.get(i + 1), SEGMENT_PREFIX, SEGMENT_SUFFIX);
            boolean coveredBySnapshot = nextFirst <= keptFloor;
            double ageS = (now - Files.getLastModifiedTime(p).toMillis()) / 1000.0;
            if (coveredBySnapshot && (ageS > settings.retentionAgeS() || total > settings.retentionBytes())) {
                total -= Files.size(p);
                Files.delete(p);
                deleted = true;
            }
        }
        if (deleted) {
            files.forceDirectory(dir);
        }
    }

    static String name(String prefix, long seq, String suffix) {
        return String.format(Locale.ROOT, "%s%020d%s", prefix, seq, suffix);
    }

    static long seqOf(Path p, String prefix, String suffix) {
        String n = p.getFileName().toString();
        return Long.parseLong(n.substring(prefix.length(), n.length() - suffix.length()));
    }

    private void closeQuietly() {
        try {
            if (segment != null && segment.isOpen()) {
                segment.close();
            }
        } catch (IOException e) {
            // Nothing more can be written anyway.
        }
    }

    /** Writes what is queued, forces it, stops the writer and releases the directory. */
    @Override
    public void close() throws IOException {
        synchronized (appendLock) {
            if (closed) {
                return;
            }
            closed = true;
        }
        IOException failed = null;
        try {
            if (writer != null) {
                queue.add(CLOSE);
                try {
                    writer.join();
                } catch (InterruptedException e) {
                    Thread.currentThread().interrupt();
                }
                failed = failure;
                if (segment != null && segment.isOpen()) {
                    try {
                        segment.force(true);
                    } finally {
                        segment.close();
                    }
                }
            }
        } finally {
            lock.close();
        }
        if (failed != null) {
            throw failed;
        }
    }
}
