package org.wayhold.stream;

import static org.assertj.core.api.Assertions.assertThat;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.concurrent.atomic.AtomicBoolean;
import java.util.concurrent.atomic.AtomicLong;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.wayhold.config.ConfigLoader;
import org.wayhold.sample.Sample;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.SimulationSettings;
import org.wayhold.testing.KafkaBroker;
import org.wayhold.testing.WorkerChild;

/**
 * Two workers share a fleet of 200 simulated vehicles; one of them, a child JVM running the real
 * {@code wayhold worker} command, dies by SIGKILL halfway through. A {@code read_committed} reader of the
 * poses topic must then see, for every vehicle, exactly the poses the service gives for the same records
 * (a single {@code VehicleSession} per vehicle, the expected values), bit for bit: a sample applied twice
 * or missed would change the filter's state and every pose after it.
 */
class WorkerFailoverTest {

    private static final int VEHICLES = 200;
    private static KafkaBroker broker;

    @TempDir
    static Path dir;

    @BeforeAll
    static void startBroker() throws Exception {
        KafkaBroker.logLevel("off");
        broker = KafkaBroker.start();
    }

    @AfterAll
    static void stopBroker() {
        if (broker != null) {
            broker.close();
        }
    }

    @Test
    void aWorkerKilledHalfwayLosesNothingAndAppliesNothingTwice() throws Exception {
        // A short session timeout makes the survivor take over in seconds (the default is 10 s); commits
        // every 0.5 s write each vehicle's state to the changelog once for several records of the backlog.
        String yaml = """
                worker:
                  application_id: failover
                  partitions: 6
                  replication_factor: 1
                  session_timeout_s: 6.0
                  commit_interval_s: 0.5
                """;
        Path config = dir.resolve("worker.yaml");
        Files.writeString(config, yaml);
        Settings settings = ConfigLoader.loadOrDefaults(config);

        List<List<Fleet.Batch>> perVehicle = new ArrayList<>();
        SimulationSettings sim = SimulationSettings.defaults().withDurationS(60);
        for (int v = 0; v < VEHICLES; v++) {
            List<Sample> drive = Fleet.drive(sim, 5000 + v);
            perVehicle.add(Fleet.batches(String.format("truck-%03d", v), drive, 1.0));
        }
        List<Fleet.Batch> records = Fleet.interleave(perVehicle);
        Map<String, List<String>> expected = Fleet.servicePoses(settings, records);
        long expectedTotal = KafkaIo.total(expected);

        try (Worker survivor = new Worker(settings, broker.bootstrap())) {
            survivor.start();
            assertThat(survivor.awaitRunning(Duration.ofSeconds(60))).isTrue();
            WorkerChild child = WorkerChild.start(dir.resolve("child.log"),
                    List.of("--bootstrap", broker.bootstrap(), "--config", config.toString()), 90);
            try {
                // Both workers in the group before the first sample: the partitions are shared from the start.
                waitForTwoMembers(settings.worker().applicationId());
                KafkaIo.produce(broker.bootstrap(), settings.worker().samplesTopic(), records);

                AtomicBoolean killed = new AtomicBoolean();
                AtomicLong seen = new AtomicLong();
                Map<String, List<String>> actual = KafkaIo.read(broker.bootstrap(), settings.worker().posesTopic(),
                        Duration.ofSeconds(150), Duration.ofSeconds(3), n -> n >= expectedTotal, r -> {
                            if (seen.incrementAndGet() >= expectedTotal / 2 && killed.compareAndSet(false, true)) {
                                try {
                                    child.kill();
                                } catch (InterruptedException e) {
                                    Thread.currentThread().interrupt();
                                }
                            }
                        });
                assertThat(killed).isTrue();
                assertThat(child.process().isAlive()).isFalse();
                assertThat(Files.readString(child.output())).doesNotContain("wayhold worker stopped");
                assertThat(actual.keySet()).hasSize(VEHICLES);
                for (Map.Entry<String, List<String>> e : expected.entrySet()) {
                    assertThat(actual.get(e.getKey())).as(e.getKey()).isEqualTo(e.getValue());
                }
                assertThat(KafkaIo.total(actual)).isEqualTo(expectedTotal);
            } finally {
                child.kill();
            }
        }
    }

    private void waitForTwoMembers(String group) throws Exception {
        java.util.Properties p = new java.util.Properties();
        p.put("bootstrap.servers", broker.bootstrap());
        try (org.apache.kafka.clients.admin.Admin admin = org.apache.kafka.clients.admin.Admin.create(p)) {
            long deadline = System.nanoTime() + Duration.ofSeconds(60).toNanos();
            while (System.nanoTime() < deadline) {
                var d = admin.describeConsumerGroups(List.of(group)).all().get().get(group);
                if (d.members().size() == 2 && d.groupState() == org.apache.kafka.common.GroupState.STABLE
                        && d.members().stream().allMatch(m -> !m.assignment().topicPartitions().isEmpty())) {
                    return;
                }
                Thread.sleep(100);
            }
            throw new AssertionError("the two workers did not share the partitions within 60 s");
        }
    }
}
