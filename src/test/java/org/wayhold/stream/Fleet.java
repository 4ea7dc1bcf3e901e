package org.wayhold.stream;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.wayhold.http.PoseJson;
import org.wayhold.ingest.NdjsonWriter;
import org.wayhold.sample.ReferencePoint;
import org.wayhold.sample.Sample;
import org.wayhold.session.VehicleSession;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;

/**
 * Seeded simulated vehicles cut into records of samples as rigs would send them, and what the service
 * gives for the same records: the reference the worker's output is compared with.
 */
final class Fleet {

    /** One record of one vehicle: its id, the samples and their NDJSON text. */
    record Batch(String vehicleId, List<Sample> samples, byte[] ndjson) {
    }

    private Fleet() {
    }

    /**
     * The drive of vehicle {@code index}: a seeded simulation without reference lines (rigs do not send
     * them), with its own seed and a start offset so vehicles differ.
     */
    static List<Sample> drive(SimulationSettings sim, long seed) {
        SimulatedDrive d = DriveSimulator.simulate(sim, seed);
        List<Sample> out = new ArrayList<>(d.samples().size());
        for (Sample s : d.samples()) {
            if (!(s instanceof ReferencePoint)) {
                out.add(s);
            }
        }
        return out;
    }

    /** Cuts a drive into records of {@code batchS} seconds of samples each (s, vehicle clock). */
    static List<Batch> batches(String vehicleId, List<Sample> samples, double batchS) {
        List<Batch> out = new ArrayList<>();
        int from = 0;
        while (from < samples.size()) {
            double end = samples.get(from).t() + batchS;
            int to = from;
            while (to < samples.size() && samples.get(to).t() < end) {
                to++;
            }
            List<Sample> part = samples.subList(from, to);
            out.add(new Batch(vehicleId, List.copyOf(part), ndjson(part)));
            from = to;
        }
        return out;
    }

    /** Interleaves vehicles' records round-robin, as a fleet's records arrive together. */
    static List<Batch> interleave(List<List<Batch>> perVehicle) {
        List<Batch> out = new ArrayList<>();
        int longest = perVehicle.stream().mapToInt(List::size).max().orElse(0);
        for (int i = 0; i < longest; i++) {
            for (List<Batch> v : perVehicle) {
                if (i < v.size()) {
                    out.add(v.get(i));
                }
            }
        }
        return out;
    }

    static byte[] ndjson(List<Sample> samples) {
        ByteArrayOutputStream bytes = new ByteArrayOutputStream(samples.size() * 64);
        try (NdjsonWriter w = new NdjsonWriter(bytes)) {
            for (Sample s : samples) {
                w.write(s);
            }
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        return bytes.toByteArray();
    }

    /**
     * The poses the service's pose stream gives for these records, per vehicle, as pose JSON: one
     * {@link VehicleSession} per vehicle fed the same records in the same order, with a listener.
     */
    static Map<String, List<String>> servicePoses(Settings settings, List<Batch> records) {
        Map<String, VehicleSession> sessions = new LinkedHashMap<>();
        Map<String, List<String>> poses = new LinkedHashMap<>();
        for (Batch b : records) {
            VehicleSession s = sessions.computeIfAbsent(b.vehicleId(), id -> {
                VehicleSession created = new VehicleSession(id, settings, null);
                List<String> list = poses.computeIfAbsent(id, k -> new ArrayList<>());
                created.addListener(p -> list.add(new String(PoseJson.toBytes(p), java.nio.charset.StandardCharsets.UTF_8)));
                return created;
            });
            s.submit(b.samples());
        }
        return poses;
    }
}
