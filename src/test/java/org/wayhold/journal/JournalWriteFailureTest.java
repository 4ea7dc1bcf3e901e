package org.wayhold.journal;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

import java.io.IOException;
import java.nio.file.Path;
import java.util.List;
import java.util.function.BooleanSupplier;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.wayhold.sample.Sample;
import org.wayhold.session.SessionRegistry;
import org.wayhold.session.SessionStats;
import org.wayhold.session.VehicleSession;
import org.wayhold.settings.Settings;
import org.wayhold.testing.FaultyFiles;
import org.wayhold.testing.SessionSurgery;

/**
 * A journal that cannot write (a full disk, a failing device; injected by {@link FaultyFiles}) refuses
 * batches without applying them, and writes again by itself once it can. Expected values: in-process
 * sessions fed exactly the acknowledged batches (the same code, so poses agree to the last bit).
 */
class JournalWriteFailureTest {

    private static final Settings SETTINGS = Settings.defaults();
    private static final List<List<Sample>> A = SessionSurgery.batches(81L, 1.0);

    @TempDir
    Path dir;

    private final FaultyFiles files = new FaultyFiles();

    private static boolean isSegment(String name) {
        return name.startsWith("segment-");
    }

    private static long applied(VehicleSession s) {
        SessionStats st = s.stats();
        return st.wheelSpeedApplied() + st.yawRateApplied() + st.gnssApplied() + st.referenceApplied();
    }

    /** A session fed the given batches of {@link #A}, in this order. */
    private static VehicleSession reference(int... batches) {
        VehicleSession s = new VehicleSession("van-a", SETTINGS, null);
        for (int b : batches) {
            s.submit(A.get(b));
        }
        return s;
    }

    /** Waits (at most 20 s: the journal retries at least every second) until the condition holds. */
    private static void await(BooleanSupplier condition) throws InterruptedException {
        for (int i = 0; i < 2000 && !condition.getAsBoolean(); i++) {
            Thread.sleep(10);
        }
        assertThat(condition.getAsBoolean()).isTrue();
    }

    /**
     * Rule: never apply a batch that was not acknowledged. A batch the journal could not write is
     * refused and is not in the session, and it does not come back after a restart.
     */
    @Test
    void aBatchTheJournalCouldNotWriteIsNeitherAppliedNorRecovered() throws IOException {
        SessionJournal j = SessionJournal.open(dir, SETTINGS, null, files);
        SessionRegistry r = j.sessions();
        r.submit("van-a", A.get(0)).awaitRecorded();
        r.submit("van-a", A.get(1)).awaitRecorded();
        files.fail(FaultyFiles.Fault.DISK_FULL, name -> true);
        SessionRegistry.Submission refused = r.submit("van-a", A.get(2));
        assertThatThrownBy(refused::admissions).isInstanceOf(IOException.class).hasMessageContaining("No space left");
        VehicleSession live = r.find("van-a").orElseThrow().session();
        assertThat(live.latest()).isEqualTo(reference(0, 1).latest());
        assertThat(applied(live)).isEqualTo(applied(reference(0, 1)));
        assertThat(j.status().writable()).isFalse();
        assertThatThrownBy(j::close).as("the last snapshot cannot be written either").isInstanceOf(IOException.class);
        try (SessionJournal again = SessionJournal.open(dir, SETTINGS, null)) {
            assertThat(again.sessions().find("van-a").orElseThrow().session().latest())
                    .isEqualTo(reference(0, 1).latest());
            assertThat(again.recovery().lost()).isEmpty();
        }
    }

    /**
     * Rule: a batch whose write reached the file but whose force failed is refused, and its bytes are cut
     * from the segment before anything else is written, so that no restart can bring it back.
     */
    @Test
    void aBatchWhoseForceFailedIsCutAndNeverComesBack() throws Exception {
        try (SessionJournal j = SessionJournal.open(dir, SETTINGS, null, files)) {
            SessionRegistry r = j.sessions();
            r.submit("van-a", A.get(0)).awaitRecorded();
            r.submit("van-a", A.get(1)).awaitRecorded();
            files.fail(FaultyFiles.Fault.FORCE_FAILS, JournalWriteFailureTest::isSegment);
            assertThatThrownBy(() -> r.submit("van-a", A.get(2)).admissions()).isInstanceOf(IOException.class);
            files.heal();
            await(() -> j.status().writable());
            r.submit("van-a", A.get(3)).awaitRecorded();
            assertThat(r.find("van-a").orElseThrow().session().latest()).isEqualTo(reference(0, 1, 3).latest());
        }
        // Without the shutdown snapshot's help: the journal alone must hold exactly batches 0, 1 and 3.
        java.nio.file.Files.list(dir).filter(p -> p.getFileName().toString().startsWith("snapshot-"))
                .forEach(p -> p.toFile().delete());
        try (SessionJournal again = SessionJournal.open(dir, SETTINGS, null)) {
            assertThat(again.sessions().find("van-a").orElseThrow().session().latest())
                    .isEqualTo(reference(0, 1, 3).latest());
            assertThat(again.recovery().lost()).as("refused records are not lost records").isEmpty();
            assertThat(again.recovery().notes()).anyMatch(n -> n.contains("refused"));
        }
    }

    /**
     * Rule: once the journal can write again, writes resume without a restart (retried on a timer even
     * when no batch arrives), and every batch acknowledged before and after is recovered.
     */
    @Test
    void writesResumeWithoutARestartOnceTheDiskHasRoomAgain() throws Exception {
        try (SessionJournal j = SessionJournal.open(dir, SETTINGS, null, files)) {
            SessionRegistry r = j.sessions();
            r.submit("van-a", A.get(0)).awaitRecorded();
            files.fail(FaultyFiles.Fault.DISK_FULL, JournalWriteFailureTest::isSegment);
            for (int i = 1; i <= 3; i++) {
                int batch = i;
                assertThatThrownBy(() -> r.submit("van-a", A.get(batch)).awaitRecorded()).isInstanceOf(IOException.class);
            }
            assertThat(j.status().writable()).isFalse();
            assertThat(j.status().failure()).isEqualTo("IOException");
            files.heal();
            await(() -> j.status().writable());
            assertThat(j.status().writeFailures()).isEqualTo(1);
            for (int i = 1; i <= 3; i++) {
                r.submit("van-a", A.get(i)).awaitRecorded();
            }
            assertThat(r.find("van-a").orElseThrow().session().latest()).isEqualTo(reference(0, 1, 2, 3).latest());
        }
        try (SessionJournal again = SessionJournal.open(dir, SETTINGS, null)) {
            assertThat(again.sessions().find("van-a").orElseThrow().session().latest())
                    .isEqualTo(reference(0, 1, 2, 3).latest());
        }
    }
}
