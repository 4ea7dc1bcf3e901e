package org.wayhold.cli;

import java.io.IOException;
import java.io.PrintWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.concurrent.Callable;
import org.wayhold.BuildInfo;
import org.wayhold.calibration.Calibration;
import org.wayhold.calibration.CalibrationDrive;
import org.wayhold.calibration.CalibrationRefused;
import org.wayhold.calibration.CalibrationResult;
import org.wayhold.calibration.DriveSupport;
import org.wayhold.calibration.HoldOut;
import org.wayhold.calibration.Parameter;
import org.wayhold.config.ConfigLoader;
import org.wayhold.ingest.NdjsonReader;
import org.wayhold.ingest.ReadResult;
import org.wayhold.report.CalibrationReport;
import org.wayhold.settings.Settings;
import picocli.CommandLine.Command;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Option;
import picocli.CommandLine.Parameters;
import picocli.CommandLine.ParameterException;
import picocli.CommandLine.Spec;

/**
 * {@code wayhold calibrate}: fits one vehicle's sensor profile to its recorded drives and writes it as
 * a configuration file, with a report beside it.
 */
@Command(name = "calibrate", mixinStandardHelpOptions = true,
        description = "Fits a vehicle's sensor profile (noise, GNSS latency, antenna lever arm, odometer and gyro "
                + "scale) to its recorded drives by maximum likelihood of the filter's innovations, and writes it "
                + "as a configuration FILE that serve, score and fuse load with --config, with a report beside it.")
final class CalibrateCommand implements Callable<Integer> {

    @Spec
    private CommandSpec spec;

    @Parameters(arity = "1..*", paramLabel = "LOG", description = "Sample logs of one vehicle (NDJSON, gzip when .gz).")
    private List<Path> logs;

    @Option(names = "--out", required = true, paramLabel = "FILE",
            description = "The profile to write (YAML, a complete configuration).")
    private Path out;

    @Option(names = "--report", paramLabel = "FILE",
            description = "The report to write (text; default: beside --out, its name ending .report.txt).")
    private Path report;

    @Option(names = "--config", paramLabel = "FILE",
            description = "Configuration to start from and to carry the result (default: built-in defaults).")
    private Path config;

    @Option(names = "--vehicle", paramLabel = "NAME", defaultValue = "default",
            description = "Vehicle profile to fit (default ${DEFAULT-VALUE}).")
    private String vehicle;

    @Option(names = "--hold-out", paramLabel = "SHARE", defaultValue = "0.3",
            description = "Share of each drive's end kept out of the fit and scored instead (0 to 0.9, default "
                    + "${DEFAULT-VALUE}; 0 scores nothing).")
    private double holdOut;

    @Option(names = "--outage", split = ",", paramLabel = "S", defaultValue = "10,30",
            description = "Outage lengths scored on the held-out driving (s, default ${DEFAULT-VALUE}).")
    private List<Double> outageS;

    @Option(names = "--every", paramLabel = "S", defaultValue = "20",
            description = "One held-out window of each length every S seconds (whole s, default ${DEFAULT-VALUE}).")
    private double everyS;

    @Option(names = "--min-aided", paramLabel = "S", defaultValue = "30",
            description = "A held-out window starts after S seconds of aided filtering (default ${DEFAULT-VALUE}).")
    private double minAidedS;

    @Option(names = "--max-evaluations", paramLabel = "N", defaultValue = "300",
            description = "Most likelihood evaluations of the optimiser (default ${DEFAULT-VALUE}).")
    private int maxEvaluations;

    @Option(names = "--strict", description = "Fail (exit code 1) when the drives leave any parameter at its "
            + "configured value, naming them, instead of writing a partial profile.")
    private boolean strict;

    @Option(names = "--quiet", description = "No progress on stderr.")
    private boolean quiet;

    @Override
    public Integer call() throws IOException {
        for (Path log : logs) {
            OptionErrors.requireFile(spec, "LOG", log);
        }
        if (config != null) {
            OptionErrors.requireFile(spec, "--config", config);
        }
        if (!(holdOut >= 0.0 && holdOut <= 0.9)) {
            throw new ParameterException(spec.commandLine(), "--hold-out: must lie in [0, 0.9], was " + holdOut);
        }
        Calibration.Options options;
        try {
            options = new Calibration.Options(vehicle, maxEvaluations);
        } catch (IllegalArgumentException e) {
            throw OptionErrors.named(spec, e, Map.of("vehicle", "--vehicle", "max_evaluations", "--max-evaluations"));
        }
        long startNs = System.nanoTime();
        Settings base = config == null ? Settings.defaults() : ConfigLoader.load(config);
        if (!base.vehicles().containsKey(vehicle)) {
            throw new ParameterException(spec.commandLine(), "--vehicle: no profile named '" + vehicle + "' in "
                    + (config == null ? "the built-in defaults" : config) + "; it is written there only when it exists");
        }
        PrintWriter err = spec.commandLine().getErr();
        List<CalibrationDrive> fit = new ArrayList<>();
        List<CalibrationDrive> held = new ArrayList<>();
        List<String> inputs = new ArrayList<>();
        for (Path log : logs) {
            ReadResult r;
            try {
                r = NdjsonReader.readFileAll(log);
            } catch (IOException e) {
                throw new IOException(log + ": cannot be read: " + OptionErrors.describe(e), e);
            }
            CalibrationDrive d = CalibrationDrive.of(log.getFileName().toString(), r.samples(), base.ordering());
            if (d.samples().isEmpty()) {
                throw new CalibrationRefused(log + ": has no sample the time ordering accepts, nothing to calibrate");
            }
            List<CalibrationDrive> parts = d.split(1.0 - holdOut);
            fit.add(parts.get(0));
            held.add(parts.get(1));
            inputs.add(String.format(Locale.ROOT, "%s: %d samples, %d lines rejected, %.0f s", log, r.samples().size(),
                    r.rejected().size(), d.endT() - d.startT()));
        }
        if (strict) {
            // What the drives lack is known before any fit: refuse at once.
            Map<Parameter, String> lacking = DriveSupport.of(fit).unsupported();
            if (!lacking.isEmpty() && DriveSupport.of(fit).refusal() == null) {
                throw new CalibrationRefused("cannot calibrate every parameter from " + names() + " (--strict): "
                        + String.join("; ", lacking.entrySet().stream()
                        .map(e -> e.getKey().label() + ": " + e.getValue()).toList()));
            }
        }
        Progress progress = new Progress(err, quiet, startNs);
        CalibrationResult result;
        try {
            result = Calibration.fit(fit, base, options, progress);
        } catch (CalibrationRefused e) {
            throw new CalibrationRefused("cannot calibrate from " + names() + ": " + e.getMessage());
        }
        List<Parameter> left = result.leftAtConfigured();
        if (strict && !left.isEmpty()) {
            throw new CalibrationRefused("cannot calibrate every parameter from " + names() + " (--strict): "
                    + String.join("; ", left.stream().map(p -> p.label() + " " + result.estimate(p).note()).toList()));
        }
        HoldOut.Result scored = null;
        if (holdOut > 0.0) {
            progress.stage("scoring the held-out driving");
            scored = HoldOut.score(held, base, result.settings(), vehicle, new HoldOut.Plan(
                    outageS.stream().mapToDouble(Double::doubleValue).toArray(), everyS, minAidedS));
        }
        double seconds = (System.nanoTime() - startNs) / 1e9;
        Path reportFile = report != null ? report : defaultReport(out);
        writeProfile(result);
        String text = CalibrationReport.text(new CalibrationReport.Context("wayhold " + BuildInfo.current().describe(),
                "wayhold " + String.join(" ", spec.commandLine().getParseResult().originalArgs()), inputs, holdOut,
                seconds), result, scored);
        Files.writeString(reportFile, text);
        PrintWriter o = spec.commandLine().getOut();
        o.printf(Locale.ROOT, "wrote %s and %s (%d of %d parameters estimated, %.1f s)%n", out, reportFile,
                Parameter.values().length - left.size(), Parameter.values().length, seconds);
        if (!left.isEmpty()) {
            o.println("  left at the configured value: " + String.join(", ", left.stream().map(Parameter::label).toList()));
        }
        o.flush();
        return 0;
    }

    private String names() {
        return String.join(", ", logs.stream().map(Path::toString).toList());
    }

    static Path defaultReport(Path profile) {
        String name = profile.getFileName().toString().replaceFirst("\\.(ya?ml)$", "");
        return profile.resolveSibling(name + ".report.txt");
    }

    private void writeProfile(CalibrationResult r) throws IOException {
        StringBuilder b = new StringBuilder();
        b.append("# wayhold configuration with a calibrated profile for vehicle '").append(vehicle).append("'.\n");
        b.append("# Written by wayhold calibrate from ").append(names()).append(".\n");
        b.append("# Calibrated keys: filter noise (wheel_speed_noise_mps, gyro_noise_rad_per_s, random walks,\n");
        b.append("# gnss_fix_scale, gnss_correlated_share, gnss_correlation_time_s, initial scale sigmas) and\n");
        b.append("# vehicles.").append(vehicle).append(" (lever arm, GNSS latency, odometer and gyro scale with their sigmas);\n");
        b.append("# every other key is the configuration calibrated from. Bearer tokens are never written: give\n");
        b.append("# them in WAYHOLD_WRITE_TOKENS / WAYHOLD_READ_TOKENS. See the report beside this file.\n");
        b.append("# CAUTION: a fitted profile is an estimate from recorded drives, not a measurement; not for vehicle\n");
        b.append("# control or safety functions.\n");
        b.append(ConfigLoader.toYaml(r.settings()));
        if (out.getParent() != null) {
            Files.createDirectories(out.getParent());
        }
        Files.writeString(out, b.toString());
    }

    /** Progress on stderr: each step, and the optimiser at most every two seconds. */
    private static final class Progress implements Calibration.Listener {
        private static final long EVERY_NS = 2_000_000_000L;
        private final PrintWriter err;
        private final boolean quiet;
        private final long startNs;
        private long lastNs;

        Progress(PrintWriter err, boolean quiet, long startNs) {
            this.err = err;
            this.quiet = quiet;
            this.startNs = startNs;
            this.lastNs = startNs;
        }

        @Override
        public void stage(String what) {
            if (!quiet) {
                err.printf(Locale.ROOT, "calibrate: %5.1f s %s%n", (System.nanoTime() - startNs) / 1e9, what);
                err.flush();
            }
        }

        @Override
        public void evaluation(int count, double logLikelihood, double best) {
            long now = System.nanoTime();
            if (quiet || now - lastNs < EVERY_NS) {
                return;
            }
            lastNs = now;
            err.printf(Locale.ROOT, "calibrate: %5.1f s evaluation %d, ln L %.2f, best %.2f%n", (now - startNs) / 1e9,
                    count, logLikelihood, best);
            err.flush();
        }
    }
}
