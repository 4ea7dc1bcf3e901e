package org.wayhold.session;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.DataInputStream;
import java.io.DataOutputStream;
import java.io.IOException;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Random;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;

/**
 * A session written to a snapshot and read back continues bit for bit as the original: the property
 * a restart after a crash relies on (exact hand check: the same code on the same inputs).
 */
class SessionSnapshotTest {

    private static final Settings SETTINGS = Settings.defaults();

    /**
     * Batches of about 1 s, each shuffled, with half the fixes arriving one batch late (GNSS latency),
     * so time ordering re-filters from its checkpoints.
     */
    private static List<List<Sample>> shuffledBatches(List<Sample> samples, long seed) {
        Random rnd = new Random(seed);
        List<List<Sample>> batches = new ArrayList<>();
        List<Sample> current = new ArrayList<>();
        List<Sample> delayed = new ArrayList<>();
        double start = samples.get(0).t();
        for (Sample s : samples) {
            if (s.t() - start >= 1.0) {
                Collections.shuffle(current, rnd);
                batches.add(current);
                current = new ArrayList<>(delayed);
                delayed.clear();
                start = s.t();
            }
            if (s instanceof GnssFix && rnd.nextBoolean()) {
                delayed.add(s);
            } else {
                current.add(s);
            }
        }
        current.addAll(delayed);
        Collections.shuffle(current, rnd);
        batches.add(current);
        return batches;
    }

    private static byte[] snapshot(VehicleSession s) throws IOException {
        ByteArrayOutputStream bytes = new ByteArrayOutputStream();
        try (DataOutputStream out = new DataOutputStream(bytes)) {
            s.writeSnapshot(out, () -> 0L);
        }
        return bytes.toByteArray();
    }

    @Test
    void aRestoredSessionContinuesBitForBitAsTheOriginal() throws IOException {
        SimulatedDrive drive = DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(4).withTunnelsS(30),
                77);
        List<List<Sample>> batches = shuffledBatches(drive.samples(), 5);
        // Cut inside the tunnel, where an outage, held fixes and checkpoints are all live.
        double cutT = drive.tunnels().get(0).startT() + 10.0;
        VehicleSession original = new VehicleSession("rig-3", SETTINGS, null);
        int i = 0;
        while (batches.get(i).get(0).t() < cutT) {
            original.submit(batches.get(i++));
        }
        byte[] bytes = snapshot(original);
        VehicleSession restored = new VehicleSession("rig-3", SETTINGS, null);
        restored.readSnapshot(new DataInputStream(new ByteArrayInputStream(bytes)));

        assertThat(restored.latest()).isEqualTo(original.latest());
        assertThat(restored.version()).isEqualTo(original.version());
        assertThat(snapshot(restored)).isEqualTo(bytes);
        for (; i < batches.size(); i++) {
            assertThat(restored.submit(batches.get(i))).isEqualTo(original.submit(batches.get(i)));
            assertThat(restored.latest()).isEqualTo(original.latest());
        }
        assertThat(restored.track(drive.startT(), drive.endT())).isEqualTo(original.track(drive.startT(), drive.endT()));
        assertThat(restored.fixes(drive.startT(), drive.endT())).isEqualTo(original.fixes(drive.startT(), drive.endT()))
                .isNotEmpty();
        assertThat(restored.stats()).isEqualTo(original.stats());
        assertThat(original.stats().rewinds()).isPositive();
    }

    @Test
    void aSnapshotOfAnotherVehicleOrATruncatedOneIsRefused() throws IOException {
        SimulatedDrive drive = DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(2), 78);
        VehicleSession original = new VehicleSession("rig-3", SETTINGS, null);
        original.submit(drive.samples().subList(0, 5000));
        byte[] bytes = snapshot(original);

        VehicleSession other = new VehicleSession("rig-4", SETTINGS, null);
        assertThatThrownBy(() -> other.readSnapshot(new DataInputStream(new ByteArrayInputStream(bytes))))
                .isInstanceOf(IOException.class).hasMessageContaining("rig-3");
        byte[] cut = java.util.Arrays.copyOf(bytes, bytes.length / 2);
        VehicleSession fresh = new VehicleSession("rig-3", SETTINGS, null);
        assertThatThrownBy(() -> fresh.readSnapshot(new DataInputStream(new ByteArrayInputStream(cut))))
                .isInstanceOf(IOException.class);
    }
}
