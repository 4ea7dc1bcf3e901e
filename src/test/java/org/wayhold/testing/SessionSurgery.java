package org.wayhold.testing;

import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.DataInputStream;
import java.io.DataOutputStream;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.ByteBuffer;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.function.UnaryOperator;
import java.util.zip.CRC32C;
import org.wayhold.pipeline.FixRecord;
import org.wayhold.pipeline.TrackOutput;
import org.wayhold.pipeline.VehiclePipeline;
import org.wayhold.pose.Pose;
import org.wayhold.sample.Sample;
import org.wayhold.session.VehicleSession;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;

/**
 * Hand-made corruption of sessions and snapshots, for tests of what the service does with a session it
 * cannot trust. Every corruption is built from the project's own documented layouts: a session's state is
 * {@code [format i32][vehicle id UTF][pipeline state][history][fixes][version i64]}, and a snapshot file
 * is a sequence of frames {@code [length u32][CRC32C u32][payload]} whose session entries are
 * {@code [kind u8 = 1][vehicle id UTF][last sequence i64][state]}.
 */
public final class SessionSurgery {

    private SessionSurgery() {
    }

    /** A seeded simulated open-sky drive of {@code minutes}, cut into batches of one second. */
    public static List<List<Sample>> batches(long seed, double minutes) {
        SimulatedDrive d = DriveSimulator.simulate(SimulationSettings.defaults().withDurationS(minutes * 60.0), seed);
        List<List<Sample>> out = new ArrayList<>();
        List<Sample> current = new ArrayList<>();
        double t0 = d.samples().get(0).t();
        long index = 0;
        for (Sample s : d.samples()) {
            long k = (long) Math.floor(s.t() - t0);
            if (k != index && !current.isEmpty()) {
                out.add(current);
                current = new ArrayList<>();
            }
            index = k;
            current.add(s);
        }
        out.add(current);
        return out;
    }

    /** A session fed the first {@code n} batches, unrecorded. */
    public static VehicleSession fed(String id, Settings settings, List<List<Sample>> batches, int n) {
        VehicleSession s = new VehicleSession(id, settings, null);
        for (int i = 0; i < n; i++) {
            s.submit(batches.get(i));
        }
        return s;
    }

    /** The state bytes a session fed the first {@code n} batches writes. */
    public static byte[] state(String id, Settings settings, List<List<Sample>> batches, int n) {
        try {
            ByteArrayOutputStream bytes = new ByteArrayOutputStream();
            fed(id, settings, batches, n).writeSnapshot(new DataOutputStream(bytes), () -> 0L);
            return bytes.toByteArray();
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    private static VehiclePipeline pipeline(String id, Settings settings, List<List<Sample>> batches, int n) {
        VehiclePipeline p = new VehiclePipeline(settings, settings.profileFor(id), null, new TrackOutput() {
            @Override
            public void pose(Pose pose) {
            }

            @Override
            public void fix(FixRecord record) {
            }

            @Override
            public void rewoundTo(double tS) {
            }
        });
        for (int i = 0; i < n; i++) {
            p.submit(batches.get(i));
        }
        return p;
    }

    private static byte[] pipelineState(VehiclePipeline p) {
        try {
            ByteArrayOutputStream bytes = new ByteArrayOutputStream();
            p.writeState(new DataOutputStream(bytes));
            return bytes.toByteArray();
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /** Bytes of the session header: format and vehicle id. */
    private static int headerBytes(String id) {
        return 4 + 2 + id.getBytes(java.nio.charset.StandardCharsets.UTF_8).length;
    }

    /**
     * A state whose filter is that of {@code filterAfter} batches and whose history and fixes are those
     * of {@code historyAfter} batches (more): it decodes, but its history runs ahead of its filter, as
     * a snapshot mixed from two moments would. Applying the next batch then adds a pose older than the
     * newest held, which the history refuses with an exception.
     */
    public static byte[] historyAheadOfFilter(String id, Settings settings, List<List<Sample>> batches,
                                              int filterAfter, int historyAfter) {
        byte[] early = state(id, settings, batches, filterAfter);
        byte[] late = state(id, settings, batches, historyAfter);
        byte[] earlyPipeline = pipelineState(pipeline(id, settings, batches, filterAfter));
        byte[] latePipeline = pipelineState(pipeline(id, settings, batches, historyAfter));
        int h = headerBytes(id);
        if (!java.util.Arrays.equals(early, h, h + earlyPipeline.length, earlyPipeline, 0, earlyPipeline.length)) {
            throw new IllegalStateException("the session's state does not hold its pipeline's state where expected");
        }
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        out.write(early, 0, h + earlyPipeline.length);
        int tail = h + latePipeline.length;
        out.write(late, tail, late.length - tail);
        return out.toByteArray();
    }

    /**
     * The state with the filter's east position (the first copy of it in the pipeline state: the
     * current estimate) replaced by NaN. The value is found by its bits: the pipeline's own estimate.
     */
    public static byte[] withNonFiniteEast(String id, Settings settings, List<List<Sample>> batches, int n,
                                           byte[] state) {
        double east = pipeline(id, settings, batches, n).snapshot().eastM();
        byte[] pattern = ByteBuffer.allocate(8).putDouble(east).array();
        int from = headerBytes(id);
        for (int i = from; i + 8 <= state.length; i++) {
            if (java.util.Arrays.equals(state, i, i + 8, pattern, 0, 8)) {
                byte[] out = state.clone();
                ByteBuffer.wrap(out).putDouble(i, Double.NaN);
                return out;
            }
        }
        throw new IllegalStateException("east " + east + " not found in the state");
    }

    /** Replaces the state of one vehicle's entry in a snapshot file, with a valid checksum. */
    public static void rewriteEntry(Path snapshot, String vehicleId, UnaryOperator<byte[]> newState) throws IOException {
        ByteBuffer in = ByteBuffer.wrap(Files.readAllBytes(snapshot));
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        boolean found = false;
        while (in.remaining() >= 8) {
            int length = in.getInt();
            in.getInt();
            byte[] payload = new byte[length];
            in.get(payload);
            if (payload[0] == 1) {
                DataInputStream d = new DataInputStream(new ByteArrayInputStream(payload));
                d.readByte();
                String id = d.readUTF();
                long lastSeq = d.readLong();
                if (id.equals(vehicleId)) {
                    byte[] state = d.readAllBytes();
                    ByteArrayOutputStream p = new ByteArrayOutputStream();
                    DataOutputStream pd = new DataOutputStream(p);
                    pd.writeByte(1);
                    pd.writeUTF(id);
                    pd.writeLong(lastSeq);
                    pd.write(newState.apply(state));
                    payload = p.toByteArray();
                    found = true;
                }
            }
            CRC32C c = new CRC32C();
            c.update(payload);
            out.write(ByteBuffer.allocate(8).putInt(payload.length).putInt((int) c.getValue()).array());
            out.write(payload);
        }
        if (!found) {
            throw new IllegalStateException(vehicleId + " has no entry in " + snapshot);
        }
        Files.write(snapshot, out.toByteArray());
    }

    /** A state that does not decode: its layout version replaced. */
    public static byte[] withUnknownFormat(byte[] state) {
        byte[] out = state.clone();
        ByteBuffer.wrap(out).putInt(0, 99);
        return out;
    }
}
