package org.wayhold.journal;

import static org.assertj.core.api.Assertions.assertThat;

import java.io.IOException;
import java.io.RandomAccessFile;
import java.nio.ByteBuffer;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;
import org.wayhold.settings.JournalSettings;
import org.wayhold.testing.FaultyFiles;

/**
 * Damage to the journal's files costs at most the damaged records, and recovery says exactly which.
 * Expected values are exact hand cases: the records a test appended (batch k has sequence number k),
 * and the damage it made by hand, whose position it finds by walking the documented framing
 * {@code [length u32][CRC32C u32][seq u64 ...payload]}.
 */
class JournalDamageTest {

    /** 4 KiB segments (about 30 records each) and nothing deleted by retention. */
    private static final JournalSettings SMALL = new JournalSettings(true, 0.0, 4096, 3600.0, 1L << 30, 60.0);
    private static final int BATCHES = 200;

    @TempDir
    Path dir;

    /** Records what recovery hands over. */
    private static final class Recorder implements Journal.RecoveryTarget {
        final List<Long> seqs = new ArrayList<>();
        final List<List<Sample>> batches = new ArrayList<>();
        final List<String> restored = new ArrayList<>();

        @Override
        public void restore(String vehicleId, byte[] snapshot) {
            restored.add(vehicleId);
        }

        @Override
        public void replay(String vehicleId, List<Sample> batch, long seq) {
            seqs.add(seq);
            batches.add(batch);
        }

        @Override
        public void delete(String vehicleId, long seq) {
            seqs.add(seq);
        }
    }

    private static List<Sample> batch(int k) {
        double t = 1_800_000_000.0 + k;
        return List.of(new WheelSpeed(t, 10.0 + k), new YawRate(t, 0.01 * k),
                GnssFix.position(t + 0.5, 47.0 + k * 1e-5, 8.0, 1.0));
    }

    /**
     * Appends batches 0 to {@code BATCHES - 1} of vehicle "a"; with {@code snapshotAt} >= 0, a snapshot
     * of "a" (holding every batch before it) is written after that many batches.
     */
    private void fill(int snapshotAt) throws IOException {
        try (Journal j = Journal.open(dir, SMALL)) {
            j.recover(new Recorder());
            for (int k = 0; k < BATCHES; k++) {
                if (k == snapshotAt) {
                    j.writeSnapshot(k, List.of(new Journal.SessionSnapshot("a", k - 1, new byte[] {1})));
                }
                assertThat(Journal.await(j.append("a", batch(k)))).isEqualTo(k);
            }
        }
    }

    private List<Path> segments() throws IOException {
        try (Stream<Path> s = Files.list(dir)) {
            return s.filter(p -> p.getFileName().toString().endsWith(".wal")).filter(p -> p.toFile().length() > 0)
                    .sorted().toList();
        }
    }

    /** Offset, whole length and sequence number of every record of a segment. */
    private static List<long[]> frames(Path segment) throws IOException {
        ByteBuffer b = ByteBuffer.wrap(Files.readAllBytes(segment));
        List<long[]> out = new ArrayList<>();
        while (b.remaining() >= 8) {
            int len = b.getInt(b.position());
            out.add(new long[] {b.position(), 8 + len, b.getLong(b.position() + 8)});
            b.position(b.position() + 8 + len);
        }
        return out;
    }

    private static void flipAByte(Path file, long offset) throws IOException {
        try (RandomAccessFile f = new RandomAccessFile(file.toFile(), "rw")) {
            f.seek(offset);
            int b = f.read();
            f.seek(offset);
            f.write(b ^ 0x5a);
        }
    }

    private Journal.RecoveryReport recover(Recorder r) throws IOException {
        try (Journal j = Journal.open(dir, SMALL)) {
            return j.recover(r);
        }
    }

    /** Every batch from 0 to BATCHES - 1 but the given ones, in order. */
    private static List<Long> allBut(long from, long to) {
        List<Long> out = new ArrayList<>();
        for (long k = 0; k < BATCHES; k++) {
            if (k < from || k > to) {
                out.add(k);
            }
        }
        return out;
    }

    /**
     * Rule: only the last record of the last segment may be taken for a torn write. A flipped byte in
     * an older segment loses that record only; recovery goes on with the intact records after it and
     * with every later segment, and names the lost sequence number.
     */
    @Test
    void aFlippedByteInAnOlderSegmentLosesOnlyThatRecord() throws IOException {
        fill(-1);
        List<Path> segs = segments();
        assertThat(segs).hasSizeGreaterThan(4);
        long[] victim = frames(segs.get(1)).get(10);
        flipAByte(segs.get(1), victim[0] + 30);
        Recorder r = new Recorder();
        Journal.RecoveryReport report = recover(r);
        assertThat(report.lost()).singleElement().satisfies(l -> {
            assertThat(l.fromSeq()).isEqualTo(victim[2]);
            assertThat(l.toSeq()).isEqualTo(victim[2]);
            assertThat(l.toKnown()).isTrue();
        });
        assertThat(r.seqs).isEqualTo(allBut(victim[2], victim[2]));
        assertThat(r.batches.get(r.batches.size() - 1)).isEqualTo(batch(BATCHES - 1));
        assertThat(report.damagedBytes()).isEqualTo(victim[1]);
        assertThat(report.bytesCut()).isZero();
        assertThat(segments()).as("no segment is set aside or cut").isEqualTo(segs);
    }

    /**
     * Rule: where a snapshot covers the damaged records, nothing is lost. A segment whose records are all
     * older than what the snapshot needs is not even read (so a start does not read everything retention
     * keeps).
     */
    @Test
    void aFlippedByteInASegmentTheSnapshotCoversLosesNothing() throws IOException {
        fill(100);
        List<Path> segs = segments();
        long[] victim = frames(segs.get(1)).get(5);
        assertThat(victim[2]).isLessThan(100);
        flipAByte(segs.get(1), victim[0] + 20);
        Recorder r = new Recorder();
        Journal.RecoveryReport report = recover(r);
        assertThat(report.lost()).isEmpty();
        assertThat(report.damagedBytes()).as("not read").isZero();
        assertThat(r.restored).containsExactly("a");
        assertThat(r.seqs).first().isEqualTo(100L);
        assertThat(r.seqs).hasSize(BATCHES - 100);
    }

    /** Rule: a segment cut short in the middle loses the records it no longer holds, and only those. */
    @Test
    void aTruncatedOlderSegmentLosesTheRecordsCutOffAndNothingAfter() throws IOException {
        fill(-1);
        List<Path> segs = segments();
        List<long[]> frames = frames(segs.get(2));
        long[] cutIn = frames.get(12);
        long lastOfSegment = frames.get(frames.size() - 1)[2];
        try (RandomAccessFile f = new RandomAccessFile(segs.get(2).toFile(), "rw")) {
            f.setLength(cutIn[0] + 11);
        }
        Recorder r = new Recorder();
        Journal.RecoveryReport report = recover(r);
        assertThat(report.lost()).singleElement().satisfies(l -> {
            assertThat(l.fromSeq()).isEqualTo(cutIn[2]);
            assertThat(l.toSeq()).isEqualTo(lastOfSegment);
        });
        assertThat(r.seqs).isEqualTo(allBut(cutIn[2], lastOfSegment));
    }

    /** Rule: a missing segment shows as a gap in the sequence numbers and is reported the same way. */
    @Test
    void aDeletedSegmentIsAGapInTheNumbersAndIsReported() throws IOException {
        fill(-1);
        List<Path> segs = segments();
        List<long[]> frames = frames(segs.get(3));
        long first = frames.get(0)[2];
        long last = frames.get(frames.size() - 1)[2];
        Files.delete(segs.get(3));
        Recorder r = new Recorder();
        Journal.RecoveryReport report = recover(r);
        assertThat(report.lost()).singleElement().satisfies(l -> {
            assertThat(l.fromSeq()).isEqualTo(first);
            assertThat(l.toSeq()).isEqualTo(last);
            assertThat(l.cause()).contains("missing");
        });
        assertThat(r.seqs).isEqualTo(allBut(first, last));
    }

    /**
     * Rule: damage a snapshot covers loses nothing, also in a segment that is read because it holds
     * records the snapshot needs: it is noted, not reported lost.
     */
    @Test
    void damageInAReadSegmentBeforeTheSnapshotFloorIsNotedAndLosesNothing() throws IOException {
        fill(100);
        Path holdingTheFloor = null;
        for (Path p : segments()) {
            List<long[]> f = frames(p);
            if (f.get(0)[2] < 100 && f.get(f.size() - 1)[2] >= 100) {
                holdingTheFloor = p;
            }
        }
        assertThat(holdingTheFloor).isNotNull();
        long[] victim = frames(holdingTheFloor).get(0);
        assertThat(victim[2]).isLessThan(100);
        flipAByte(holdingTheFloor, victim[0] + 20);
        Recorder r = new Recorder();
        Journal.RecoveryReport report = recover(r);
        assertThat(report.lost()).isEmpty();
        assertThat(report.notes()).anyMatch(n -> n.contains("nothing lost"));
        assertThat(r.seqs).hasSize(BATCHES - 100);
    }

    /**
     * Rule: records that were still being written when a snapshot began are not covered by it, though
     * numbered below its floor: damage to one of them is a loss. Here the snapshot of "a" holds batches
     * before 97 while 97 to 99 were pending.
     */
    @Test
    void damageToARecordPendingWhenTheSnapshotBeganIsALoss() throws IOException {
        try (Journal j = Journal.open(dir, SMALL)) {
            j.recover(new Recorder());
            for (int k = 0; k < BATCHES; k++) {
                if (k == 100) {
                    j.writeSnapshot(100, 97, List.of("a"), (id, out) -> {
                        out.write(1);
                        return new Journal.SnapshotEntry(96, null);
                    });
                }
                Journal.await(j.append("a", batch(k)));
            }
        }
        Path holding = null;
        long[] victim = null;
        for (Path p : segments()) {
            for (long[] f : frames(p)) {
                if (f[2] == 98) {
                    holding = p;
                    victim = f;
                }
            }
        }
        flipAByte(holding, victim[0] + 20);
        Recorder r = new Recorder();
        Journal.RecoveryReport report = recover(r);
        assertThat(report.lost()).singleElement().satisfies(l -> {
            assertThat(l.fromSeq()).isEqualTo(98);
            assertThat(l.toSeq()).isEqualTo(98);
        });
        assertThat(r.seqs).first().isEqualTo(97L);
        assertThat(r.seqs).hasSize(BATCHES - 97 - 1);
    }

    /** Rule: a deleted segment whose records a snapshot holds loses nothing. */
    @Test
    void aDeletedSegmentTheSnapshotCoversLosesNothing() throws IOException {
        fill(100);
        List<Path> segs = segments();
        assertThat(frames(segs.get(1)).get(frames(segs.get(1)).size() - 1)[2]).isLessThan(100);
        Files.delete(segs.get(1));
        Recorder r = new Recorder();
        Journal.RecoveryReport report = recover(r);
        assertThat(report.lost()).isEmpty();
        assertThat(r.seqs).hasSize(BATCHES - 100);
    }

    /**
     * Rule: the newest segment gone leaves no gap behind it; the head file that names the newest segment
     * shows it, and the loss is reported (how many records it held is not known).
     */
    @Test
    void aDeletedNewestSegmentIsReported() throws IOException {
        fill(-1);
        List<Path> segs = segments();
        Path newest = segs.get(segs.size() - 1);
        long first = frames(newest).get(0)[2];
        Files.delete(newest);
        Recorder r = new Recorder();
        Journal.RecoveryReport report = recover(r);
        assertThat(report.lost()).singleElement().satisfies(l -> {
            assertThat(l.fromSeq()).isEqualTo(first);
            assertThat(l.toKnown()).isFalse();
        });
        assertThat(r.seqs).isEqualTo(allBut(first, BATCHES));
    }

    /**
     * Rule: damage inside the last segment that is not its last record is damage, not a torn write: the
     * record is lost and reported, and the last record after it is read.
     */
    @Test
    void damageBeforeTheLastRecordOfTheLastSegmentIsNotTakenForATornTail() throws IOException {
        fill(-1);
        List<Path> segs = segments();
        Path last = segs.get(segs.size() - 1);
        List<long[]> frames = frames(last);
        long[] victim = frames.get(frames.size() - 2);
        // The length field itself: now it claims to run past the end of the file, as a torn write's would.
        flipAByte(last, victim[0] + 1);
        Recorder r = new Recorder();
        Journal.RecoveryReport report = recover(r);
        assertThat(report.lost()).singleElement().satisfies(l -> assertThat(l.fromSeq()).isEqualTo(victim[2]));
        assertThat(r.seqs).isEqualTo(allBut(victim[2], victim[2]));
        assertThat(report.bytesCut()).isZero();
    }

    /** Rule: a torn last record is cut and is no loss: it was never acknowledged. */
    @Test
    void aTornLastRecordIsCutWithoutReportingALoss() throws IOException {
        fill(-1);
        List<Path> segs = segments();
        Path last = segs.get(segs.size() - 1);
        try (RandomAccessFile f = new RandomAccessFile(last.toFile(), "rw")) {
            f.setLength(f.length() - 5);
        }
        Recorder r = new Recorder();
        Journal.RecoveryReport report = recover(r);
        assertThat(report.lost()).isEmpty();
        assertThat(report.bytesCut()).isPositive();
        assertThat(r.seqs).isEqualTo(allBut(BATCHES - 1, BATCHES - 1));
    }

    /**
     * Rule: a segment of the journal's earlier layout (records without sequence numbers) is not taken for
     * damage and cut: the start is refused with a message that says so, and the file is left as it was.
     */
    @Test
    void aSegmentOfTheEarlierLayoutIsRefusedNotCut() throws IOException {
        java.io.ByteArrayOutputStream payload = new java.io.ByteArrayOutputStream();
        java.io.DataOutputStream out = new java.io.DataOutputStream(payload);
        out.writeByte(1);
        out.writeUTF("a");
        out.writeInt(0);
        byte[] p = payload.toByteArray();
        java.util.zip.CRC32C c = new java.util.zip.CRC32C();
        c.update(p);
        byte[] frame = ByteBuffer.allocate(8 + p.length).putInt(p.length).putInt((int) c.getValue()).put(p).array();
        Path old = dir.resolve("segment-00000000000000000000.wal");
        Files.write(old, frame);
        org.assertj.core.api.Assertions.assertThatThrownBy(() -> recover(new Recorder()))
                .isInstanceOf(IOException.class).hasMessageContaining("earlier layout");
        assertThat(Files.readAllBytes(old)).isEqualTo(frame);
    }

    /** Rule: files in the directory that are not the journal's are ignored with a note, never fatal. */
    @Test
    void strayFilesAreIgnoredWithANote() throws IOException {
        fill(-1);
        Files.writeString(dir.resolve("notes.txt"), "copied here by hand");
        Files.writeString(dir.resolve("segment-old.wal"), "not a segment name this journal writes");
        Files.createDirectory(dir.resolve("lost+found"));
        Recorder r = new Recorder();
        Journal.RecoveryReport report = recover(r);
        assertThat(report.notes()).anyMatch(n -> n.contains("ignored notes.txt"))
                .anyMatch(n -> n.contains("ignored segment-old.wal")).anyMatch(n -> n.contains("ignored lost+found"));
        assertThat(report.lost()).isEmpty();
        assertThat(r.seqs).hasSize(BATCHES);
        assertThat(dir.resolve("notes.txt")).exists();
    }

    /**
     * Rule: a new file is durable only once its directory entry is: the directory is forced after a
     * segment is created and after a snapshot is renamed into place (POSIX fsync(2)).
     */
    @Test
    void theDirectoryIsForcedAfterASegmentIsCreatedAndAfterASnapshotIsRenamed() throws IOException {
        FaultyFiles files = new FaultyFiles();
        try (Journal j = Journal.open(dir, SMALL, files)) {
            j.recover(new Recorder());
            for (int k = 0; k < 60; k++) {
                Journal.await(j.append("a", batch(k)));
            }
            j.writeSnapshot(j.nextSeq(), List.of(new Journal.SessionSnapshot("a", 59, new byte[] {1})));
        }
        List<String> events = files.events();
        List<String> segmentsOpened = events.stream().filter(e -> e.matches("open segment-\\d+\\.wal")).toList();
        assertThat(segmentsOpened).as("the first segment and at least one roll-over").hasSizeGreaterThan(1);
        for (String opened : segmentsOpened) {
            int at = events.indexOf(opened);
            assertThat(events.subList(at + 1, events.size())).as("forced after " + opened)
                    .first().isEqualTo("force-dir " + dir.getFileName());
        }
        int snapshotOpened = events.indexOf("open snapshot-00000000000000000060.bin.tmp");
        assertThat(snapshotOpened).isNotNegative();
        assertThat(events.subList(snapshotOpened + 1, events.size())).contains("force-dir " + dir.getFileName());
        assertThat(dir.resolve("snapshot-00000000000000000060.bin")).exists();
    }
}
