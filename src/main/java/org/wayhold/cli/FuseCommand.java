package org.wayhold.cli;

import java.io.IOException;
import java.io.PrintWriter;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.EnumSet;
import java.util.HashSet;
import java.util.List;
import java.util.Locale;
import java.util.Set;
import java.util.concurrent.Callable;
import org.wayhold.config.ConfigLoader;
import org.wayhold.fusion.DriveFusion;
import org.wayhold.fusion.FusedDrive;
import org.wayhold.fusion.FusedPoint;
import org.wayhold.ingest.LineError;
import org.wayhold.ingest.NdjsonReader;
import org.wayhold.ingest.SampleSink;
import org.wayhold.ingest.UnknownFields;
import org.wayhold.sample.Sample;
import org.wayhold.settings.Settings;
import org.wayhold.settings.VehicleProfile;
import org.wayhold.tracks.TrackFiles;
import org.wayhold.tracks.TrackFormat;
import picocli.CommandLine.Command;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Option;
import picocli.CommandLine.ParameterException;
import picocli.CommandLine.Parameters;
import picocli.CommandLine.Spec;

/**
 * {@code wayhold fuse}: each log's whole drive through the per-vehicle pipeline, written as a track; with
 * {@code --smooth} also the Rauch-Tung-Striebel smoothed track. Logs are fused one after the other, so
 * memory holds one drive at a time.
 */
@Command(name = "fuse", mixinStandardHelpOptions = true,
        description = "Fuses whole drives: each LOG (NDJSON, .gz too) through the same pipeline as the live "
                + "service, written to DIR as NAME.csv, NAME.geojson and NAME.gpx; with --smooth also the "
                + "smoothed track, every point estimated from the data before and after it.")
final class FuseCommand implements Callable<Integer> {

    /** Rejected input lines named on the console; the rest are counted. */
    private static final int NOTED_ERRORS = 3;

    @Spec
    private CommandSpec spec;

    @Parameters(arity = "1..*", paramLabel = "LOG", description = "Sample logs (NDJSON, gzip when .gz).")
    private List<Path> logs;

    @Option(names = "--out", required = true, paramLabel = "DIR", description = "Directory for the track files.")
    private Path out;

    @Option(names = "--smooth", description = "Also write the Rauch-Tung-Striebel smoothed track.")
    private boolean smooth;

    @Option(names = "--format", split = ",", paramLabel = "F", defaultValue = "csv,geojson,gpx",
            description = "Formats to write: csv, geojson, gpx (default ${DEFAULT-VALUE}).")
    private List<String> formats;

    @Option(names = "--config", paramLabel = "FILE",
            description = "Configuration (YAML), as serve and score take it (default: built-in defaults).")
    private Path config;

    @Option(names = "--vehicle", paramLabel = "NAME", defaultValue = "default",
            description = "Vehicle profile of the configuration to use (default ${DEFAULT-VALUE}).")
    private String vehicle;

    @Override
    public Integer call() throws IOException {
        for (Path log : logs) {
            OptionErrors.requireFile(spec, "LOG", log);
        }
        if (config != null) {
            OptionErrors.requireFile(spec, "--config", config);
        }
        Set<TrackFormat> chosen = EnumSet.noneOf(TrackFormat.class);
        for (String f : formats) {
            try {
                chosen.add(TrackFormat.of(f));
            } catch (IllegalArgumentException e) {
                throw new ParameterException(spec.commandLine(), "--format: '" + f + "' is none of csv, geojson, gpx");
            }
        }
        Settings settings = config == null ? Settings.defaults() : ConfigLoader.load(config);
        VehicleProfile profile = settings.profileFor(vehicle);
        PrintWriter o = spec.commandLine().getOut();
        PrintWriter err = spec.commandLine().getErr();
        Set<String> bases = new HashSet<>();
        for (Path log : logs) {
            String base = TrackFiles.baseName(log);
            String name = base;
            for (int k = 2; !bases.add(name); k++) {
                name = base + "-" + k;
            }
            List<Sample> samples = read(log, err);
            // A log that cannot be fused (no fix, say) fails with one line naming it and exit code 1.
            FusedDrive drive = DriveFusion.fuse(log.getFileName().toString(), samples, settings, profile, smooth);
            samples = null;
            List<Path> files = TrackFiles.write(drive, out, name, chosen);
            summary(o, drive, files);
        }
        o.flush();
        return 0;
    }

    private static List<Sample> read(Path log, PrintWriter err) throws IOException {
        List<Sample> samples = new ArrayList<>();
        List<LineError> rejected = new ArrayList<>();
        int[] rejectedCount = {0};
        List<UnknownFields> unknown = new ArrayList<>(1);
        try {
            NdjsonReader.readFile(log, new SampleSink() {
                @Override
                public void accept(long line, Sample s) {
                    samples.add(s);
                }

                @Override
                public void reject(LineError e) {
                    if (rejected.size() < NOTED_ERRORS) {
                        rejected.add(e);
                    }
                    rejectedCount[0]++;
                }

                @Override
                public void unknownFields(UnknownFields u) {
                    unknown.add(u);
                }
            });
        } catch (IOException e) {
            throw new IOException(log + ": cannot be read: " + OptionErrors.describe(e), e);
        }
        if (rejectedCount[0] > 0) {
            StringBuilder b = new StringBuilder(log.getFileName() + ": " + rejectedCount[0] + " lines rejected");
            rejected.forEach(e -> b.append("; line ").append(e.line()).append(": ").append(e.detail()));
            err.println(b);
        }
        unknown.forEach(u -> err.println(log.getFileName() + ": " + u.describe()));
        err.flush();
        return samples;
    }

    private void summary(PrintWriter o, FusedDrive d, List<Path> files) {
        long inGap = d.forward().stream().filter(FusedPoint::inGap).count();
        StringBuilder names = new StringBuilder();
        for (Path f : files) {
            names.append(names.length() == 0 ? "" : ", ").append(f.getFileName());
        }
        o.printf(Locale.ROOT, "%s: wrote %s in %s: %d points, %d in %d GNSS gaps%n", d.name(), names, out,
                d.forward().size(), inGap, d.gaps().size());
        if (d.smoothing() != null) {
            FusedDrive.Smoothing s = d.smoothing();
            o.printf(Locale.ROOT, "  smoothed in %d segment%s (%d cut by a reset or a widening that is no added "
                            + "noise, %d widenings folded in); forward pass kept in %.1f MB%n", s.segments(),
                    s.segments() == 1 ? "" : "s", s.cuts(), s.foldedChanges(), s.storeBytes() / 1e6);
        }
        d.notes().forEach(n -> o.println("  " + n));
    }
}
