package org.wayhold.journal;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.function.BooleanSupplier;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.wayhold.sample.Sample;
import org.wayhold.settings.JournalSettings;
import org.wayhold.settings.Settings;
import org.wayhold.testing.FaultyFiles;
import org.wayhold.testing.SessionSurgery;

/**
 * Snapshots are written as a stream, and no failure of one (even an Error) stops the next one or the
 * journal's close. Faults are injected by {@link FaultyFiles}; expected values are exact hand cases.
 */
class SnapshotFailureTest {

    private static final List<List<Sample>> A = SessionSurgery.batches(91L, 1.0);

    @TempDir
    Path dir;

    private final FaultyFiles files = new FaultyFiles();

    private static Settings snapshotEvery(double seconds) {
        Settings d = Settings.defaults();
        JournalSettings j = d.journal();
        return new Settings(d.server(), d.filter(), d.gating(), d.outage(), d.ordering(), d.history(), d.vehicles(),
                new JournalSettings(j.fsync(), j.groupCommitMaxS(), j.segmentBytes(), j.retentionAgeS(),
                        j.retentionBytes(), seconds));
    }

    private static boolean isSnapshot(String name) {
        return name.startsWith("snapshot-");
    }

    private static void await(BooleanSupplier condition) throws InterruptedException {
        for (int i = 0; i < 2000 && !condition.getAsBoolean(); i++) {
            Thread.sleep(10);
        }
        assertThat(condition.getAsBoolean()).isTrue();
    }

    private List<String> leftovers() throws IOException {
        try (Stream<Path> s = Files.list(dir)) {
            return s.map(p -> p.getFileName().toString()).filter(n -> n.endsWith(".tmp")).toList();
        }
    }

    /**
     * Rule: a snapshot run that fails for any reason, an OutOfMemoryError included, is reported (status
     * and log) and the schedule keeps running: the next run after the fault succeeds.
     */
    @Test
    void anOutOfMemoryErrorInAScheduledSnapshotIsReportedAndTheScheduleGoesOn() throws Exception {
        try (SessionJournal j = SessionJournal.open(dir, snapshotEvery(0.02), null, files)) {
            j.sessions().submit("van-a", A.get(0)).awaitRecorded();
            files.fail(FaultyFiles.Fault.OUT_OF_MEMORY, SnapshotFailureTest::isSnapshot);
            j.startSnapshots();
            await(() -> j.snapshotFailures() >= 3);
            assertThat(j.status().lastSnapshotError()).contains("OutOfMemoryError");
            assertThat(j.status().snapshotsWritten()).isZero();
            files.heal();
            await(() -> j.status().snapshotsWritten() >= 1 && j.status().lastSnapshotError() == null);
            assertThat(leftovers()).as("a failed snapshot leaves no temporary file").isEmpty();
        }
    }

    /**
     * Rule: the last snapshot at close failing, even with an Error, still closes the journal: the
     * directory is released and nothing acknowledged is lost.
     */
    @Test
    void closeReleasesTheDirectoryEvenWhenTheLastSnapshotFailsWithAnError() throws IOException {
        SessionJournal j = SessionJournal.open(dir, snapshotEvery(3600), null, files);
        j.sessions().submit("van-a", A.get(0)).awaitRecorded();
        files.fail(FaultyFiles.Fault.OUT_OF_MEMORY, SnapshotFailureTest::isSnapshot);
        assertThatThrownBy(j::close).isInstanceOf(OutOfMemoryError.class);
        try (SessionJournal again = SessionJournal.open(dir, snapshotEvery(3600), null)) {
            assertThat(again.sessions().find("van-a").orElseThrow().session().latest())
                    .isEqualTo(SessionSurgery.fed("van-a", Settings.defaults(), A, 1).latest());
        }
    }

    /**
     * Rule: a snapshot is streamed to its file one session at a time (memory holds one session, not all):
     * by the time a session is written, the sessions before it are in the file, save for what the 64 KiB
     * output buffer holds.
     */
    @Test
    void aSnapshotIsStreamedToTheFileOneSessionAtATime() throws IOException {
        int sessionBytes = 256 * 1024;
        List<Long> writtenBefore = new ArrayList<>();
        try (Journal j = Journal.open(dir, JournalSettings.defaults(), files)) {
            j.recover(new NoRecovery());
            long start = files.bytesWritten();
            j.writeSnapshot(j.nextSeq(), j.firstPendingSeq(), List.of("s0", "s1", "s2", "s3"), (id, out) -> {
                writtenBefore.add(files.bytesWritten() - start);
                out.write(new byte[sessionBytes]);
                return new Journal.SnapshotEntry(-1, null);
            });
        }
        for (int k = 1; k < 4; k++) {
            assertThat(writtenBefore.get(k)).as("bytes in the file when session %d is written", k)
                    .isGreaterThanOrEqualTo((long) k * sessionBytes - 64 * 1024);
        }
        List<String> restored = new ArrayList<>();
        try (Journal j = Journal.open(dir, JournalSettings.defaults())) {
            j.recover(new NoRecovery() {
                @Override
                public void restore(String vehicleId, byte[] snapshot) {
                    assertThat(snapshot).hasSize(sessionBytes);
                    restored.add(vehicleId);
                }
            });
        }
        assertThat(restored).containsExactly("s0", "s1", "s2", "s3");
    }

    /**
     * Rule: a start that had to replay journal records takes a snapshot at once, so that a service that
     * crashes more often than the snapshot interval does not replay a longer journal at every start.
     */
    @Test
    void aStartThatReplayedRecordsTakesASnapshotAtOnce() throws Exception {
        try (Journal j = Journal.open(dir, JournalSettings.defaults())) {
            j.recover(new NoRecovery());
            for (int i = 0; i < 5; i++) {
                Journal.await(j.append("van-a", A.get(i)));
            }
        }
        try (SessionJournal j = SessionJournal.open(dir, snapshotEvery(3600), null)) {
            assertThat(j.recovery().recordsReplayed()).isEqualTo(5);
            j.startSnapshots();
            await(() -> j.status().snapshotsWritten() == 1);
        }
        try (SessionJournal j = SessionJournal.open(dir, snapshotEvery(3600), null)) {
            assertThat(j.recovery().recordsReplayed()).isZero();
            assertThat(j.recovery().sessionsFromSnapshot()).isEqualTo(1);
        }
    }

    private static class NoRecovery implements Journal.RecoveryTarget {
        @Override
        public void restore(String vehicleId, byte[] snapshot) {
        }

        @Override
        public void replay(String vehicleId, List<Sample> batch, long seq) {
        }

        @Override
        public void delete(String vehicleId, long seq) {
        }
    }
}
