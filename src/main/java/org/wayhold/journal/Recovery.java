package org.wayhold.journal;

import java.io.ByteArrayInputStream;
import java.io.DataInputStream;
import java.io.IOException;
import java.nio.ByteBuffer;
import java.nio.channels.FileChannel;
import java.nio.charset.StandardCharsets;
import java.nio.file.DirectoryStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import java.util.zip.CRC32C;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;
import org.wayhold.sample.Sample;
import org.wayhold.sample.SampleCodec;

/**
 * Reads a journal directory back into sessions: the newest usable snapshot, then every record after it.
 *
 * <p>Rules, in the order they apply:
 * <ul>
 *   <li>Files that are not part of the journal are ignored with a note; leftovers of an interrupted
 *       snapshot are deleted.</li>
 *   <li>The newest snapshot whose every frame is intact is used; a damaged one is passed over for the
 *       one before it. A vehicle whose entry in it does not make a valid session is rebuilt from an
 *       older snapshot and the journal records after it, or from the journal alone; when neither is
 *       possible it is quarantined. Nothing here stops the start.</li>
 *   <li>Records carry their sequence numbers, so damage is measured exactly: at a record that fails its
 *       checks, reading resumes at the next intact record (a valid length, checksum and a plausible
 *       number), and the numbers in between are the records lost. A number that jumps ahead (a missing
 *       segment) is a loss of the numbers skipped, unless a record says they were refused while the
 *       journal could not write (those were never acknowledged).</li>
 *   <li>Only the last record of the last segment may be a torn write (a crash during the write): it is
 *       cut and nothing is reported lost. Damage anywhere else is read around and left in place, and
 *       damage at the very end of the journal that is more than one record is cut and reported.</li>
 *   <li>A loss is reported only where a snapshot does not cover it: records older than what the
 *       snapshot in use holds were not needed. Segments whose records are all older than that are not
 *       read at all, so a start reads what it replays and not everything retention keeps.</li>
 *   <li>Replies kept for retries are no session state: those the snapshot in use carries are handed
 *       over first, then every reply record read, whether or not the snapshot covers it; a deletion
 *       voids the vehicle's replies numbered below it, wherever it lies.</li>
 * </ul>
 */
final class Recovery {

    private static final Logger LOG = LoggerFactory.getLogger(Recovery.class);
    private static final Pattern SEGMENT = Pattern.compile("segment-(\\d{20})\\.wal");
    private static final Pattern SNAPSHOT = Pattern.compile("snapshot-(\\d{20})\\.bin");
    private static final Pattern SNAPSHOT_TMP = Pattern.compile("snapshot-\\d{20}\\.bin\\.tmp");
    private static final String HEAD_MAGIC = "wayhold-journal-head 1";

    /** The journal's own files, sorted, and whatever else the directory holds. */
    record Listing(List<Path> segments, List<Path> snapshots, List<Path> leftovers, List<Path> strays) {
    }

    record Result(Journal.RecoveryReport report, long nextSeq) {
    }

    private final Path dir;
    private final Journal.RecoveryTarget target;
    private final List<String> notes = new ArrayList<>();
    private final List<Journal.Loss> lost = new ArrayList<>();
    /** Per vehicle: the last record its restored state holds (records after it are applied). */
    private final Map<String, Long> covered = new HashMap<>();
    /** Vehicles rebuilt without their entry in the snapshot in use: the first record each needs. */
    private final Map<String, Long> rebuiltFrom = new LinkedHashMap<>();
    private final Map<Path, Object> checkedSnapshots = new HashMap<>();
    private long floor;
    /** Records from here to the floor may have been pending when the snapshot was taken. */
    private long firstPending;
    private int fromSnapshot;
    private long replayed;
    private long samples;
    private long skipped;
    private long cut;
    private long damagedBytes;
    /** No record before this one is needed: everything older is in the restored state. */
    private long neededFrom;
    /** The sequence number the next record should carry, -1 before the first record. */
    private long expected = -1;
    /** Where damage was read around, until the next intact record tells what it cost. */
    private String pendingDamage;

    Recovery(Path dir, Journal.RecoveryTarget target) {
        this.dir = dir;
        this.target = target;
    }

    static Listing listing(Path dir) throws IOException {
        List<Path> segments = new ArrayList<>();
        List<Path> snapshots = new ArrayList<>();
        List<Path> leftovers = new ArrayList<>();
        List<Path> strays = new ArrayList<>();
        try (DirectoryStream<Path> ds = Files.newDirectoryStream(dir)) {
            for (Path p : ds) {
                String n = p.getFileName().toString();
                boolean file = Files.isRegularFile(p);
                if (file && SEGMENT.matcher(n).matches()) {
                    segments.add(p);
                } else if (file && SNAPSHOT.matcher(n).matches()) {
                    snapshots.add(p);
                } else if (file && (SNAPSHOT_TMP.matcher(n).matches() || n.equals(Journal.HEAD_FILE + ".tmp"))) {
                    leftovers.add(p);
                } else if (!(file && (n.equals(DataDirectoryLock.FILE_NAME) || n.equals(Journal.HEAD_FILE)))) {
                    strays.add(p);
                }
            }
        }
        segments.sort(Comparator.comparingLong(p -> Journal.seqOf(p, Journal.SEGMENT_PREFIX, Journal.SEGMENT_SUFFIX)));
        snapshots.sort(Comparator.comparingLong(p -> Journal.seqOf(p, Journal.SNAPSHOT_PREFIX, Journal.SNAPSHOT_SUFFIX)));
        strays.sort(Comparator.naturalOrder());
        return new Listing(segments, snapshots, leftovers, strays);
    }

    Result run() throws IOException {
        Listing listing = listing(dir);
        for (Path p : listing.strays()) {
            note("ignored " + p.getFileName() + ": not a file of the journal");
        }
        for (Path p : listing.leftovers()) {
            Files.deleteIfExists(p);
            note("deleted " + p.getFileName() + ", left by an interrupted write");
        }
        restoreSnapshots(listing.snapshots());
        long firstAvailable = listing.segments().isEmpty() ? Long.MAX_VALUE
                : Journal.seqOf(listing.segments().get(0), Journal.SEGMENT_PREFIX, Journal.SEGMENT_SUFFIX);
        neededFrom = Math.min(floor, firstPending);
        for (Map.Entry<String, Long> e : rebuiltFrom.entrySet()) {
            if (e.getValue() < firstAvailable && e.getValue() < floor) {
                String reason = "its snapshot entry could not be used and the journal no longer holds its records"
                        + " from " + e.getValue() + " on";
                target.quarantine(e.getKey(), reason);
                note("vehicle '" + e.getKey() + "' quarantined: " + reason);
            } else {
                neededFrom = Math.min(neededFrom, e.getValue());
            }
        }
        replaySegments(listing.segments());
        long next = Math.max(expected, floor);
        for (long c : covered.values()) {
            // A snapshot may cover records that were queued but never written before a crash: numbering
            // must go on past every covered sequence, or a new record could reuse a covered number and be
            // skipped by the next recovery as if the snapshot held it.
            next = Math.max(next, c + 1);
        }
        if (!listing.segments().isEmpty()) {
            // No new segment may sort before an existing one (whose records would then look out of place).
            next = Math.max(next, Journal.seqOf(listing.segments().get(listing.segments().size() - 1),
                    Journal.SEGMENT_PREFIX, Journal.SEGMENT_SUFFIX));
        }
        next = Math.max(next, checkHead(listing.segments()));
        return new Result(new Journal.RecoveryReport(fromSnapshot, floor, replayed, samples, skipped, cut, damagedBytes,
                lost, notes), next);
    }

    private void note(String text) {
        notes.add(text);
        LOG.warn("journal {}: {}", dir, text);
    }

    // ---------------------------------------------------------------------------------------------
    // Snapshots

    private void restoreSnapshots(List<Path> snapshots) {
        int primary = -1;
        SnapshotFile.Index index = null;
        for (int i = snapshots.size() - 1; i >= 0 && index == null; i--) {
            index = checked(snapshots.get(i));
            if (index == null) {
                note("snapshot " + snapshots.get(i).getFileName() + " unreadable, an older one is used: "
                        + checkedSnapshots.get(snapshots.get(i)));
            } else {
                primary = i;
            }
        }
        if (index == null) {
            if (!snapshots.isEmpty()) {
                note("no snapshot is readable: every session is rebuilt from the journal alone");
            }
            return;
        }
        floor = index.floorSeq();
        firstPending = index.firstPendingSeq();
        for (Journal.KeptReply r : index.replies()) {
            target.reply(r);
        }
        List<Path> older = snapshots.subList(0, primary);
        for (SnapshotFile.Entry e : index.entries()) {
            String problem = use(index, e);
            if (problem != null) {
                rebuild(e.vehicleId(), index, problem, older);
            } else if (e.kind() == SnapshotFile.STATE) {
                fromSnapshot++;
            }
        }
    }

    /** The checked snapshot, or null when it is unreadable (the reason is kept for the note). */
    private SnapshotFile.Index checked(Path p) {
        Object known = checkedSnapshots.get(p);
        if (known == null) {
            try {
                known = SnapshotFile.check(p);
            } catch (IOException | RuntimeException e) {
                known = e.getMessage();
            }
            checkedSnapshots.put(p, known);
        }
        return known instanceof SnapshotFile.Index i ? i : null;
    }

    /** Restores (or quarantines) one entry; returns why it cannot be used, or null. */
    private String use(SnapshotFile.Index index, SnapshotFile.Entry e) {
        if (e.kind() == SnapshotFile.QUARANTINED) {
            target.quarantine(e.vehicleId(), e.reason());
            covered.put(e.vehicleId(), e.lastSeq());
            note("vehicle '" + e.vehicleId() + "' stays quarantined: " + e.reason());
            return null;
        }
        try {
            target.restore(e.vehicleId(), SnapshotFile.state(index, e), e.lastSeq());
            covered.put(e.vehicleId(), e.lastSeq());
            return null;
        } catch (IOException ex) {
            return ex.getMessage();
        }
    }

    /**
     * A vehicle whose entry in the snapshot in use cannot be restored: from the newest older snapshot
     * that has a usable entry for it and the records after that, or from the records after an older
     * snapshot it was not in (it had no session then), or from the journal's start.
     */
    private void rebuild(String id, SnapshotFile.Index primary, String problem, List<Path> older) {
        String head = "vehicle '" + id + "': its entry in " + primary.path().getFileName() + " cannot be restored ("
                + problem + "); ";
        for (int i = older.size() - 1; i >= 0; i--) {
            SnapshotFile.Index o = checked(older.get(i));
            if (o == null) {
                continue;
            }
            SnapshotFile.Entry e = o.find(id);
            if (e == null) {
                covered.put(id, o.floorSeq() - 1);
                rebuiltFrom.put(id, o.floorSeq());
                note(head + "rebuilt from the journal from record " + o.floorSeq() + " on (it had no session in "
                        + o.path().getFileName() + ")");
                return;
            }
            if (use(o, e) == null) {
                if (e.kind() == SnapshotFile.STATE) {
                    rebuiltFrom.put(id, e.lastSeq() + 1);
                    note(head + "restored from " + o.path().getFileName() + " and the journal after record " + e.lastSeq());
                }
                return;
            }
        }
        // Every record of it is applied. When the journal no longer starts at 0, run() quarantines it
        // instead, and its records then change nothing but a deletion still drops it.
        covered.put(id, -1L);
        rebuiltFrom.put(id, 0L);
        note(head + "rebuilt from the journal from its start");
    }

    // ---------------------------------------------------------------------------------------------
    // Segments

    private void replaySegments(List<Path> segments) throws IOException {
        for (int k = 0; k < segments.size(); k++) {
            Path path = segments.get(k);
            long nameSeq = Journal.seqOf(path, Journal.SEGMENT_PREFIX, Journal.SEGMENT_SUFFIX);
            long upper = k + 1 < segments.size()
                    ? Journal.seqOf(segments.get(k + 1), Journal.SEGMENT_PREFIX, Journal.SEGMENT_SUFFIX) : Long.MAX_VALUE;
            if (upper <= neededFrom) {
                // Every record of it is older than anything the restored state needs: not read at all, so
                // the start takes the time of what it replays, not of everything retention keeps.
                continue;
            }
            if (expected < 0) {
                // The first segment read: what the restored state needs before it is missing.
                gap(neededFrom, nameSeq - 1, path, true);
                expected = nameSeq;
            }
            boolean last = k == segments.size() - 1;
            byte[] bytes = Files.readAllBytes(path);
            if (RecordFrame.validAt(bytes, 0, bytes.length, Long.MIN_VALUE, Long.MAX_VALUE) < 0
                    && RecordFrame.earlierLayoutAt(bytes, 0, bytes.length)) {
                // Not damage: read as damage, its records would be cut or reported lost. Refuse to start.
                throw new IOException(path.getFileName() + " in " + dir + " holds records of the journal's earlier"
                        + " layout (without sequence numbers), which this version does not read; nothing was changed."
                        + " Keep the directory for the earlier version, or start this one on a new --data directory");
            }
            int pos = 0;
            while (pos < bytes.length) {
                int len = RecordFrame.validAt(bytes, pos, bytes.length, Math.max(nameSeq, expected), upper);
                if (len > 0) {
                    apply(bytes, pos, len, path, pos == 0);
                    pos += len;
                    continue;
                }
                // Read on first: a damaged length field can look like a record running past the end, and
                // taking that for a torn write would cut every intact record after it.
                int resume = resync(bytes, pos + 1, Math.max(nameSeq, expected), upper);
                if (resume < 0 && last && RecordFrame.tornTail(bytes, pos, bytes.length)) {
                    int n = bytes.length - pos;
                    truncate(path, pos);
                    cut += n;
                    notes.add(String.format(Locale.ROOT, "cut %d bytes of a torn last record at offset %d of %s"
                            + " (a write the crash interrupted; it was never acknowledged)", n, pos, path.getFileName()));
                    break;
                }
                if (resume < 0) {
                    int n = bytes.length - pos;
                    String where = String.format(Locale.ROOT, "%d damaged bytes at offset %d of %s", n, pos,
                            path.getFileName());
                    if (last) {
                        truncate(path, pos);
                        cut += n;
                        long from = Math.max(expected < 0 ? nameSeq : expected, neededFrom);
                        lost.add(new Journal.Loss(from, -1, false, where + " run to the end of the journal; cut"));
                        note("cut " + where + ": more than a torn last record, so records from " + from
                                + " on that they held are lost");
                    } else {
                        damagedBytes += n;
                        pendingDamage = where;
                        note("read around " + where + " (left in place)");
                    }
                    break;
                }
                damagedBytes += resume - pos;
                pendingDamage = String.format(Locale.ROOT, "%d damaged bytes at offset %d of %s", resume - pos, pos,
                        path.getFileName());
                note("read around " + pendingDamage + " (left in place)");
                pos = resume;
            }
        }
    }

    /**
     * The offset of the next intact record at or after {@code from}, or -1. Plausible means: a length
     * that fits, a sequence number no lower than expected and below the next segment's first, and no
     * higher than the damaged stretch could have held (one record per {@link RecordFrame#MIN_RECORD_BYTES}
     * bytes), then a matching checksum. A false match needs a 32-bit checksum to agree by chance on top.
     */
    private static int resync(byte[] bytes, int from, long minSeq, long upper) {
        ByteBuffer b = ByteBuffer.wrap(bytes);
        for (int q = from; q + RecordFrame.HEADER_BYTES + RecordFrame.MIN_PAYLOAD_BYTES <= bytes.length; q++) {
            int length = b.getInt(q);
            if (length < RecordFrame.MIN_PAYLOAD_BYTES || length > bytes.length - q - RecordFrame.HEADER_BYTES) {
                continue;
            }
            long seq = b.getLong(q + RecordFrame.SEQ_OFFSET);
            long most = minSeq + (q - from) / RecordFrame.MIN_RECORD_BYTES + 2;
            if (seq < minSeq || seq >= upper || seq > most) {
                continue;
            }
            if (RecordFrame.validAt(bytes, q, bytes.length, minSeq, upper) > 0) {
                return q;
            }
        }
        return -1;
    }

    private void apply(byte[] bytes, int pos, int len, Path path, boolean firstInSegment) {
        long seq = RecordFrame.seqAt(bytes, pos);
        byte kind = RecordFrame.kindAt(bytes, pos);
        DataInputStream in = new DataInputStream(new ByteArrayInputStream(bytes, pos + RecordFrame.KIND_OFFSET + 1,
                len - RecordFrame.KIND_OFFSET - 1));
        long gapFrom = expected < 0 ? neededFrom : expected;
        if (kind == Journal.KIND_REFUSED) {
            long refusedFrom;
            try {
                refusedFrom = in.readLong();
            } catch (IOException e) {
                refusedFrom = seq;
            }
            gap(gapFrom, Math.min(seq, refusedFrom) - 1, path, firstInSegment);
            notes.add("records " + refusedFrom + " to " + seq + " were refused while the journal could not write"
                    + " (answered 503, never applied)");
            expected = seq + 1;
            return;
        }
        gap(gapFrom, seq - 1, path, firstInSegment);
        expected = seq + 1;
        String vehicle;
        try {
            vehicle = in.readUTF();
        } catch (IOException e) {
            lose(seq, seq, "record of " + path.getFileName() + " passed its checksum but does not decode");
            return;
        }
        if (kind == Journal.KIND_REPLY) {
            try {
                byte[] reply = new byte[in.readInt()];
                in.readFully(reply);
                target.reply(new Journal.KeptReply(vehicle, seq, reply));
            } catch (IOException | RuntimeException e) {
                lose(seq, seq, "kept reply of " + path.getFileName() + " passed its checksum but does not decode");
            }
            return;
        }
        if (kind == Journal.KIND_DELETE) {
            target.repliesVoided(vehicle, seq);
        }
        Long vehicleCovered = covered.get(vehicle);
        boolean needed = vehicleCovered != null ? seq > vehicleCovered : seq >= floor;
        if (!needed) {
            skipped++;
            return;
        }
        if (kind == Journal.KIND_DELETE) {
            target.delete(vehicle, seq);
            replayed++;
            return;
        }
        if (kind != Journal.KIND_BATCH) {
            lose(seq, seq, "record of unknown kind " + kind + " in " + path.getFileName());
            return;
        }
        List<Sample> batch;
        try {
            int n = in.readInt();
            batch = new ArrayList<>(n);
            for (int i = 0; i < n; i++) {
                batch.add(SampleCodec.read(in));
            }
        } catch (IOException | RuntimeException e) {
            String reason = "journal record " + seq + " passed its checksum but its samples do not decode ("
                    + e.getMessage() + ")";
            target.quarantine(vehicle, reason);
            note("vehicle '" + vehicle + "' quarantined: " + reason);
            return;
        }
        target.replay(vehicle, batch, seq);
        replayed++;
        samples += batch.size();
    }

    /** Numbers {@code from} to {@code to} are missing; the part a restored state does not cover is lost. */
    private void gap(long from, long to, Path path, boolean firstInSegment) {
        if (to < from) {
            pendingDamage = null;
            return;
        }
        String cause = pendingDamage != null ? pendingDamage
                : firstInSegment ? "missing before " + path.getFileName() + " (a segment deleted or lost)"
                : "missing inside " + path.getFileName();
        pendingDamage = null;
        if (to < neededFrom) {
            notes.add("records " + from + " to " + to + " are damaged or missing (" + cause
                    + ") but the snapshot holds them: nothing lost");
            return;
        }
        lose(Math.max(from, neededFrom), to, cause);
    }

    private void lose(long from, long to, String cause) {
        Journal.Loss loss = new Journal.Loss(from, to, true, cause);
        lost.add(loss);
        note(loss.describe());
    }

    private static void truncate(Path path, long size) throws IOException {
        try (FileChannel ch = FileChannel.open(path, StandardOpenOption.WRITE)) {
            ch.truncate(size);
            ch.force(true);
        }
    }

    // ---------------------------------------------------------------------------------------------
    // Head file

    static String headText(long newestSegmentSeq) {
        String body = HEAD_MAGIC + "\nnewest_segment " + newestSegmentSeq + "\n";
        CRC32C c = new CRC32C();
        c.update(body.getBytes(StandardCharsets.US_ASCII));
        return body + "crc32c " + Long.toHexString(c.getValue()) + "\n";
    }

    private static final Pattern HEAD = Pattern.compile(
            "(" + Pattern.quote(HEAD_MAGIC) + "\nnewest_segment (\\d+)\n)crc32c ([0-9a-f]+)\n");

    /**
     * Checks that the newest segment the head file names exists; when it does not, the newest segments
     * were deleted or lost (no gap shows that). Returns the sequence the next segment must start at least.
     */
    private long checkHead(List<Path> segments) {
        Path head = dir.resolve(Journal.HEAD_FILE);
        if (!Files.exists(head)) {
            return 0;
        }
        String text;
        try {
            text = Files.readString(head, StandardCharsets.US_ASCII);
        } catch (IOException e) {
            note("ignored " + Journal.HEAD_FILE + ": unreadable (" + e.getMessage() + ")");
            return 0;
        }
        Matcher m = HEAD.matcher(text);
        CRC32C c = new CRC32C();
        if (m.matches()) {
            c.update(m.group(1).getBytes(StandardCharsets.US_ASCII));
        }
        if (!m.matches() || !Long.toHexString(c.getValue()).equals(m.group(3))) {
            note("ignored " + Journal.HEAD_FILE + ": damaged");
            return 0;
        }
        long newest = Long.parseLong(m.group(2));
        long present = segments.isEmpty() ? -1
                : Journal.seqOf(segments.get(segments.size() - 1), Journal.SEGMENT_PREFIX, Journal.SEGMENT_SUFFIX);
        if (present < newest) {
            long from = Math.max(expected < 0 ? neededFrom : expected, neededFrom);
            lost.add(new Journal.Loss(from, -1, false, Journal.name(Journal.SEGMENT_PREFIX, newest, Journal.SEGMENT_SUFFIX)
                    + ", the newest segment, is missing"));
            note("the newest segment " + Journal.name(Journal.SEGMENT_PREFIX, newest, Journal.SEGMENT_SUFFIX)
                    + " named in " + Journal.HEAD_FILE + " is missing: records from " + from
                    + " on that it held are lost");
        }
        return newest;
    }
}
