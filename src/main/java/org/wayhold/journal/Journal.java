package org.wayhold.journal;

import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.Closeable;
import java.io.DataInputStream;
import java.io.DataOutputStream;
import java.io.IOException;
import java.io.InterruptedIOException;
import java.nio.ByteBuffer;
import java.nio.channels.FileChannel;
import java.nio.file.DirectoryStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.nio.file.StandardOpenOption;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.LinkedBlockingQueue;
import java.util.concurrent.atomic.AtomicLong;
import java.util.zip.CRC32C;
import org.wayhold.sample.Sample;
import org.wayhold.sample.SampleCodec;
import org.wayhold.settings.JournalSettings;

/**
 * An append-only journal of accepted sample batches with snapshots of all sessions.
 *
 * <p>Use: {@link #open} the directory, {@link #recover} into the sessions before serving, then
 * {@link #append} each accepted batch under the vehicle's lock (so the journal's order per vehicle is
 * the order the session applied) and wait on the returned future before replying. Thread-safe.
 */
public final class Journal implements Closeable {

    private static final String SEGMENT_PREFIX = "segment-";
    private static final String SEGMENT_SUFFIX = ".wal";
    private static final String SNAPSHOT_PREFIX = "snapshot-";
    private static final String SNAPSHOT_SUFFIX = ".bin";
    private static final int SNAPSHOT_MAGIC = 0x57485331; // "WHS1"
    private static final byte KIND_BATCH = 1;
    private static final byte KIND_DELETE = 2;
    /** A reply kept for retries: no session state, it rides along so that it survives a restart. */
    private static final byte KIND_REPLY = 3;
    /** Largest record accepted when reading (bytes): anything longer is a corrupt length field. */
    private static final int MAX_RECORD_BYTES = 256 * 1024 * 1024;
    private static final int HEADER_BYTES = 8;

    private final Path dir;
    private final JournalSettings settings;
    private final LinkedBlockingQueue<Pending> queue = new LinkedBlockingQueue<>();
    private final Object appendLock = new Object();
    private Thread writer;
    private FileChannel segment;
    private long segmentFirstSeq;
    private long nextSeq;
    private volatile boolean closed;
    private volatile IOException failure;
    private long lastForceNanos;
    /** Written (and forced, with fsync) by this process; only the writer thread adds. */
    private final AtomicLong recordsWritten = new AtomicLong();
    private final AtomicLong bytesWritten = new AtomicLong();

    private record Pending(long seq, byte[] record, CompletableFuture<Long> done) {
    }

    /** What recovery found. */
    public record RecoveryReport(int sessionsFromSnapshot, long snapshotFloorSeq, long recordsReplayed,
                                 long samplesReplayed, long recordsSkipped, long bytesCut, List<String> notes) {
    }

    /** Where recovery puts what it reads. */
    public interface RecoveryTarget {
        /** Restores one session from its snapshot bytes. */
        void restore(String vehicleId, byte[] snapshot) throws IOException;

        /** Re-applies one journaled batch. */
        void replay(String vehicleId, List<Sample> batch, long seq);

        /** Re-applies a journaled deletion of a session. */
        void delete(String vehicleId, long seq);

        /**
         * Hands over a journaled reply ({@link #appendReply}). Replies are no session state, so every
         * reply record still in the journal comes here, in journal order, whether or not a snapshot
         * covers its position.
         */
        default void reply(String vehicleId, byte[] reply) {
        }

        /**
         * Says that a vehicle's session was deleted at this point of the journal, whether or not a
         * snapshot covers the deletion: the replies handed over for it before are void.
         */
        default void repliesVoided(String vehicleId) {
        }
    }

    /** One session's part of a snapshot. */
    public record SessionSnapshot(String vehicleId, long lastSeq, byte[] state) {
    }

    private Journal(Path dir, JournalSettings settings) {
        this.dir = dir;
        this.settings = settings;
    }

    /** Opens (creating if needed) a journal directory; call {@link #recover} next. */
    public static Journal open(Path dir, JournalSettings settings) throws IOException {
        Files.createDirectories(dir);
        return new Journal(dir, settings);
    }

    /**
     * Reads the newest valid snapshot and every record after it into {@code target}, cuts a torn or
     * corrupt tail, and starts a fresh segment for new appends. Must be called once, before appends.
     */
    public synchronized RecoveryReport recover(RecoveryTarget target) throws IOException {
        if (writer != null) {
            throw new IllegalStateException("journal already recovered");
        }
        List<String> notes = new ArrayList<>();
        Map<String, Long> covered = new HashMap<>();
        long floor = 0;
        int fromSnapshot = 0;
        List<Path> snapshots = list(SNAPSHOT_PREFIX, SNAPSHOT_SUFFIX);
        for (int i = snapshots.size() - 1; i >= 0; i--) {
            Path p = snapshots.get(i);
            try {
                Map<String, Long> seqs = new HashMap<>();
                List<SessionSnapshot> sessions = readSnapshot(p);
                for (SessionSnapshot s : sessions) {
                    target.restore(s.vehicleId(), s.state());
                    seqs.put(s.vehicleId(), s.lastSeq());
                }
                covered = seqs;
                floor = seqOf(p, SNAPSHOT_PREFIX, SNAPSHOT_SUFFIX);
                fromSnapshot = sessions.size();
                break;
            } catch (IOException e) {
                notes.add("snapshot " + p.getFileName() + " unreadable, an older one is used: " + e.getMessage());
            }
        }
        long replayed = 0;
        long samples = 0;
        long skipped = 0;
        long cut = 0;
        long lastSeq = floor - 1;
        List<Path> segments = list(SEGMENT_PREFIX, SEGMENT_SUFFIX);
        boolean stop = false;
        for (int si = 0; si < segments.size(); si++) {
            Path p = segments.get(si);
            if (stop) {
                Path aside = p.resolveSibling(p.getFileName() + ".corrupt");
                Files.move(p, aside, StandardCopyOption.REPLACE_EXISTING);
                notes.add("segment " + p.getFileName() + " follows a corrupt record and was set aside as "
                        + aside.getFileName());
                continue;
            }
            long seq = seqOf(p, SEGMENT_PREFIX, SEGMENT_SUFFIX);
            byte[] bytes = Files.readAllBytes(p);
            ByteBuffer buf = ByteBuffer.wrap(bytes);
            int validEnd = 0;
            while (buf.remaining() > 0) {
                byte[] payload = nextRecord(buf);
                if (payload == null) {
                    break;
                }
                validEnd = buf.position();
                lastSeq = seq;
                DataInputStream in = new DataInputStream(new ByteArrayInputStream(payload));
                byte kind = in.readByte();
                String vehicle = in.readUTF();
                Long vehicleCovered = covered.get(vehicle);
                boolean apply = vehicleCovered != null ? seq > vehicleCovered : seq >= floor;
                if (kind == KIND_DELETE) {
                    target.repliesVoided(vehicle);
                }
                if (kind == KIND_REPLY) {
                    int length = in.readInt();
                    if (length < 0 || length > payload.length) {
                        throw new IOException("journal: reply of " + length + " bytes in a record of "
                                + payload.length + " in " + p.getFileName());
                    }
                    byte[] reply = new byte[length];
                    in.readFully(reply);
                    target.reply(vehicle, reply);
                } else if (!apply) {
                    skipped++;
                } else if (kind == KIND_BATCH) {
                    int n = in.readInt();
                    List<Sample> batch = new ArrayList<>(n);
                    for (int k = 0; k < n; k++) {
                        batch.add(SampleCodec.read(in));
                    }
                    target.replay(vehicle, batch, seq);
                    replayed++;
                    samples += n;
                } else if (kind == KIND_DELETE) {
                    target.delete(vehicle, seq);
                    replayed++;
                } else {
                    throw new IOException("journal: unknown record kind " + kind + " in " + p.getFileName());
                }
                seq++;
            }
            if (validEnd < bytes.length) {
                cut += bytes.length - validEnd;
                try (FileChannel ch = FileChannel.open(p, StandardOpenOption.WRITE)) {
                    ch.truncate(validEnd);
                    ch.force(true);
                }
                notes.add(String.format(Locale.ROOT, "cut %d bytes of a torn or corrupt record at offset %d of %s",
                        bytes.length - validEnd, validEnd, p.getFileName()));
                stop = true;
            }
        }
        // A snapshot may cover records that were queued but never written before a crash: numbering
        // must go on past every covered sequence, or a new record could reuse a covered number and be
        // skipped by the next recovery as if the snapshot held it.
        long maxCovered = floor - 1;
        for (long c : covered.values()) {
            maxCovered = Math.max(maxCovered, c);
        }
        nextSeq = Math.max(Math.max(lastSeq, maxCovered) + 1, floor);
        startSegment();
        writer = new Thread(this::writeLoop, "wayhold-journal");
        writer.setDaemon(true);
        writer.start();
        return new RecoveryReport(fromSnapshot, floor, replayed, samples, skipped, cut, notes);
    }

    /**
     * The next record's payload, or null when the rest is a torn or corrupt tail: a length that runs
     * past the end or is absurd, or a checksum that does not match (CRC32C, RFC 3720 sec. 12.1).
     */
    private static byte[] nextRecord(ByteBuffer buf) {
        if (buf.remaining() < HEADER_BYTES) {
            return null;
        }
        int length = buf.getInt(buf.position());
        int crc = buf.getInt(buf.position() + 4);
        if (length <= 0 || length > MAX_RECORD_BYTES || length > buf.remaining() - HEADER_BYTES) {
            return null;
        }
        byte[] payload = new byte[length];
        buf.get(buf.position() + HEADER_BYTES, payload);
        CRC32C c = new CRC32C();
        c.update(payload);
        if ((int) c.getValue() != crc) {
            return null;
        }
        buf.position(buf.position() + HEADER_BYTES + length);
        return payload;
    }

    /**
     * Queues a batch of one vehicle. Call under the vehicle's lock right after the session applied it,
     * so journal order per vehicle is application order; wait on the future (outside the lock) before
     * acknowledging. The future completes with the batch's sequence number once it is written (and
     * forced, when {@code fsync} is set), or exceptionally if the journal failed.
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
     * as {@link #append}, but it is no session state: recovery hands it to
     * {@link RecoveryTarget#reply} wherever it lies, and it lives as long as its segment is kept.
     */
    public CompletableFuture<Long> appendReply(String vehicleId, byte[] reply) {
        try {
            ByteArrayOutputStream bytes = new ByteArrayOutputStream(16 + reply.length);
            DataOutputStream out = new DataOutputStream(bytes);
            out.writeByte(KIND_REPLY);
            out.writeUTF(vehicleId);
            out.writeInt(reply.length);
            out.write(reply);
            out.flush();
            return enqueue(bytes.toByteArray());
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

    private CompletableFuture<Long> enqueue(byte[] payload) {
        if (writer == null) {
            throw new IllegalStateException("recover the journal before appending");
        }
        CRC32C c = new CRC32C();
        c.update(payload);
        ByteBuffer record = ByteBuffer.allocate(HEADER_BYTES + payload.length);
        record.putInt(payload.length).putInt((int) c.getValue()).put(payload);
        CompletableFuture<Long> done = new CompletableFuture<>();
        // Closing and failing also take this lock, so nothing is queued behind the writer's last drain
        // (a future queued there would never complete and its request would hang).
        synchronized (appendLock) {
            if (closed) {
                return CompletableFuture.failedFuture(new IOException("journal is closed"));
            }
            if (failure != null) {
                return CompletableFuture.failedFuture(failure);
            }
            queue.add(new Pending(nextSeq++, record.array(), done));
        }
        return done;
    }

    /** The failure that stopped the writer, if any: after it every append fails. */
    public java.util.Optional<IOException> failure() {
        return java.util.Optional.ofNullable(failure);
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

    /** Records (batches and deletions) this process has written to segments, for metrics. */
    public long recordsWritten() {
        return recordsWritten.get();
    }

    /** Bytes of records, headers included, this process has written to segments, for metrics. */
    public long bytesWritten() {
        return bytesWritten.get();
    }

    /** The sequence number the next append will get. */
    public long nextSeq() {
        synchronized (appendLock) {
            return nextSeq;
        }
    }

    private void writeLoop() {
        List<Pending> group = new ArrayList<>();
        while (true) {
            try {
                Pending first = queue.take();
                if (first.seq < 0) {
                    drainOnClose(group);
                    return;
                }
                group.add(first);
                long waitNanos = (long) (settings.groupCommitMaxS() * 1e9) - (System.nanoTime() - lastForceNanos);
                if (settings.fsync() && waitNanos > 0) {
                    // Forces are rate-limited: gather what arrives until the next force is due.
                    Thread.sleep(waitNanos / 1_000_000, (int) (waitNanos % 1_000_000));
                }
                queue.drainTo(group);
                boolean stopAfter = false;
                for (int i = group.size() - 1; i >= 0; i--) {
                    if (group.get(i).seq < 0) {
                        group.remove(i);
                        stopAfter = true;
                    }
                }
                writeGroup(group);
                group.clear();
                if (stopAfter) {
                    return;
                }
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
                fail(group, new InterruptedIOException("journal writer interrupted"));
                return;
            } catch (IOException e) {
                fail(group, e);
                return;
            }
        }
    }

    private void drainOnClose(List<Pending> group) throws IOException {
        queue.drainTo(group);
        group.removeIf(p -> p.seq < 0);
        writeGroup(group);
    }

    private void writeGroup(List<Pending> group) throws IOException {
        if (group.isEmpty()) {
            return;
        }
        for (Pending p : group) {
            if (segment.size() >= settings.segmentBytes()) {
                segment.force(true);
                segment.close();
                segmentFirstSeq = p.seq;
                openSegment(p.seq);
            }
            ByteBuffer b = ByteBuffer.wrap(p.record);
            while (b.hasRemaining()) {
                segment.write(b);
            }
        }
        if (settings.fsync()) {
            segment.force(false);
        }
        lastForceNanos = System.nanoTime();
        long bytes = 0;
        for (Pending p : group) {
            bytes += p.record.length;
        }
        recordsWritten.addAndGet(group.size());
        bytesWritten.addAndGet(bytes);
        for (Pending p : group) {
            p.done.complete(p.seq);
        }
    }

    private void fail(List<Pending> group, IOException e) {
        synchronized (appendLock) {
            failure = e;
        }
        for (Pending p : group) {
            p.done.completeExceptionally(e);
        }
        Pending p;
        while ((p = queue.poll()) != null) {
            p.done.completeExceptionally(e);
        }
    }

    private void startSegment() throws IOException {
        segmentFirstSeq = nextSeq;
        openSegment(nextSeq);
    }

    private void openSegment(long firstSeq) throws IOException {
        Path p = dir.resolve(name(SEGMENT_PREFIX, firstSeq, SEGMENT_SUFFIX));
        segment = FileChannel.open(p, StandardOpenOption.CREATE, StandardOpenOption.WRITE,
                StandardOpenOption.APPEND);
    }

    /**
     * Writes a snapshot of all sessions, atomically (temporary file, force, rename), then deletes
     * segments and older snapshots it makes unnecessary within the retention limits.
     *
     * @param floorSeq {@link #nextSeq()} read before the first session was captured: every record
     *                 before it belongs to a session in the snapshot or to one deleted before it
     * @param sessions each session with the sequence of the last batch it applied
     */
    public synchronized void writeSnapshot(long floorSeq, List<SessionSnapshot> sessions) throws IOException {
        ByteArrayOutputStream bytes = new ByteArrayOutputStream();
        DataOutputStream out = new DataOutputStream(bytes);
        out.writeInt(SNAPSHOT_MAGIC);
        out.writeLong(floorSeq);
        out.writeInt(sessions.size());
        for (SessionSnapshot s : sessions) {
            out.writeUTF(s.vehicleId());
            out.writeLong(s.lastSeq());
            out.writeInt(s.state().length);
            out.write(s.state());
        }
        out.flush();
        CRC32C c = new CRC32C();
        c.update(bytes.toByteArray());
        out.writeInt((int) c.getValue());
        out.flush();
        Path target = dir.resolve(name(SNAPSHOT_PREFIX, floorSeq, SNAPSHOT_SUFFIX));
        Path tmp = dir.resolve(target.getFileName() + ".tmp");
        try (FileChannel ch = FileChannel.open(tmp, StandardOpenOption.CREATE, StandardOpenOption.WRITE,
                StandardOpenOption.TRUNCATE_EXISTING)) {
            ByteBuffer b = ByteBuffer.wrap(bytes.toByteArray());
            while (b.hasRemaining()) {
                ch.write(b);
            }
            ch.force(true);
        }
        Files.move(tmp, target, StandardCopyOption.ATOMIC_MOVE, StandardCopyOption.REPLACE_EXISTING);
        applyRetention(floorSeq);
    }

    private static List<SessionSnapshot> readSnapshot(Path p) throws IOException {
        byte[] all = Files.readAllBytes(p);
        if (all.length < 20) {
            throw new IOException("too short");
        }
        CRC32C c = new CRC32C();
        c.update(all, 0, all.length - 4);
        int stored = ByteBuffer.wrap(all, all.length - 4, 4).getInt();
        if ((int) c.getValue() != stored) {
            throw new IOException("checksum mismatch");
        }
        DataInputStream in = new DataInputStream(new ByteArrayInputStream(all, 0, all.length - 4));
        if (in.readInt() != SNAPSHOT_MAGIC) {
            throw new IOException("not a wayhold snapshot");
        }
        in.readLong();
        int n = in.readInt();
        List<SessionSnapshot> out = new ArrayList<>(n);
        for (int i = 0; i < n; i++) {
            String id = in.readUTF();
            long seq = in.readLong();
            byte[] state = new byte[in.readInt()];
            in.readFully(state);
            out.add(new SessionSnapshot(id, seq, state));
        }
        return out;
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
        List<Path> snapshots = list(SNAPSHOT_PREFIX, SNAPSHOT_SUFFIX);
        long keptFloor = snapshots.size() < 2 ? 0
                : Math.min(floorSeq, seqOf(snapshots.get(snapshots.size() - 2), SNAPSHOT_PREFIX, SNAPSHOT_SUFFIX));
        for (Path p : snapshots) {
            if (seqOf(p, SNAPSHOT_PREFIX, SNAPSHOT_SUFFIX) < keptFloor) {
                Files.deleteIfExists(p);
            }
        }
        List<Path> segments = list(SEGMENT_PREFIX, SEGMENT_SUFFIX);
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
            }
        }
    }

    private List<Path> list(String prefix, String suffix) throws IOException {
        List<Path> out = new ArrayList<>();
        try (DirectoryStream<Path> ds = Files.newDirectoryStream(dir, prefix + "*" + suffix)) {
            for (Path p : ds) {
                out.add(p);
            }
        }
        out.sort((a, b) -> Long.compare(seqOf(a, prefix, suffix), seqOf(b, prefix, suffix)));
        return out;
    }

    private static String name(String prefix, long seq, String suffix) {
        return String.format(Locale.ROOT, "%s%020d%s", prefix, seq, suffix);
    }

    private static long seqOf(Path p, String prefix, String suffix) {
        String n = p.getFileName().toString();
        return Long.parseLong(n.substring(prefix.length(), n.length() - suffix.length()));
    }

    /** Writes what is queued, forces it, and stops the writer. */
    @Override
    public void close() throws IOException {
        if (closed) {
            return;
        }
        synchronized (appendLock) {
            closed = true;
        }
        if (writer != null) {
            queue.add(new Pending(-1, new byte[0], new CompletableFuture<>()));
            try {
                writer.join();
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
            }
            if (segment != null && segment.isOpen()) {
                segment.force(true);
                segment.close();
            }
        }
        if (failure != null) {
            throw failure;
        }
    }
}
