package org.wayhold.cli;

import java.io.IOException;
import java.io.PrintWriter;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.TreeMap;
import java.util.concurrent.Callable;
import org.wayhold.ingest.NdjsonWriter;
import org.wayhold.sample.Sample;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.GnssFault;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;
import org.wayhold.simulate.TimeWindow;
import picocli.CommandLine.Command;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Option;
import picocli.CommandLine.ParameterException;
import picocli.CommandLine.Spec;

/** {@code wayhold simulate}: writes a seeded synthetic drive as NDJSON, reference lines included. */
@Command(name = "simulate", mixinStandardHelpOptions = true,
        description = "Writes a synthetic drive (wheel speed 50 Hz, yaw rate 100 Hz, GNSS 5 Hz, reference 10 Hz) "
                + "as NDJSON; gzip-compressed when FILE ends in .gz.")
final class SimulateCommand implements Callable<Integer> {

    @Spec
    private CommandSpec spec;

    @Option(names = "--minutes", required = true, paramLabel = "M", description = "Length of the drive (minutes).")
    private double minutes;

    @Option(names = "--tunnels", split = ",", paramLabel = "S",
            description = "GNSS-denied stretches, seconds of driving each, e.g. 40,100.")
    private List<Double> tunnelsS = new ArrayList<>();

    @Option(names = "--canyons", split = ",", paramLabel = "S",
            description = "Urban-canyon stretches with degraded, often offset fixes, seconds each.")
    private List<Double> canyonsS = new ArrayList<>();

    @Option(names = "--warm-up", paramLabel = "S", defaultValue = "0",
            description = "Open-sky driving with turns and the standstill before the first tunnel or canyon "
                    + "(seconds, default ${DEFAULT-VALUE}).")
    private double warmUpS;

    @Option(names = "--seed", paramLabel = "S", defaultValue = "1",
            description = "Random seed; the same seed gives the same file (default ${DEFAULT-VALUE}).")
    private long seed;

    @Option(names = "--origin", paramLabel = "LAT,LON,ALT",
            description = "Start and ENU origin: WGS-84 latitude and longitude (degrees), ellipsoidal height (m).")
    private String origin;

    @Option(names = "--perfect", description = "Error-free sensors (tunnels still deny GNSS).")
    private boolean perfect;

    @Option(names = "--out", required = true, paramLabel = "FILE", description = "Where to write the drive.")
    private Path out;

    @Override
    public Integer call() throws IOException {
        SimulationSettings s = settings();
        SimulatedDrive drive;
        try {
            drive = DriveSimulator.simulate(s, seed);
        } catch (IllegalArgumentException e) {
            throw new ParameterException(spec.commandLine(), e.getMessage(), e);
        }
        Map<String, Integer> counts = new TreeMap<>();
        try (NdjsonWriter w = NdjsonWriter.open(out)) {
            for (Sample sample : drive.samples()) {
                w.write(sample);
                counts.merge(sample.type().wireName(), 1, Integer::sum);
            }
        }
        report(drive, counts);
        return 0;
    }

    private SimulationSettings settings() {
        try {
            SimulationSettings s = SimulationSettings.defaults()
                    .withMinutes(minutes)
                    .withTunnelsS(unboxed(tunnelsS))
                    .withCanyonsS(unboxed(canyonsS))
                    .withWarmUpS(warmUpS);
            if (origin != null) {
                double[] o = parseOrigin(origin);
                s = s.withOrigin(o[0], o[1], o[2]);
            }
            return perfect ? s.perfectSensors() : s;
        } catch (IllegalArgumentException e) {
            throw new ParameterException(spec.commandLine(), e.getMessage(), e);
        }
    }

    private double[] parseOrigin(String text) {
        String[] parts = text.split(",", -1);
        if (parts.length != 3) {
            throw new ParameterException(spec.commandLine(),
                    "--origin: expected LAT,LON,ALT (degrees, degrees, metres), was '" + text + "'");
        }
        double[] v = new double[3];
        for (int i = 0; i < 3; i++) {
            try {
                v[i] = Double.parseDouble(parts[i].trim());
            } catch (NumberFormatException e) {
                throw new ParameterException(spec.commandLine(),
                        "--origin: '" + parts[i] + "' is not a number in '" + text + "'");
            }
        }
        return v;
    }

    private void report(SimulatedDrive drive, Map<String, Integer> counts) {
        PrintWriter o = spec.commandLine().getOut();
        int total = counts.values().stream().mapToInt(Integer::intValue).sum();
        o.printf(Locale.ROOT, "wrote %s: %d samples over %.1f s from t = %.2f (seed %d)%n",
                out, total, drive.durationS(), drive.startT(), seed);
        counts.forEach((type, n) -> o.printf(Locale.ROOT, "  %-12s %7d%n", type, n));
        o.printf(Locale.ROOT, "  origin       %.6f, %.6f, %.1f m%n",
                drive.origin().latDeg(), drive.origin().lonDeg(), drive.origin().altM());
        printWindows(o, "tunnels", drive.tunnels(), drive.startT());
        printWindows(o, "canyons", drive.canyons(), drive.startT());
        Map<GnssFault.Kind, Integer> faults = new TreeMap<>();
        drive.faults().forEach(f -> faults.merge(f.kind(), 1, Integer::sum));
        o.printf(Locale.ROOT, "  gnss faults  %s%n", faults.isEmpty() ? "none" : faults.toString().toLowerCase(Locale.ROOT));
        o.flush();
    }

    private static void printWindows(PrintWriter o, String label, List<TimeWindow> windows, double startT) {
        if (windows.isEmpty()) {
            return;
        }
        StringBuilder b = new StringBuilder();
        for (TimeWindow w : windows) {
            if (b.length() > 0) {
                b.append(", ");
            }
            b.append(String.format(Locale.ROOT, "%.1f-%.1f s (%.1f s)", w.startT() - startT, w.endT() - startT,
                    w.durationS()));
        }
        o.printf(Locale.ROOT, "  %-12s %s after the start%n", label, b);
    }

    private static double[] unboxed(List<Double> values) {
        double[] out = new double[values.size()];
        for (int i = 0; i < out.length; i++) {
            out[i] = values.get(i);
        }
        return out;
    }
}
