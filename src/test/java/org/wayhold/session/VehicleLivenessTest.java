package org.wayhold.session;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.DataInputStream;
import java.io.DataOutputStream;
import java.io.IOException;
import java.util.List;
import java.util.concurrent.CompletableFuture;
import org.assertj.core.data.Offset;
import org.junit.jupiter.api.Test;
import org.wayhold.ordering.Admission;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;
import org.wayhold.settings.OutageSettings;
import org.wayhold.settings.Settings;
import org.wayhold.testing.MutableClock;

/**
 * Arrival times and staleness on the service's wall clock: only samples that arrive through the live
 * path and are applied count; a session restored from a snapshot or the journal has no arrival time
 * and counts its silence from its restoration. Expected values are the hand-moved test clock's.
 */
class VehicleLivenessTest {

    private static final long START_MS = 1_796_428_800_000L;
    private static final double STALE_AFTER_S = 3.0;

    private static Settings settings() {
        Settings d = Settings.defaults();
        return new Settings(d.server(), d.filter(), d.gating(), new OutageSettings(1.5, 10.0, STALE_AFTER_S),
                d.ordering(), d.history(), d.vehicles());
    }

    private static List<WheelSpeed> wheels(double fromT, int n) {
        List<WheelSpeed> out = new java.util.ArrayList<>();
        for (int i = 0; i < n; i++) {
            out.add(new WheelSpeed(fromT + 0.1 * i, 5.0));
        }
        return out;
    }

    @Test
    void liveArrivalsAreStampedAndTheVehicleTurnsStaleAfterTheConfiguredSilence() {
        MutableClock clock = new MutableClock(START_MS);
        SessionRegistry r = new SessionRegistry(settings(), null, SessionLog.NONE, clock);
        Liveness before = r.getOrCreate("v").session().liveness();
        assertThat(before.receivedAtS()).isNaN();
        assertThat(before.stale()).isFalse();

        clock.advanceS(1.0);
        r.submit("v", wheels(1000.0, 5));
        Liveness fresh = r.find("v").orElseThrow().session().liveness();
        assertThat(fresh.receivedAtS()).isEqualTo((START_MS + 1000) / 1000.0);
        assertThat(fresh.silentS()).isZero();

        clock.advanceS(STALE_AFTER_S);
        assertThat(r.find("v").orElseThrow().session().liveness().stale()).as("exactly the stale time").isFalse();
        clock.advanceS(0.001);
        Liveness stale = r.find("v").orElseThrow().session().liveness();
        assertThat(stale.stale()).isTrue();
        assertThat(stale.silentS()).isEqualTo(STALE_AFTER_S + 0.001, Offset.offset(1e-9));

        // Duplicates only: nothing new arrived, so the vehicle stays stale.
        r.submit("v", wheels(1000.0, 5));
        assertThat(r.find("v").orElseThrow().session().liveness().stale()).isTrue();
        r.submit("v", List.of(new YawRate(1000.6, 0.0)));
        assertThat(r.find("v").orElseThrow().session().liveness().stale()).isFalse();
    }

    @Test
    void aRestoredSessionHasNoArrivalTimeAndCountsItsSilenceFromTheRestore() throws Exception {
        MutableClock clock = new MutableClock(START_MS);
        VehicleSession live = new VehicleSession("v", settings(), null, clock);
        live.submit(wheels(1000.0, 20), b -> SessionLog.DONE);
        assertThat(live.liveness().receivedAtS()).isEqualTo(START_MS / 1000.0);
        ByteArrayOutputStream bytes = new ByteArrayOutputStream();
        live.writeSnapshot(new DataOutputStream(bytes), () -> 0L);

        clock.advanceS(60.0);
        VehicleSession restored = new VehicleSession("v", settings(), null, clock);
        restored.readSnapshot(new DataInputStream(new ByteArrayInputStream(bytes.toByteArray())));
        // Journal replay uses the unrecorded submit: a replayed batch did not arrive now.
        restored.submit(wheels(1002.0, 5));
        assertThat(restored.liveness().receivedAtS()).isNaN();
        assertThat(restored.liveness().stale()).isFalse();
        clock.advanceS(STALE_AFTER_S + 0.5);
        assertThat(restored.liveness().stale()).isTrue();
        assertThat(restored.liveness().silentS()).isEqualTo(STALE_AFTER_S + 0.5);
    }

    @Test
    void aBatchAppliedOnceDurableCountsFromItsArrivalAndOneRefusedOrReplayedDoesNotCount() throws Exception {
        MutableClock clock = new MutableClock(START_MS);
        VehicleSession s = new VehicleSession("v", settings(), null, clock);
        CompletableFuture<Long> refused = new CompletableFuture<>();
        VehicleSession.Applied lost = s.submit(wheels(1000.0, 5), b -> refused);
        refused.completeExceptionally(new IOException("device full"));
        assertThatThrownBy(lost::admissions).isInstanceOf(IOException.class);
        assertThat(s.liveness().receivedAtS()).as("a refused batch was never applied").isNaN();

        s.replay(wheels(1000.0, 5), 7L);
        assertThat(s.liveness().receivedAtS()).as("a replayed batch did not arrive now").isNaN();

        CompletableFuture<Long> slow = new CompletableFuture<>();
        clock.advanceS(2.0);
        VehicleSession.Applied pending = s.submit(wheels(1000.5, 5), b -> slow);
        assertThat(s.liveness().receivedAtS()).as("not applied before its record is durable").isNaN();
        clock.advanceS(0.25);
        slow.complete(8L);
        assertThat(pending.admissions()).allMatch(a -> a.kind() == Admission.Kind.APPLIED);
        // Stamped when it arrived (hand-moved clock: START + 2 s), not when its record became durable.
        assertThat(s.liveness().receivedAtS()).isEqualTo((START_MS + 2000) / 1000.0);
        assertThat(s.liveness().silentS()).isEqualTo(0.25, Offset.offset(1e-9));
    }
}
