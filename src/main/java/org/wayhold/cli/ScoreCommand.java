package org.wayhold.cli;

import java.io.IOException;
import java.io.PrintWriter;
import java.nio.file.Path;
import java.time.Instant;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Set;
import java.util.concurrent.Callable;
import java.util.concurrent.atomic.AtomicInteger;
import java.util.concurrent.atomic.AtomicLong;
import org.wayhold.config.ConfigLoader;
import org.wayhold.ingest.LineError;
import org.wayhold.ingest.NdjsonReader;
import org.wayhold.ingest.SampleSink;
import org.wayhold.ingest.UnknownFields;
import org.wayhold.nmea.NmeaReader;
import org.wayhold.nmea.NmeaResult;
import org.wayhold.report.ReportFiles;
import org.wayhold.report.ReportModel;
import org.wayhold.report.RunInfo;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.scoring.InputFile;
import org.wayhold.scoring.LengthSummary;
import org.wayhold.scoring.ScoringRun;
import org.wayhold.scoring.WindowPlan;
import org.wayhold.settings.Settings;
import picocli.CommandLine.Command;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Option;
import picocli.CommandLine.Parameters;
import picocli.CommandLine.ParameterException;
import picocli.CommandLine.Spec;

/**
 * {@code wayhold score}: replays logs with GNSS withheld in outage windows and writes a drift report.
 */
@Command(name = "score", mixinStandardHelpOptions = true,
        description = "Scores dead-reckoning drift: replays each LOG (NDJSON, .gz too) with GNSS withheld in "
                + "outage windows and writes DIR/report.json, DIR/outages.csv and DIR/report.html.")
final class ScoreCommand implements Callable<Integer> {

    /** Rejected input lines named in a log's notes; the rest are counted. */
    private static final int NOTED_ERRORS = 3;

    @Spec
    private CommandSpec spec;

    @Parameters(arity = "1..*", paramLabel = "LOG", description = "Sample logs (NDJSON, gzip when .gz).")
    private List<Path> logs;

    @Option(names = "--outage", split = ",", paramLabel = "S", defaultValue = "10,30,60",
            description = "Outage lengths (s, default ${DEFAULT-VALUE}).")
    private List<Double> outageS;

    @Option(names = "--every", paramLabel = "S", defaultValue = "120",
            description = "Fixed schedule: one window of each length every S seconds (whole s, default ${DEFAULT-VALUE}).")
    private double everyS;

    @Option(names = "--skip", paramLabel = "S", defaultValue = "0",
            description = "No window in the first S seconds of a log (whole s, default ${DEFAULT-VALUE}).")
    private double skipS;

    @Option(names = "--random", paramLabel = "K", defaultValue = "0",
            description = "K random windows per length instead of the fixed schedule.")
    private int random;

    @Option(names = "--seed", paramLabel = "N", defaultValue = "1",
            description = "Seed of the random windows; the same seed gives the same report (default ${DEFAULT-VALUE}).")
    private long seed;

    @Option(names = "--min-aided", paramLabel = "S", defaultValue = "60",
            description = "A window starts only after the filter has been aided for S seconds (default ${DEFAULT-VALUE}).")
    private double minAidedS;

    @Option(names = "--config", paramLabel = "FILE",
            description = "Configuration (YAML); give several to compare them on the same windows.")
    private List<Path> configs = new ArrayList<>();

    @Option(names = "--gnss", paramLabel = "FILE",
            description = "NMEA 0183 file whose fixes replace the gnss lines of the LOG in the same position.")
    private List<Path> gnss = new ArrayList<>();

    @Option(names = "--vehicle", paramLabel = "NAME", defaultValue = "default",
            description = "Vehicle profile of the configuration to use (default ${DEFAULT-VALUE}).")
    private String vehicle;

    @Option(names = "--eval-step", paramLabel = "S", defaultValue = "0.1",
            description = "Evaluation step inside windows against reference lines (s, default ${DEFAULT-VALUE}).")
    private double evalStepS;

    @Option(names = "--smooth-tail", paramLabel = "S", defaultValue = "30",
            description = "Seconds of fixes after each window that the smoothed gap fill uses (default ${DEFAULT-VALUE}).")
    private double smoothTailS;

    @Option(names = "--threads", paramLabel = "N", description = "Worker threads (default: all cores).")
    private Integer threads;

    @Option(names = "--out", required = true, paramLabel = "DIR", description = "Directory for the report.")
    private Path out;

    @Option(names = "--quiet", description = "No progress on stderr.")
    private boolean quiet;

    /** The scoring records' names for their values, as the options that set them. */
    private static final Map<String, String> OPTION_NAMES = Map.of(
            "outage", "--outage", "every", "--every", "skip", "--skip", "random", "--random",
            "min_aided", "--min-aided", "eval_step", "--eval-step", "threads", "--threads", "config", "--config",
            "smooth_tail", "--smooth-tail");

    @Override
    public Integer call() throws IOException {
        if (!gnss.isEmpty() && gnss.size() != logs.size()) {
            throw new ParameterException(spec.commandLine(), "--gnss: give one NMEA file per LOG (" + logs.size()
                    + " logs, " + gnss.size() + " NMEA files)");
        }
        // Missing files are named with the option that gave them before anything is read.
        for (Path log : logs) {
            OptionErrors.requireFile(spec, "LOG", log);
        }
        for (Path nmea : gnss) {
            OptionErrors.requireFile(spec, "--gnss", nmea);
        }
        for (Path config : configs) {
            OptionErrors.requireFile(spec, "--config", config);
        }
        ScoringRun.Options options;
        try {
            options = new ScoringRun.Options(new WindowPlan.Schedule(outageS.stream().mapToDouble(Double::doubleValue)
                    .toArray(), skipS, everyS, random, seed), minAidedS, evalStepS, vehicle, true,
                    threads != null ? threads : Runtime.getRuntime().availableProcessors(), smoothTailS);
        } catch (IllegalArgumentException e) {
            throw OptionErrors.named(spec, e, OPTION_NAMES);
        }
        List<ScoringRun.NamedSettings> named = loadConfigs();
        List<ScoringRun.LogSource> sources = new ArrayList<>();
        for (int i = 0; i < logs.size(); i++) {
            sources.add(new FileLog(logs.get(i), gnss.isEmpty() ? null : gnss.get(i)));
        }
        Progress progress = new Progress(spec.commandLine().getErr(), logs.size(), quiet);
        // A log that cannot be scored (no GNSS fix, say) is a problem of the data, not of the command
        // line: it fails with one line naming the log and exit code 1, not with the usage.
        List<ScoringRun.LogScores> scores = ScoringRun.run(sources, named, options, progress);
        progress.finish();
        ReportModel model = ReportModel.of(scores, named, options,
                RunInfo.of(spec.commandLine().getParseResult().originalArgs(), Instant.now()));
        ReportFiles.write(model, out);
        summary(model);
        List<String> why = model.whyNothingWasScored();
        if (!why.isEmpty()) {
            // The report is written (it says why), but a run that scored nothing must not pass for a
            // successful one in a script.
            PrintWriter err = spec.commandLine().getErr();
            err.println("score: warning: no window could be scored: " + String.join("; ", why)
                    + " (see " + out.resolve(ReportFiles.HTML) + ")");
            err.flush();
            return 1;
        }
        return 0;
    }

    private List<ScoringRun.NamedSettings> loadConfigs() {
        List<ScoringRun.NamedSettings> out = new ArrayList<>();
        if (configs.isEmpty()) {
            out.add(new ScoringRun.NamedSettings("default", "built-in defaults", Settings.defaults()));
            return out;
        }
        Set<String> names = new HashSet<>();
        for (Path p : configs) {
            String base = p.getFileName().toString().replaceFirst("\\.(ya?ml)$", "");
            String name = base;
            for (int k = 2; !names.add(name); k++) {
                name = base + "-" + k;
            }
            out.add(new ScoringRun.NamedSettings(name, p.toString(), ConfigLoader.load(p)));
        }
        return out;
    }

    private void summary(ReportModel m) {
        PrintWriter o = spec.commandLine().getOut();
        o.printf(Locale.ROOT, "wrote %s, %s and %s in %s (%d windows; error against %s)%n", ReportFiles.JSON,
                ReportFiles.CSV, ReportFiles.HTML, out, m.rows().size(), m.referenceKind());
        m.summaries().forEach((config, list) -> {
            for (LengthSummary s : list) {
                String who = m.comparing() ? config + " " : "";
                if (s.count() == 0) {
                    o.printf(Locale.ROOT, "  %s%4.0f s:   no window scored%n", who, s.lengthS());
                    continue;
                }
                o.printf(Locale.ROOT, "  %s%4.0f s: %3d windows, final error median %.2f m, p95 %.2f m, "
                                + "median %s of distance, inside95 %.2f, warned late %d; smoothed max error "
                                + "median %.2f m, inside95 %.2f, gap-fill ratio median %.3f%n", who, s.lengthS(),
                        s.count(), s.medianFinalErrorM(), s.p95FinalErrorM(), Double.isFinite(s.medianErrorPct())
                                ? String.format(Locale.ROOT, "%.2f%%", s.medianErrorPct()) : "(none long enough)",
                        s.inside95(), s.warnedLate(), s.medianSmoothedMaxErrorM(), s.smoothedInside95(),
                        s.medianGapFillRatio());
            }
        });
        int unscored = m.unscoredCount();
        if (unscored > 0) {
            o.printf(Locale.ROOT, "  %d planned windows not scored, each with its reason in the report%n", unscored);
        }
        o.flush();
    }

    /** A log file, with an optional NMEA file for its fixes. */
    private static final class FileLog implements ScoringRun.LogSource {
        private final Path log;
        private final Path nmea;

        FileLog(Path log, Path nmea) {
            this.log = log;
            this.nmea = nmea;
        }

        @Override
        public String name() {
            return log.getFileName().toString();
        }

        @Override
        public ScoringRun.LoadedLog load() throws IOException {
            List<Sample> samples = new ArrayList<>();
            AtomicLong accepted = new AtomicLong();
            List<LineError> rejected = new ArrayList<>();
            AtomicInteger rejectedCount = new AtomicInteger();
            boolean replaceFixes = nmea != null;
            List<UnknownFields> unknown = new ArrayList<>(1);
            NdjsonReader.readFile(log, new SampleSink() {
                @Override
                public void accept(long line, Sample s) {
                    accepted.incrementAndGet();
                    if (!(replaceFixes && s instanceof GnssFix)) {
                        samples.add(s);
                    }
                }

                @Override
                public void reject(LineError e) {
                    if (rejected.size() < NOTED_ERRORS) {
                        rejected.add(e);
                    }
                    rejectedCount.incrementAndGet();
                }

                @Override
                public void unknownFields(UnknownFields u) {
                    unknown.add(u);
                }
            });
            List<Sample> all = samples;
            List<String> notes = new ArrayList<>();
            List<InputFile> inputs = new ArrayList<>();
            inputs.add(new InputFile(log.toString(), "ndjson", accepted.get(), rejectedCount.get()));
            if (rejectedCount.get() > 0) {
                StringBuilder b = new StringBuilder(rejectedCount.get() + " NDJSON lines rejected");
                rejected.forEach(e -> b.append("; line ").append(e.line()).append(": ").append(e.detail()));
                notes.add(b.toString());
            }
            unknown.forEach(u -> notes.add("NDJSON: " + u.describe()));
            if (nmea != null) {
                NmeaResult r;
                try {
                    r = NmeaReader.readFile(nmea);
                } catch (IOException e) {
                    // Blame the NMEA file, not the log it was paired with.
                    throw new IOException("the NMEA file " + nmea + ": " + OptionErrors.describe(e), e);
                }
                all = mergedByTime(samples, r.fixes());
                notes.add(String.format(Locale.ROOT, "GNSS from %s: %d fixes; %d sentences skipped as bad; "
                                + "%d without a solution, %d receiver dead reckoning, %d other quality skipped; "
                                + "%d undated", nmea.getFileName(), r.fixes().size(), r.bad().size(), r.noSolution(),
                        r.deadReckoning(), r.otherQuality(), r.undated()));
                r.bad().stream().limit(NOTED_ERRORS).forEach(e ->
                        notes.add(nmea.getFileName() + " line " + e.line() + ": " + e.reason()));
                inputs.add(new InputFile(nmea.toString(), "nmea", r.fixes().size(), r.bad().size()));
            }
            return new ScoringRun.LoadedLog(name(), all, notes, inputs);
        }
    }

    /**
     * The log's samples with the fixes of a separate GNSS file woven in by time, as a rig posting both
     * streams would interleave them: each fix goes before the first log sample that is later than it.
     * Both lists keep their own order, so the time ordering sees each stream as it was recorded.
     */
    static List<Sample> mergedByTime(List<Sample> log, List<? extends Sample> fixes) {
        List<Sample> merged = new ArrayList<>(log.size() + fixes.size());
        int f = 0;
        for (Sample s : log) {
            while (f < fixes.size() && fixes.get(f).t() < s.t()) {
                merged.add(fixes.get(f++));
            }
            merged.add(s);
        }
        while (f < fixes.size()) {
            merged.add(fixes.get(f++));
        }
        return merged;
    }

    /** Progress on stderr: at most one line every two seconds, and none when quiet. */
    private static final class Progress implements ScoringRun.Listener {
        private static final long EVERY_NS = 2_000_000_000L;
        private final PrintWriter err;
        private final int logs;
        private final boolean quiet;
        private final long startNs = System.nanoTime();
        private final AtomicLong lastPrintNs = new AtomicLong(System.nanoTime());
        private final AtomicLong samplesDone = new AtomicLong();
        private final AtomicLong samplesLoaded = new AtomicLong();
        private final AtomicInteger logsLoaded = new AtomicInteger();
        private final AtomicInteger logsDone = new AtomicInteger();
        private final AtomicInteger windows = new AtomicInteger();

        Progress(PrintWriter err, int logs, boolean quiet) {
            this.err = err;
            this.logs = logs;
            this.quiet = quiet;
        }

        @Override
        public void logLoaded(String log, int samples, int passes) {
            logsLoaded.incrementAndGet();
            samplesLoaded.addAndGet((long) samples * passes);
            maybePrint();
        }

        @Override
        public void samplesDone(int samples) {
            samplesDone.addAndGet(samples);
            maybePrint();
        }

        @Override
        public void windowsScored(int n) {
            windows.addAndGet(n);
        }

        @Override
        public void logDone(String log) {
            logsDone.incrementAndGet();
            maybePrint();
        }

        private void maybePrint() {
            long now = System.nanoTime();
            long last = lastPrintNs.get();
            if (quiet || now - last < EVERY_NS || !lastPrintNs.compareAndSet(last, now)) {
                return;
            }
            double elapsed = (now - startNs) / 1e9;
            long done = samplesDone.get();
            // Work still unknown for logs not yet read: assume they are like the ones read so far.
            int loaded = Math.max(logsLoaded.get(), 1);
            double total = samplesLoaded.get() * (double) logs / loaded;
            double fraction = total > 0 ? Math.min(done / total, 1.0) : 0.0;
            String left = fraction > 0.02 ? String.format(Locale.ROOT, "about %.0f s left",
                    elapsed * (1 - fraction) / fraction) : "estimating time left";
            synchronized (err) {
                err.printf(Locale.ROOT, "score: %d/%d logs done, %d windows scored, %.1f M samples replayed "
                                + "(%.2f M/s), %.0f%%, %s%n", logsDone.get(), logs, windows.get(), done / 1e6,
                        done / 1e6 / elapsed, 100 * fraction, left);
                err.flush();
            }
        }

        void finish() {
            if (quiet) {
                return;
            }
            double elapsed = (System.nanoTime() - startNs) / 1e9;
            err.printf(Locale.ROOT, "score: %d logs, %d windows in %.1f s (%.2f M samples/s replayed)%n", logs,
                    windows.get(), elapsed, samplesDone.get() / 1e6 / elapsed);
            err.flush();
        }
    }
}
