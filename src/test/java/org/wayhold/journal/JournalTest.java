package org.wayhold.journal;

import static org.assertj.core.api.Assertions.assertThat;

import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.DataInputStream;
import java.io.DataOutputStream;
import java.io.IOException;
import java.io.RandomAccessFile;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.wayhold.pose.Pose;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;
import org.wayhold.session.VehicleSession;
import org.wayhold.settings.JournalSettings;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;

/**
 * The journal keeps every acknowledged batch, cuts exactly a torn or corrupt tail, and with snapshots
 * restores sessions bit for bit (exact checks: the same code on the same inputs, and hand-made damage).
 */
class JournalTest {

    private static final JournalSettings FAST = new JournalSettings(true, 0.0, 4096, 3600.0, 1L << 30, 60.0);

    /** Records what recovery hands over. */
    private static final class Recorder implements Journal.RecoveryTarget {
        final List<String> events = new ArrayList<>();
        final Map<String, byte[]> restored = new HashMap<>();
        final List<List<Sample>> batches = new ArrayList<>();
        /** Deletions as they void kept replies: every deletion read, whether or not it is replayed. */
        final List<String> voids = new ArrayList<>();

        @Override
        public void restore(String vehicleId, byte[] snapshot) {
            restored.put(vehicleId, snapshot);
            events.add("restore " + vehicleId);
        }

        @Override
        public void replay(String vehicleId, List<Sample> batch, long seq) {
            batches.add(batch);
            events.add("replay " + vehicleId + " " + seq + " " + batch.size());
        }

        @Override
        public void delete(String vehicleId, long seq) {
            events.add("delete " + vehicleId + " " + seq);
        }

        @Override
        public void reply(Journal.KeptReply reply) {
            events.add("reply " + reply.vehicleId() + " " + reply.seq() + " " + Arrays.toString(reply.reply()));
        }

        @Override
        public void repliesVoided(String vehicleId, long seq) {
            voids.add(vehicleId + " below " + seq);
        }
    }

    private static List<Sample> batch(int k) {
        double t = 1_800_000_000.0 + k;
        return List.of(new WheelSpeed(t, 10.0 + k), new YawRate(t, 0.01 * k),
                GnssFix.position(t + 0.5, 47.0 + k * 1e-5, 8.0, 1.0));
    }

    private static Path lastSegment(Path dir) throws IOException {
        try (Stream<Path> s = Files.list(dir)) {
            return s.filter(p -> p.getFileName().toString().endsWith(".wal")).sorted().reduce((a, b) -> b)
                    .orElseThrow();
        }
    }

    /** A fresh journal holding batches 0 to 4 of vehicle "a"; returns its last segment. */
    private static Path fiveBatches(Path dir) throws IOException {
        try (Journal j = Journal.open(dir, FAST)) {
            j.recover(new Recorder());
            for (int k = 0; k < 5; k++) {
                Journal.await(j.append("a", batch(k)));
            }
        }
        return lastSegment(dir);
    }

    /** Hand-made damage: flips one bit of the byte at {@code offset}. */
    private static void flipABit(Path file, long offset) throws IOException {
        try (RandomAccessFile f = new RandomAccessFile(file.toFile(), "rw")) {
            f.seek(offset);
            int b = f.read();
            f.seek(offset);
            f.write(b ^ 0x40);
        }
    }

    @Test
    void everyAppendedBatchComesBackInOrderAcrossSegments(@TempDir Path dir) throws IOException {
        try (Journal j = Journal.open(dir, FAST)) {
            j.recover(new Recorder());
            for (int k = 0; k < 200; k++) {
                assertThat(Journal.await(j.append(k % 2 == 0 ? "a" : "b", batch(k)))).isEqualTo(k);
            }
            Journal.await(j.appendDelete("b"));
        }
        Recorder r = new Recorder();
        try (Journal j = Journal.open(dir, FAST)) {
            Journal.RecoveryReport report = j.recover(r);
            assertThat(report.recordsReplayed()).isEqualTo(201);
            assertThat(report.samplesReplayed()).isEqualTo(600);
            assertThat(report.bytesCut()).isZero();
            assertThat(j.nextSeq()).isEqualTo(201);
        }
        for (int k = 0; k < 200; k++) {
            assertThat(r.batches.get(k)).isEqualTo(batch(k));
        }
        assertThat(r.events.get(200)).isEqualTo("delete b 200");
        try (Stream<Path> s = Files.list(dir)) {
            assertThat(s.filter(p -> p.toString().endsWith(".wal")).count()).as("4 KiB segments").isGreaterThan(5);
        }
    }

    @Test
    void aTornLastRecordIsCutExactly(@TempDir Path dir) throws IOException {
        Path seg = fiveBatches(dir);
        long size = Files.size(seg);
        try (RandomAccessFile f = new RandomAccessFile(seg.toFile(), "rw")) {
            f.setLength(size - 7);
        }
        Recorder r = new Recorder();
        try (Journal j = Journal.open(dir, FAST)) {
            Journal.RecoveryReport report = j.recover(r);
            assertThat(report.recordsReplayed()).isEqualTo(4);
            // The cut is the remaining part of the fifth record: its full size less the 7 bytes torn off.
            assertThat(report.bytesCut()).isEqualTo(recordBytes(batch(4)) - 7);
            assertThat(j.nextSeq()).isEqualTo(4);
            Journal.await(j.append("a", batch(9)));
        }
        Recorder again = new Recorder();
        try (Journal j = Journal.open(dir, FAST)) {
            assertThat(j.recover(again).recordsReplayed()).isEqualTo(5);
        }
        assertThat(again.batches.get(4)).isEqualTo(batch(9));
    }

    @Test
    void aCorruptLastRecordIsCutExactlyByItsChecksum(@TempDir Path dir) throws IOException {
        Path seg = fiveBatches(dir);
        long size = Files.size(seg);
        flipABit(seg, size - 3);
        Recorder r = new Recorder();
        try (Journal j = Journal.open(dir, FAST)) {
            Journal.RecoveryReport report = j.recover(r);
            assertThat(report.recordsReplayed()).isEqualTo(4);
            assertThat(report.bytesCut()).isEqualTo(recordBytes(batch(4)));
            assertThat(report.notes()).anyMatch(n -> n.contains("cut"));
        }
    }

    /**
     * Regression: a snapshot can cover records that were queued but not yet written when the process
     * died. Numbering after recovery must go past them, or the next record of that vehicle reuses a
     * covered number and the following recovery skips an acknowledged batch.
     */
    @Test
    void recordsAfterASnapshotThatCoversUnwrittenRecordsAreNotSkipped(@TempDir Path dir) throws IOException {
        try (Journal j = Journal.open(dir, FAST)) {
            j.recover(new Recorder());
            for (int k = 0; k < 3; k++) {
                Journal.await(j.append("a", batch(k)));
            }
            // As if records 3, 4 and 5 of "a" had been applied and captured but never reached the file.
            j.writeSnapshot(3, List.of(new Journal.SessionSnapshot("a", 5, new byte[] {42})));
        }
        try (Journal j = Journal.open(dir, FAST)) {
            Journal.RecoveryReport report = j.recover(new Recorder());
            assertThat(report.sessionsFromSnapshot()).isEqualTo(1);
            assertThat(j.nextSeq()).isEqualTo(6);
            assertThat(Journal.await(j.append("a", batch(7)))).isEqualTo(6);
        }
        Recorder r = new Recorder();
        try (Journal j = Journal.open(dir, FAST)) {
            assertThat(j.recover(r).recordsReplayed()).isEqualTo(1);
        }
        assertThat(r.events).containsExactly("restore a", "replay a 6 3");
        assertThat(r.batches).containsExactly(batch(7));
    }

    /**
     * Rule: a start reads no segment wholly older than what its snapshot needs, so a kept reply must come
     * back from the snapshot (with the number of its record) once its segment is no longer read; reply
     * records after the snapshot come back from the journal, and a deletion anywhere voids what was
     * handed over before it. Exact event lists: the same code on hand-made records.
     */
    @Test
    void keptRepliesComeBackFromTheSnapshotOnceTheirSegmentIsNoLongerRead(@TempDir Path dir) throws IOException {
        long replySeq;
        long[] keptAt = {-2};
        try (Journal j = Journal.open(dir, FAST)) {
            j.recover(new Recorder());
            Journal.await(j.append("a", batch(0)));
            replySeq = Journal.await(j.appendReply("a", new byte[] {7}, seq -> keptAt[0] = seq));
            // Enough batches to fill the first 4 KiB segment and start another.
            for (int k = 1; k < 60; k++) {
                Journal.await(j.append("a", batch(k)));
            }
            long floor = j.nextSeq();
            j.writeSnapshot(floor, j.firstPendingSeq(), List.of("a"), (id, out) -> {
                out.write(1);
                return new Journal.SnapshotEntry(floor - 1, null);
            }, List.of(new Journal.KeptReply("a", replySeq, new byte[] {7})));
            Journal.await(j.appendReply("a", new byte[] {8}, seq -> { }));
            Journal.await(j.appendDelete("a"));
        }
        assertThat(keptAt[0]).as("the reply is kept with the number of its record").isEqualTo(replySeq);
        try (Stream<Path> s = Files.list(dir)) {
            assertThat(s.filter(p -> p.getFileName().toString().endsWith(".wal")).count()).isGreaterThan(1);
        }
        Recorder r = new Recorder();
        try (Journal j = Journal.open(dir, FAST)) {
            j.recover(r);
        }
        assertThat(r.events).containsExactly("reply a " + replySeq + " [7]", "restore a", "reply a 61 [8]",
                "delete a 62");
        assertThat(r.voids).containsExactly("a below 62");
    }

    /**
     * What recovery keeps of the replies it is handed: each once, without those a later deletion of their
     * vehicle voids (only those numbered below the deletion: a reply of the vehicle's next session, in a
     * snapshot read before the deletion's record, stays), and oldest first beyond the byte bound.
     */
    @Test
    void recoveredRepliesAreVoidedByNumberAndBoundedInBytes() {
        SessionJournal.Replies replies = new SessionJournal.Replies(3);
        replies.add(new Journal.KeptReply("a", 5, new byte[] {1}));
        replies.add(new Journal.KeptReply("a", 5, new byte[] {1}));
        replies.add(new Journal.KeptReply("b", 6, new byte[] {2}));
        replies.add(new Journal.KeptReply("a", 9, new byte[] {3}));
        replies.voidVehicle("a", 7);
        assertThat(replies.list()).extracting(Journal.KeptReply::seq).containsExactly(6L, 9L);
        replies.add(new Journal.KeptReply("c", 10, new byte[] {4, 4}));
        assertThat(replies.list()).extracting(Journal.KeptReply::seq).containsExactly(9L, 10L);
    }

    @Test
    void appendsAfterCloseFailAtOnceInsteadOfWaitingForever(@TempDir Path dir) throws IOException {
        Journal j = Journal.open(dir, FAST);
        j.recover(new Recorder());
        j.close();
        assertThat(j.append("a", batch(0))).isCompletedExceptionally();
        assertThat(j.appendDelete("a")).isCompletedExceptionally();
    }

    /** Size of one batch record on disk: 8 header bytes and the payload, which starts with its sequence number. */
    private static long recordBytes(List<Sample> batch) throws IOException {
        ByteArrayOutputStream bytes = new ByteArrayOutputStream();
        DataOutputStream out = new DataOutputStream(bytes);
        out.writeLong(0L);
        out.writeByte(1);
        out.writeUTF("a");
        out.writeInt(batch.size());
        for (Sample s : batch) {
            org.wayhold.sample.SampleCodec.write(out, s);
        }
        out.flush();
        return 8 + bytes.size();
    }

    @Test
    void anUnreadableNewestSnapshotFallsBackToThePreviousOneWithEveryRecordAfterIt(@TempDir Path dir)
            throws IOException {
        // Segments of at most 4 KiB and a retention of a microsecond: everything retention may delete,
        // it deletes. Snapshots after batches 10, 20 and 30 stand for the sessions with their floor.
        JournalSettings eager = new JournalSettings(true, 0.0, 4096, 1e-6, 4096, 60.0);
        long[] floors = new long[3];
        try (Journal j = Journal.open(dir, eager)) {
            j.recover(new Recorder());
            for (int k = 0; k < 40; k++) {
                Journal.await(j.append("van-" + (k % 2), batch(k)));
                if (k % 10 == 9 && k < 39) {
                    int n = k / 10;
                    floors[n] = j.nextSeq();
                    j.writeSnapshot(floors[n], List.of(new Journal.SessionSnapshot("van-0", floors[n] - 1,
                            ("state " + n).getBytes(java.nio.charset.StandardCharsets.UTF_8))));
                }
            }
        }
        Path newest;
        try (Stream<Path> s = Files.list(dir)) {
            List<Path> snaps = s.filter(p -> p.getFileName().toString().startsWith("snapshot-")).sorted().toList();
            assertThat(snaps).as("the newest two snapshots are kept").hasSize(2);
            newest = snaps.get(1);
        }
        // The newest snapshot is damaged after it was written (one flipped byte in its body).
        flipABit(newest, Files.size(newest) / 2);
        Recorder r = new Recorder();
        Journal.RecoveryReport report;
        try (Journal j = Journal.open(dir, eager)) {
            report = j.recover(r);
        }
        assertThat(report.notes()).anyMatch(n -> n.contains("unreadable, an older one is used"));
        assertThat(new String(r.restored.get("van-0"), java.nio.charset.StandardCharsets.UTF_8)).isEqualTo("state 1");
        // Every record from the older snapshot's floor on is replayed, none missing, in order.
        List<Long> seqs = r.events.stream().filter(e -> e.startsWith("replay ")).map(e -> Long.parseLong(e.split(" ")[2]))
                .toList();
        assertThat(seqs).first().isEqualTo(floors[1]);
        for (int i = 1; i < seqs.size(); i++) {
            assertThat(seqs.get(i)).isEqualTo(seqs.get(i - 1) + 1);
        }
        assertThat(r.batches.get(r.batches.size() - 1)).isEqualTo(batch(39));
    }

    @Test
    void sessionsRestoredFromASnapshotAndTheJournalEqualAnUninterruptedRun(@TempDir Path dir) throws IOException {
        Settings settings = Settings.defaults();
        SimulatedDrive drive = DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(4).withTunnelsS(30),
                31);
        List<List<Sample>> batches = new ArrayList<>();
        List<Sample> all = drive.samples();
        for (int i = 0; i < all.size(); i += 157) {
            batches.add(all.subList(i, Math.min(all.size(), i + 157)));
        }
        Map<String, VehicleSession> live = new LinkedHashMap<>();
        Map<String, Long> lastSeq = new HashMap<>();
        JournalSettings small = new JournalSettings(true, 0.001, 64 * 1024, 1e-3, 64 * 1024, 60.0);
        try (Journal j = Journal.open(dir, small)) {
            j.recover(new Recorder());
            for (int i = 0; i < batches.size(); i++) {
                for (String id : List.of("van-1", "van-2")) {
                    if (id.equals("van-2") && i % 3 == 0) {
                        continue;
                    }
                    VehicleSession s = live.computeIfAbsent(id, v -> new VehicleSession(v, settings, null));
                    long seq;
                    synchronized (s) {
                        s.submit(batches.get(i));
                        seq = Journal.await(j.append(id, batches.get(i)));
                    }
                    lastSeq.put(id, seq);
                }
                // Two snapshots: segments before the older one's floor may then go (see applyRetention).
                if (i == batches.size() / 3 || i == batches.size() / 2) {
                    long floor = j.nextSeq();
                    List<Journal.SessionSnapshot> snaps = new ArrayList<>();
                    for (Map.Entry<String, VehicleSession> e : live.entrySet()) {
                        ByteArrayOutputStream bytes = new ByteArrayOutputStream();
                        e.getValue().writeSnapshot(new DataOutputStream(bytes), () -> 0L);
                        snaps.add(new Journal.SessionSnapshot(e.getKey(), lastSeq.get(e.getKey()), bytes.toByteArray()));
                    }
                    j.writeSnapshot(floor, snaps);
                }
            }
        }
        Map<String, VehicleSession> recovered = new HashMap<>();
        Journal.RecoveryReport report;
        try (Journal j = Journal.open(dir, small)) {
            report = j.recover(new Journal.RecoveryTarget() {
                @Override
                public void restore(String vehicleId, byte[] snapshot) throws IOException {
                    VehicleSession s = new VehicleSession(vehicleId, settings, null);
                    s.readSnapshot(new DataInputStream(new ByteArrayInputStream(snapshot)));
                    recovered.put(vehicleId, s);
                }

                @Override
                public void replay(String vehicleId, List<Sample> batch, long seq) {
                    recovered.computeIfAbsent(vehicleId, v -> new VehicleSession(v, settings, null)).submit(batch);
                }

                @Override
                public void delete(String vehicleId, long seq) {
                    recovered.remove(vehicleId);
                }
            });
        }
        assertThat(report.sessionsFromSnapshot()).isEqualTo(2);
        assertThat(report.recordsReplayed()).isLessThan(2L * batches.size() / 2 + 4);
        for (String id : live.keySet()) {
            Pose expected = live.get(id).latest().orElseThrow();
            assertThat(recovered.get(id).latest()).contains(expected);
            assertThat(recovered.get(id).track(drive.startT(), drive.endT()))
                    .isEqualTo(live.get(id).track(drive.startT(), drive.endT()));
        }
        try (Stream<Path> s = Files.list(dir)) {
            assertThat(s.filter(p -> p.toString().endsWith(".wal")).count())
                    .as("segments covered by the older of the two snapshots and past the 64 KiB retention are deleted")
                    .isLessThan(2L * batches.size() * 157 * 20 / (64 * 1024));
        }
    }
}
