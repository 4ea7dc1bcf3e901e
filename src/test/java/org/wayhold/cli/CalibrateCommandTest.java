package org.wayhold.cli;

import static org.assertj.core.api.Assertions.assertThat;

import java.io.PrintWriter;
import java.io.StringWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.wayhold.config.ConfigLoader;
import org.wayhold.ingest.NdjsonWriter;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulationSettings;
import picocli.CommandLine;

/** {@code wayhold calibrate} end to end: the profile it writes, its report, and what it refuses. */
class CalibrateCommandTest {

    private record Run(int exit, String out, String err) {
    }

    private static Run run(String... args) {
        CommandLine cl = Main.newCommandLine();
        StringWriter out = new StringWriter();
        StringWriter err = new StringWriter();
        cl.setOut(new PrintWriter(out));
        cl.setErr(new PrintWriter(err));
        int exit = cl.execute(args);
        return new Run(exit, out.toString(), err.toString());
    }

    private static Path write(Path file, List<? extends Sample> samples) throws Exception {
        try (NdjsonWriter w = NdjsonWriter.open(file)) {
            for (Sample s : samples) {
                w.write(s);
            }
        }
        return file;
    }

    private static List<Sample> simulated(double minutes, long seed) {
        return DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(minutes), seed).samples();
    }

    @Test
    void writesAProfileThatLoadsRoundTripsAndScoresWithAReportBesideIt(@TempDir Path dir) throws Exception {
        Path log = write(dir.resolve("drive.ndjson.gz"), simulated(10, 31L));
        Path profile = dir.resolve("car.yaml");
        Run r = run("calibrate", log.toString(), "--out", profile.toString(), "--outage", "10", "--every", "20",
                "--max-evaluations", "60");
        assertThat(r.exit()).as(r.err()).isZero();
        // Progress on stderr, step by step.
        assertThat(r.err()).contains("calibrate:").contains("maximising the likelihood");
        assertThat(r.out()).contains("wrote " + profile);

        Settings loaded = ConfigLoader.load(profile);
        // Round trip: what the loader reads, written again, reads back equal.
        assertThat(ConfigLoader.parse(ConfigLoader.toYaml(loaded), "again")).isEqualTo(loaded);
        // The calibrated keys differ from the defaults; the rest of the file is the configuration it started from.
        assertThat(loaded.filter()).isNotEqualTo(Settings.defaults().filter());
        assertThat(loaded.server()).isEqualTo(Settings.defaults().server());
        assertThat(Files.readString(profile)).startsWith("# wayhold configuration with a calibrated profile");

        Path report = dir.resolve("car.report.txt");
        String text = Files.readString(report);
        assertThat(text).contains("CAUTION").contains("not for vehicle control or safety functions")
                .contains("Held-out driving: configured vs calibrated").contains("inside95")
                .contains("Schweppe").contains("GNSS latency");

        Run score = run("score", log.toString(), "--config", profile.toString(), "--outage", "10", "--every", "30",
                "--min-aided", "30", "--out", dir.resolve("score").toString(), "--quiet");
        assertThat(score.exit()).as(score.err()).isZero();
    }

    @Test
    void refusesALogWithoutGnssAndNamesIt(@TempDir Path dir) throws Exception {
        List<Sample> noFixes = simulated(6, 32L).stream().filter(s -> !(s instanceof GnssFix)).toList();
        Path log = write(dir.resolve("no-gnss.ndjson"), noFixes);
        Run r = run("calibrate", log.toString(), "--out", dir.resolve("p.yaml").toString(), "--quiet");
        assertThat(r.exit()).isEqualTo(1);
        assertThat(r.err()).contains("no-gnss.ndjson").contains("no GNSS fix with a solution");
        assertThat(dir.resolve("p.yaml")).doesNotExist();
    }

    @Test
    void refusesADriveTooShortForAFit(@TempDir Path dir) throws Exception {
        Path log = write(dir.resolve("short.ndjson"), simulated(3, 33L));
        Run r = run("calibrate", log.toString(), "--out", dir.resolve("p.yaml").toString(), "--quiet");
        assertThat(r.exit()).isEqualTo(1);
        assertThat(r.err()).contains("short.ndjson").contains("too short").contains("at least 300 s needed");
    }

    @Test
    void aStraightDriveLeavesTheTurnConstantsAtTheConfiguredValuesOrIsRefusedWhenStrict(@TempDir Path dir)
            throws Exception {
        Path log = write(dir.resolve("straight.ndjson"), straightDrive(480.0));
        Run strict = run("calibrate", log.toString(), "--out", dir.resolve("s.yaml").toString(), "--strict",
                "--hold-out", "0", "--quiet");
        assertThat(strict.exit()).isEqualTo(1);
        assertThat(strict.err()).contains("--strict").contains("gyro scale").contains("antenna forward")
                .contains("deg of turning");

        Path profile = dir.resolve("p.yaml");
        Run lenient = run("calibrate", log.toString(), "--out", profile.toString(), "--hold-out", "0",
                "--max-evaluations", "40", "--quiet");
        assertThat(lenient.exit()).as(lenient.err()).isZero();
        assertThat(lenient.out()).contains("left at the configured value").contains("gyro scale");
        Settings loaded = ConfigLoader.load(profile);
        assertThat(loaded.profileFor("default").gyroScale()).isEqualTo(1.0);
        assertThat(loaded.profileFor("default").leverArmForwardM()).isEqualTo(0.0);
        assertThat(Files.readString(dir.resolve("p.report.txt"))).contains("nothing held out");
    }

    /**
     * A straight drive north at 12 m/s: wheel speed at 50 Hz, a still gyro at 100 Hz, 5 Hz fixes with 0.5 m
     * of seeded white noise. A scenario of our own; one degree of latitude taken as 111,200 m (the
     * test needs no geodetic precision, only a straight line).
     */
    private static List<Sample> straightDrive(double seconds) {
        SplittableRandom rnd = new SplittableRandom(34L);
        List<Sample> out = new ArrayList<>();
        double t0 = 1_800_000_000.0;
        for (int i = 0; i <= (int) (seconds * 100); i++) {
            double t = t0 + i / 100.0;
            if (i % 2 == 0) {
                out.add(new WheelSpeed(t, 12.0));
            }
            out.add(new YawRate(t, 0.0));
            if (i % 20 == 0) {
                double north = 12.0 * i / 100.0 + 0.5 * gaussian(rnd);
                double east = 0.5 * gaussian(rnd);
                out.add(GnssFix.position(t, 48.0 + north / 111_200.0, 8.0 + east / (111_200.0 * Math.cos(Math.toRadians(48.0))),
                        1.0));
            }
        }
        return out;
    }

    private static double gaussian(SplittableRandom rnd) {
        double u1 = 1.0 - rnd.nextDouble();
        double u2 = rnd.nextDouble();
        return Math.sqrt(-2.0 * Math.log(u1)) * Math.cos(2.0 * Math.PI * u2);
    }
}
