package org.wayhold.session;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.Sample;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.settings.ServerSettings;
import org.wayhold.settings.Settings;

/** The registry creates one session per vehicle id on demand, bounded by server.max_sessions. */
class SessionRegistryTest {

    private static Settings withMaxSessions(int max) {
        Settings d = Settings.defaults();
        ServerSettings s = d.server();
        return new Settings(new ServerSettings(s.port(), s.bind(), s.writeTokens(), s.readTokens(), s.maxBodyBytes(),
                s.maxLineBytes(), s.maxSamplesPerRequest(), max, s.maxVehicleIdChars(), s.maxSamplesPerSecondPerVehicle(),
                s.rateBurstS(), s.corsOrigins(), s.sseKeepAliveS(), s.idleTimeoutS(), s.minBodyBytesPerS(), s.drainTimeoutS(), s.maxConcurrentUploads(), s.maxStreams()), d.filter(), d.gating(), d.outage(), d.ordering(), d.history(), Map.of());
    }

    @Test
    void oneSessionPerVehicleIdWithAFreshSerialEachTimeItIsCreated() {
        SessionRegistry r = new SessionRegistry(withMaxSessions(10), null);
        SessionRegistry.Entry a = r.getOrCreate("a");
        assertThat(r.getOrCreate("a")).isSameAs(a);
        assertThat(r.find("a")).contains(a);
        assertThat(r.find("b")).isEmpty();
        assertThat(r.remove("a")).isTrue();
        assertThat(r.remove("a")).isFalse();
        SessionRegistry.Entry again = r.getOrCreate("a");
        assertThat(again.session()).isNotSameAs(a.session());
        assertThat(again.serial()).isGreaterThan(a.serial());
    }

    @Test
    void theSessionLimitRefusesNewVehiclesButNotKnownOnes() {
        SessionRegistry r = new SessionRegistry(withMaxSessions(2), null);
        r.getOrCreate("a");
        r.getOrCreate("b");
        assertThatThrownBy(() -> r.getOrCreate("c")).isInstanceOf(SessionLimitException.class)
                .hasMessageContaining("server.max_sessions").hasMessageContaining("2");
        assertThat(r.getOrCreate("a")).isNotNull();
        r.remove("b");
        assertThat(r.getOrCreate("c")).isNotNull();
        assertThat(r.size()).isEqualTo(2);
    }

    @Test
    void sessionsAreListedByIdAndRemovalsAreAnnounced() {
        SessionRegistry r = new SessionRegistry(withMaxSessions(10), null);
        List<String> removed = new ArrayList<>();
        r.addRemovalListener(s -> removed.add(s.vehicleId()));
        r.getOrCreate("b");
        r.getOrCreate("a");
        r.getOrCreate("c");
        assertThat(r.sessions()).extracting(VehicleSession::vehicleId).containsExactly("a", "b", "c");
        r.remove("b");
        r.remove("nobody");
        assertThat(removed).containsExactly("b");
    }

    @Test
    void aReplayHandsOverEverySampleOnceInLogOrder() {
        List<Sample> log = new ArrayList<>();
        for (int i = 0; i < 500; i++) {
            log.add(new WheelSpeed(1_800_000_000.0 + 0.01 * i, 1.0));
        }
        List<Sample> received = new ArrayList<>();
        int[] batches = new int[1];
        // A million times real time: the 5 s log is due within microseconds, so the test waits on nothing.
        new LogReplay(log, 1e6, batch -> {
            received.addAll(batch);
            batches[0]++;
        }).run();
        assertThat(received).containsExactlyElementsOf(log);
        assertThat(batches[0]).isGreaterThanOrEqualTo(1);
        assertThatThrownBy(() -> new LogReplay(log, 0.0, b -> { })).hasMessageStartingWith("speed:");
    }
}
