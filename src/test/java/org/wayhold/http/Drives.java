package org.wayhold.http;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.util.ArrayList;
import java.util.List;
import org.wayhold.ingest.NdjsonWriter;
import org.wayhold.sample.Sample;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;

/** Seeded simulated drives cut into the chunks a logging rig would post. */
final class Drives {

    private Drives() {
    }

    /**
     * A drive with open sky, one GNSS-denied tunnel and open sky again (seeded, so every run is the same).
     *
     * @param warmUpS  open-sky driving before the tunnel (s)
     * @param tunnelS  length of the tunnel (s)
     * @param afterS   open-sky driving after the tunnel (s)
     */
    static SimulatedDrive withTunnel(long seed, double warmUpS, double tunnelS, double afterS) {
        SimulationSettings s = SimulationSettings.defaults()
                // The planner may stretch the warm-up to fit its turns and standstill: leave it 30 s of room.
                .withDurationS(warmUpS + tunnelS + afterS + 30.0)
                .withWarmUpS(warmUpS)
                .withMinGapS(afterS)
                .withTunnelsS(tunnelS);
        return DriveSimulator.simulate(s, seed);
    }

    /** The first {@code durationS} seconds of a seeded 60 s open-sky drive (the shortest the planner makes). */
    static List<Sample> openSky(long seed, double durationS) {
        SimulatedDrive d = DriveSimulator.simulate(SimulationSettings.defaults().withDurationS(60.0), seed);
        List<Sample> out = new ArrayList<>();
        for (Sample s : d.samples()) {
            if (s.t() < d.startT() + durationS) {
                out.add(s);
            }
        }
        return out;
    }

    /** The samples cut into consecutive windows of {@code chunkS} seconds from the first sample. */
    static List<List<Sample>> chunks(List<Sample> samples, double chunkS) {
        List<List<Sample>> out = new ArrayList<>();
        if (samples.isEmpty()) {
            return out;
        }
        double t0 = samples.get(0).t();
        List<Sample> current = new ArrayList<>();
        long index = 0;
        for (Sample s : samples) {
            long k = (long) Math.floor((s.t() - t0) / chunkS);
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

    static byte[] ndjson(List<? extends Sample> samples) {
        ByteArrayOutputStream out = new ByteArrayOutputStream(64 * samples.size());
        try (NdjsonWriter w = new NdjsonWriter(out)) {
            for (Sample s : samples) {
                w.write(s);
            }
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        return out.toByteArray();
    }
}
