package org.wayhold.stream;

import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.DataInputStream;
import java.io.DataOutputStream;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Properties;
import org.apache.kafka.common.serialization.Serdes;
import org.apache.kafka.streams.KeyValue;
import org.apache.kafka.streams.StreamsConfig;
import org.apache.kafka.streams.TestInputTopic;
import org.apache.kafka.streams.TestOutputTopic;
import org.apache.kafka.streams.TopologyTestDriver;
import org.apache.kafka.streams.state.KeyValueStore;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.wayhold.pipeline.VehiclePipeline;
import org.wayhold.pipeline.TrackOutput;
import org.wayhold.sample.Sample;
import org.wayhold.session.VehicleSession;
import org.wayhold.settings.Settings;
import org.wayhold.settings.WorkerSettings;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;
import org.wayhold.simulate.TimeWindow;

/**
 * The worker's topology without a broker ({@code TopologyTestDriver}). Expected values come from the
 * service itself ({@code VehicleSession} fed the same records: the worker must give the same poses bit
 * for bit, since both run the one pipeline), from the simulator's truth (tunnel times and distances) and
 * from the contract's rejection codes.
 */
class WorkerTopologyTest {

    private static final Settings SETTINGS = Settings.defaults();
    private static final WorkerSettings W = SETTINGS.worker();
    private static final ObjectMapper JSON = new ObjectMapper();

    @TempDir
    Path stateDir;

    private TopologyTestDriver driver;
    private TestInputTopic<String, byte[]> samples;
    private TestOutputTopic<String, byte[]> poses;
    private TestOutputTopic<String, byte[]> events;
    private TestOutputTopic<String, byte[]> rejected;

    @BeforeEach
    void start() {
        Properties p = Worker.properties(W, "127.0.0.1:9", stateDir);
        p.put(StreamsConfig.PROCESSING_GUARANTEE_CONFIG, StreamsConfig.EXACTLY_ONCE_V2);
        driver = new TopologyTestDriver(WorkerTopology.build(SETTINGS), p);
        samples = driver.createInputTopic(W.samplesTopic(), Serdes.String().serializer(), Serdes.ByteArray().serializer());
        poses = driver.createOutputTopic(W.posesTopic(), Serdes.String().deserializer(), Serdes.ByteArray().deserializer());
        events = driver.createOutputTopic(W.eventsTopic(), Serdes.String().deserializer(), Serdes.ByteArray().deserializer());
        rejected = driver.createOutputTopic(W.deadLetterTopic(), Serdes.String().deserializer(),
                Serdes.ByteArray().deserializer());
    }

    @AfterEach
    void stop() {
        driver.close();
    }

    private static SimulationSettings minutes(double m) {
        return SimulationSettings.defaults().withMinutes(m);
    }

    private Map<String, List<String>> posesByVehicle() {
        Map<String, List<String>> out = new LinkedHashMap<>();
        for (KeyValue<String, byte[]> kv : poses.readKeyValuesToList()) {
            out.computeIfAbsent(kv.key, k -> new ArrayList<>()).add(new String(kv.value, StandardCharsets.UTF_8));
        }
        return out;
    }

    private void send(List<Fleet.Batch> records) {
        for (Fleet.Batch b : records) {
            samples.pipeInput(b.vehicleId(), b.ndjson());
        }
    }

    @Test
    void threeVehiclesGiveTheServicesPosesBitForBitWhateverTheBatching() {
        List<List<Fleet.Batch>> perVehicle = new ArrayList<>();
        double[] batchS = {0.02, 0.5, 3.0};
        for (int v = 0; v < 3; v++) {
            List<Sample> drive = Fleet.drive(minutes(2).withTunnelsS(20), 100 + v);
            perVehicle.add(Fleet.batches("car-" + v, drive, batchS[v]));
        }
        List<Fleet.Batch> records = Fleet.interleave(perVehicle);
        send(records);

        Map<String, List<String>> expected = Fleet.servicePoses(SETTINGS, records);
        Map<String, List<String>> actual = posesByVehicle();
        assertThat(actual.keySet()).containsExactlyInAnyOrder("car-0", "car-1", "car-2");
        for (String id : expected.keySet()) {
            assertThat(actual.get(id)).as(id).hasSizeGreaterThan(100).isEqualTo(expected.get(id));
        }
        assertThat(rejected.isEmpty()).isTrue();
    }

    @Test
    void lateSamplesWithinTheWindowAreReorderedAsTheServiceReordersThem() {
        List<Sample> drive = Fleet.drive(minutes(1), 7);
        List<Fleet.Batch> inOrder = Fleet.batches("van", drive, 0.5);
        // Swap neighbouring records: each second record arrives 0.5 s late, inside ordering.max_lag_s (2 s).
        List<Fleet.Batch> swapped = new ArrayList<>(inOrder);
        for (int i = 1; i + 1 < swapped.size(); i += 2) {
            Fleet.Batch a = swapped.get(i);
            swapped.set(i, swapped.get(i + 1));
            swapped.set(i + 1, a);
        }
        send(swapped);
        assertThat(posesByVehicle().get("van")).isEqualTo(Fleet.servicePoses(SETTINGS, swapped).get("van"));
        assertThat(rejected.isEmpty()).isTrue();
    }

    @Test
    void refusedSamplesGoToTheDeadLetterTopicWithTheirReasonCodes() throws IOException {
        List<Sample> drive = Fleet.drive(minutes(1), 8);
        List<Fleet.Batch> records = Fleet.batches("van", drive, 1.0);
        send(records.subList(0, 20));
        String late = new String(Fleet.ndjson(records.get(2).samples().subList(0, 1)), StandardCharsets.UTF_8);
        String body = late
                + "{\"type\":\"wheel_speed\",\"t\":\n"
                + "{\"type\":\"wheel_speed\",\"t\":" + (drive.get(drive.size() - 1).t() - 1) + "}\n"
                + "{\"type\":\"wheel_speed\",\"t\":" + (records.get(19).samples().get(0).t() + 30) + ",\"speed\":1e300}\n"
                + "{\"type\":\"wheel_speed\",\"t\":" + (records.get(19).samples().get(0).t() + 9000) + ",\"speed\":1.0}\n";
        samples.pipeInput("van", body.getBytes(StandardCharsets.UTF_8));
        samples.pipeInput("not a vehicle id", "{}".getBytes(StandardCharsets.UTF_8));
        samples.pipeInput((String) null, "{}".getBytes(StandardCharsets.UTF_8));

        List<JsonNode> letters = new ArrayList<>();
        for (byte[] v : rejected.readValuesToList()) {
            letters.add(JSON.readTree(v));
        }
        // Codes of sample.RejectionReason; lines are 1-based within the record.
        assertThat(letters).extracting(n -> n.get("code").asText() + "@" + n.get("line").asInt()).containsExactly(
                "malformed@2", "invalid@3", "implausible@4", "late@1", "ahead@5", "invalid@0", "invalid@0");
        assertThat(letters.get(3).get("sample").asText()).isEqualTo(late.strip());
        assertThat(letters.get(3).get("error").asText()).startsWith("t: late by ");
        assertThat(letters.get(3).get("source").get("topic").asText()).isEqualTo(W.samplesTopic());
        assertThat(letters.get(3).get("source").get("offset").asLong()).isEqualTo(20);
        assertThat(letters.get(1).get("sample").asText()).startsWith("{\"type\":\"wheel_speed\"");
        assertThat(letters.get(5).get("vehicle").asText()).isEqualTo("not a vehicle id");
        assertThat(letters.get(6).get("vehicle").isNull()).isTrue();
        assertThat(letters.get(6).get("error").asText()).contains("was missing");
    }

    @Test
    void aTunnelGivesOutageEventsThatMatchTheSimulatedTruth() throws IOException {
        SimulatedDrive d = DriveSimulator.simulate(minutes(5).withTunnelsS(90), 21);
        List<Sample> drive = Fleet.drive(minutes(5).withTunnelsS(90), 21);
        send(Fleet.batches("bus", drive, 1.0));
        List<JsonNode> got = new ArrayList<>();
        for (byte[] v : events.readValuesToList()) {
            got.add(JSON.readTree(v));
        }
        assertThat(got).extracting(n -> n.get("event").asText())
                .containsExactly("outage_start", "unreliable", "outage_end");
        TimeWindow tunnel = d.tunnels().get(0);
        JsonNode start = got.get(0);
        JsonNode end = got.get(2);
        // The simulator's tunnel (seeded truth): no fix between its ends. The last fix before it is at most
        // one fix interval (0.2 s at 5 Hz) before the entry. It ends with the first fix used after the
        // exit: exit fixes are held until gating.reacquire_fixes agree, and the simulator's multipath
        // offsets after an exit may be gated for a few seconds, hence up to 5 s beyond the tunnel.
        assertThat(start.get("since").asDouble()).isBetween(tunnel.startT() - 0.2 - 1e-9, tunnel.startT());
        assertThat(end.get("length_s").asDouble()).isBetween(tunnel.endT() - tunnel.startT(),
                tunnel.endT() - tunnel.startT() + 5.0);
        // Distance driven over the outage (from its last fix to the fix that ended it) from the truth,
        // against the filter's dead-reckoned distance up to the last pose inside: within 3 % (the drift
        // budget of dead reckoning, common practice) plus 5 m for the last history interval.
        double sinceT = start.get("since").asDouble();
        double truthM = d.truthAt(sinceT + end.get("length_s").asDouble()).distanceM() - d.truthAt(sinceT).distanceM();
        assertThat(end.get("distance_m").asDouble()).isCloseTo(truthM, org.assertj.core.data.Offset.offset(0.03 * truthM + 5.0));
        assertThat(end.get("state").asText()).isNotEqualTo("unreliable");
        assertThat(got.get(1).get("radius95").asDouble()).isGreaterThan(SETTINGS.outage().alertLimitM());
    }

    @Test
    void theStoredStateIsTheJournalsCodecAndDecodesToTheServicesFilter() throws IOException {
        List<Sample> drive = Fleet.drive(minutes(3).withTunnelsS(30), 5);
        List<Fleet.Batch> records = Fleet.batches("van", drive, 0.7);
        send(records);
        KeyValueStore<String, byte[]> store = driver.getKeyValueStore(WorkerTopology.STORE);
        byte[] workerState = store.get("van");

        VehicleSession session = new VehicleSession("van", SETTINGS, null);
        for (Fleet.Batch b : records) {
            session.submit(b.samples());
        }
        ByteArrayOutputStream snapshot = new ByteArrayOutputStream();
        session.writeSnapshot(new DataOutputStream(snapshot), () -> 0L);
        // The session snapshot: format, vehicle id, then the pipeline state the worker stores too.
        DataInputStream in = new DataInputStream(new ByteArrayInputStream(snapshot.toByteArray()));
        in.readInt();
        in.readUTF();
        VehiclePipeline fromServe = new VehiclePipeline(SETTINGS, SETTINGS.profileFor("van"), null, TrackOutput.NONE);
        fromServe.readState(in);
        VehiclePipeline fromWorker = new VehicleStep(SETTINGS).restore("van", workerState);

        assertThat(fromWorker.snapshot()).isEqualTo(fromServe.snapshot());
        assertThat(fromWorker.epochT()).isEqualTo(fromServe.epochT());
        assertThat(fromWorker.newestT()).isEqualTo(fromServe.newestT());
        assertThat(stateBytes(fromWorker)).isEqualTo(stateBytes(fromServe));
        assertThat(fromWorker.latestPose()).isEqualTo(session.latest().orElseThrow());
    }

    @Test
    void theStoreHoldsNoHistorySoItsSizeDoesNotGrowWithTheDrive() {
        List<Sample> drive = Fleet.drive(minutes(6), 9);
        List<Fleet.Batch> records = Fleet.batches("van", drive, 1.0);
        KeyValueStore<String, byte[]> store = driver.getKeyValueStore(WorkerTopology.STORE);
        int half = records.size() / 2;
        send(records.subList(0, half));
        int atHalf = store.get("van").length;
        send(records.subList(half, records.size()));
        int atEnd = store.get("van").length;
        // The reorder window's samples and checkpoints (ordering.max_lag_s = 2 s) and the filter: tens of
        // kilobytes at most, the same after 3 and 6 minutes (a history would double).
        assertThat(atEnd).isLessThan(64 * 1024);
        assertThat((double) atEnd).isCloseTo(atHalf, org.assertj.core.data.Percentage.withPercentage(25));
    }

    private static byte[] stateBytes(VehiclePipeline p) throws IOException {
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        p.writeState(new DataOutputStream(out));
        return out.toByteArray();
    }
}
