package org.wayhold.session;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

import java.io.IOException;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.concurrent.CompletableFuture;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.Sample;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.settings.Settings;

/**
 * The registry records in its session log exactly what it applies, in application order per vehicle,
 * and a deletion before any later batch of the same id; a log that cannot write is reported to the
 * caller. Expected values are exact hand cases.
 */
class SessionLogOrderTest {

    /** Remembers every record and completes it at once, or fails it when told to. */
    private static final class Recording implements SessionLog {
        final List<String> records = Collections.synchronizedList(new ArrayList<>());
        volatile boolean failing;

        @Override
        public CompletableFuture<Long> batch(String vehicleId, List<? extends Sample> samples) {
            records.add("batch " + vehicleId + " " + samples.size() + " from t=" + samples.get(0).t());
            return outcome();
        }

        @Override
        public CompletableFuture<Long> delete(String vehicleId) {
            records.add("delete " + vehicleId);
            return outcome();
        }

        private CompletableFuture<Long> outcome() {
            return failing ? CompletableFuture.failedFuture(new IOException("disk full"))
                    : CompletableFuture.completedFuture((long) records.size() - 1);
        }
    }

    private static List<Sample> speeds(double t0, int n) {
        List<Sample> out = new ArrayList<>();
        for (int i = 0; i < n; i++) {
            out.add(new WheelSpeed(t0 + 0.02 * i, 10.0));
        }
        return out;
    }

    @Test
    void batchesAndDeletionsAreLoggedInTheOrderTheyWereApplied() throws IOException {
        Recording log = new Recording();
        SessionRegistry registry = new SessionRegistry(Settings.defaults(), null, log);
        registry.submit("a", speeds(100.0, 3)).awaitRecorded();
        registry.submit("b", speeds(200.0, 2)).awaitRecorded();
        assertThat(registry.delete("a")).isTrue();
        assertThat(registry.delete("a")).as("nothing left to delete, nothing logged").isFalse();
        SessionRegistry.Submission again = registry.submit("a", speeds(300.0, 1));
        again.awaitRecorded();
        assertThat(log.records).containsExactly("batch a 3 from t=100.0", "batch b 2 from t=200.0", "delete a",
                "batch a 1 from t=300.0");
        assertThat(registry.find("a").orElseThrow().session().stats().wheelSpeedApplied())
                .as("the batch after the deletion went to a fresh session").isEqualTo(1);
    }

    @Test
    void theRemoveUsedByRecoveryLogsNothing() {
        Recording log = new Recording();
        SessionRegistry registry = new SessionRegistry(Settings.defaults(), null, log);
        registry.getOrCreate("a").session().submit(speeds(100.0, 2));
        assertThat(registry.remove("a")).isTrue();
        assertThat(log.records).isEmpty();
    }

    /**
     * Rule: a batch is applied only once its record is durable (write-ahead), so a batch the log could
     * not write is reported to the caller and is not in the session, and a deletion that could not be
     * written leaves the session in place: memory never holds what a restart would not bring back.
     */
    @Test
    void aLogThatCannotWriteIsReportedToTheCallerAndNothingIsApplied() throws IOException {
        Recording log = new Recording();
        SessionRegistry registry = new SessionRegistry(Settings.defaults(), null, log);
        registry.submit("a", speeds(100.0, 3)).awaitRecorded();
        log.failing = true;
        SessionRegistry.Submission s = registry.submit("a", speeds(200.0, 2));
        assertThatThrownBy(s::admissions).isInstanceOf(IOException.class).hasMessage("disk full");
        assertThat(registry.find("a").orElseThrow().session().stats().wheelSpeedApplied())
                .as("only the batch that was written").isEqualTo(3);
        assertThatThrownBy(() -> registry.delete("a")).isInstanceOf(IOException.class);
        assertThat(registry.find("a")).as("a deletion that was not written does not happen").isPresent();
        SessionRegistry.Submission first = registry.submit("b", speeds(300.0, 1));
        assertThatThrownBy(first::awaitRecorded).isInstanceOf(IOException.class);
        assertThat(registry.find("b")).as("a first batch that was not written leaves no session").isEmpty();
        log.failing = false;
        assertThat(registry.submit("a", speeds(200.0, 2)).admissions()).hasSize(2);
        assertThat(registry.find("a").orElseThrow().session().stats().wheelSpeedApplied()).isEqualTo(5);
    }
}
