package org.wayhold.journal;

import static org.assertj.core.api.Assertions.assertThat;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.wayhold.sample.Sample;
import org.wayhold.session.SessionRegistry;
import org.wayhold.session.VehicleSession;
import org.wayhold.settings.JournalSettings;
import org.wayhold.settings.Settings;
import org.wayhold.testing.SessionSurgery;

/**
 * A vehicle whose session cannot be trusted is rebuilt another way or quarantined, and never stops the
 * start or touches another vehicle. Expected values: in-process sessions fed the same batches (the same
 * code, so poses agree to the last bit), and corruption made by hand ({@link SessionSurgery}).
 */
class SessionQuarantineTest {

    private static final Settings SETTINGS = Settings.defaults();
    private static final List<List<Sample>> A = SessionSurgery.batches(71L, 2.0);
    private static final List<List<Sample>> B = SessionSurgery.batches(72L, 2.0);

    @TempDir
    Path dir;

    private static Settings withJournal(JournalSettings j) {
        return new Settings(SETTINGS.server(), SETTINGS.filter(), SETTINGS.gating(), SETTINGS.outage(),
                SETTINGS.ordering(), SETTINGS.history(), SETTINGS.vehicles(), j);
    }

    private static void post(SessionRegistry r, String id, List<Sample> batch) throws IOException {
        r.submit(id, batch).awaitRecorded();
    }

    private List<Path> snapshots() throws IOException {
        try (Stream<Path> s = Files.list(dir)) {
            return s.filter(p -> p.getFileName().toString().matches("snapshot-\\d+\\.bin")).sorted().toList();
        }
    }

    /**
     * Rule: a snapshot entry whose filter state is not finite is not restored; the vehicle is rebuilt
     * from the older snapshot and the journal records after it, exactly, and the other vehicle comes
     * from the newest snapshot.
     */
    @Test
    void anEntryWithANonFiniteFilterIsRebuiltFromTheOlderSnapshotAndTheJournal() throws IOException {
        int n = 90;
        try (SessionJournal j = SessionJournal.open(dir, SETTINGS, null)) {
            for (int i = 0; i < n; i++) {
                post(j.sessions(), "van-a", A.get(i));
                post(j.sessions(), "van-b", B.get(i));
                if (i == 40) {
                    j.snapshot();
                }
            }
        }
        List<Path> snaps = snapshots();
        assertThat(snaps).hasSize(2);
        SessionSurgery.rewriteEntry(snaps.get(1), "van-a",
                state -> SessionSurgery.withNonFiniteEast("van-a", SETTINGS, A, n, state));
        try (SessionJournal j = SessionJournal.open(dir, SETTINGS, null)) {
            VehicleSession a = j.sessions().find("van-a").orElseThrow().session();
            VehicleSession b = j.sessions().find("van-b").orElseThrow().session();
            assertThat(a.quarantineReason()).isEmpty();
            assertThat(a.latest()).isEqualTo(SessionSurgery.fed("van-a", SETTINGS, A, n).latest());
            assertThat(a.track(Double.NEGATIVE_INFINITY, Double.POSITIVE_INFINITY))
                    .isEqualTo(SessionSurgery.fed("van-a", SETTINGS, A, n).track(Double.NEGATIVE_INFINITY,
                            Double.POSITIVE_INFINITY));
            assertThat(b.latest()).isEqualTo(SessionSurgery.fed("van-b", SETTINGS, B, n).latest());
            assertThat(j.recovery().sessionsFromSnapshot()).isEqualTo(1);
            assertThat(j.recovery().lost()).isEmpty();
            assertThat(j.recovery().notes()).anyMatch(note -> note.contains("van-a") && note.contains("NaN")
                    && note.contains("restored from " + snaps.get(0).getFileName()));
        }
    }

    /**
     * Rule: a snapshot entry that does not decode, with no older snapshot or journal records left to
     * rebuild it from, never stops the start: that vehicle alone is quarantined with the reason, every
     * other vehicle is restored, and the quarantine survives a restart until the vehicle is deleted.
     */
    @Test
    void anEntryThatDoesNotDecodeWithNothingToRebuildFromQuarantinesOnlyThatVehicle() throws IOException {
        // Retention deletes every segment it may: no record older than the older snapshot is left.
        Settings eager = withJournal(new JournalSettings(true, 0.0, 4096, 1e-6, 4096, 60.0));
        int n = 90;
        try (SessionJournal j = SessionJournal.open(dir, eager, null)) {
            for (int i = 0; i < n; i++) {
                post(j.sessions(), "van-a", A.get(i));
                post(j.sessions(), "van-b", B.get(i));
                if (i == 30 || i == 60) {
                    j.snapshot();
                }
            }
        }
        for (Path snap : snapshots()) {
            SessionSurgery.rewriteEntry(snap, "van-a", SessionSurgery::withUnknownFormat);
        }
        try (SessionJournal j = SessionJournal.open(dir, eager, null)) {
            VehicleSession a = j.sessions().find("van-a").orElseThrow().session();
            assertThat(a.quarantineReason()).hasValueSatisfying(r -> assertThat(r).contains("no longer holds"));
            assertThat(j.sessions().find("van-b").orElseThrow().session().latest())
                    .isEqualTo(SessionSurgery.fed("van-b", SETTINGS, B, n).latest());
            assertThat(j.recovery().notes()).anyMatch(note -> note.contains("van-a") && note.contains("format 99"));
            post(j.sessions(), "van-b", B.get(n));
        }
        try (SessionJournal j = SessionJournal.open(dir, eager, null)) {
            assertThat(j.sessions().find("van-a").orElseThrow().session().quarantineReason()).isPresent();
            assertThat(j.sessions().find("van-b").orElseThrow().session().latest())
                    .isEqualTo(SessionSurgery.fed("van-b", SETTINGS, B, n + 1).latest());
            assertThat(j.sessions().delete("van-a")).isTrue();
            post(j.sessions(), "van-a", A.get(0));
        }
        try (SessionJournal j = SessionJournal.open(dir, eager, null)) {
            VehicleSession a = j.sessions().find("van-a").orElseThrow().session();
            assertThat(a.quarantineReason()).as("deleted and started afresh").isEmpty();
            assertThat(a.latest()).isEqualTo(SessionSurgery.fed("van-a", SETTINGS, A, 1).latest());
        }
    }

    /**
     * Rule: an exception while applying a journaled batch quarantines that vehicle only; recovery goes
     * on with every other vehicle. The entry here decodes, but its history runs ahead of its filter, so
     * the next batch makes the history refuse an older pose.
     */
    @Test
    void anExceptionWhileReplayingABatchQuarantinesOnlyThatVehicle() throws IOException {
        int n = 40;
        List<Long> seqOfA = new ArrayList<>();
        long lastOfB = -1;
        try (Journal j = Journal.open(dir, SETTINGS.journal())) {
            j.recover(new NoRecovery());
            for (int i = 0; i < n; i++) {
                seqOfA.add(Journal.await(j.append("van-a", A.get(i))));
                lastOfB = Journal.await(j.append("van-b", B.get(i)));
            }
            byte[] crafted = SessionSurgery.historyAheadOfFilter("van-a", SETTINGS, A, 20, 24);
            j.writeSnapshot(j.nextSeq(), List.of(
                    new Journal.SessionSnapshot("van-a", seqOfA.get(19), crafted),
                    new Journal.SessionSnapshot("van-b", lastOfB, SessionSurgery.state("van-b", SETTINGS, B, n))));
        }
        try (SessionJournal j = SessionJournal.open(dir, SETTINGS, null)) {
            assertThat(j.sessions().find("van-a").orElseThrow().session().quarantineReason())
                    .hasValueSatisfying(r -> assertThat(r).contains("applying journal record " + seqOfA.get(20)));
            assertThat(j.sessions().find("van-b").orElseThrow().session().latest())
                    .isEqualTo(SessionSurgery.fed("van-b", SETTINGS, B, n).latest());
        }
    }

    private static final class NoRecovery implements Journal.RecoveryTarget {
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
