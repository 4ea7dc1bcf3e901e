package org.wayhold.cli;

import static org.assertj.core.api.Assertions.assertThat;

import java.io.IOException;
import java.io.PrintWriter;
import java.io.StringWriter;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.wayhold.ingest.LineError;
import org.wayhold.ingest.NdjsonReader;
import org.wayhold.ingest.ReadResult;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.GnssLatency;
import org.wayhold.simulate.GyroScale;
import org.wayhold.simulate.Scenario;
import org.wayhold.simulate.SimulationSettings;
import org.wayhold.simulate.ToothCounting;
import picocli.CommandLine;

class SimulateCommandTest {

    @TempDir
    Path dir;

    private final StringWriter out = new StringWriter();
    private final StringWriter err = new StringWriter();

    private int run(String... args) {
        CommandLine cl = Main.newCommandLine();
        cl.setOut(new PrintWriter(out, true));
        cl.setErr(new PrintWriter(err, true));
        return cl.execute(args);
    }

    @Test
    void simulateWritesALogThatReadsBackWithoutRejectionsAndEqualToTheSimulation() throws IOException {
        Path file = dir.resolve("drive.ndjson.gz");
        int code = run("simulate", "--minutes", "3", "--tunnels", "20,30", "--seed", "7",
                "--origin", "-33.9,151.1,40", "--out", file.toString());
        assertThat(code).isZero();
        assertThat(err.toString()).isEmpty();

        ReadResult result = NdjsonReader.readFileAll(file);
        List<Sample> read = result.samples();
        List<LineError> rejected = result.rejected();
        assertThat(rejected).isEmpty();
        // The writer keeps every double's shortest round-trip digits, so the file holds exactly what the
        // simulator made with the same options.
        SimulationSettings s = SimulationSettings.defaults().withMinutes(3).withTunnelsS(20, 30)
                .withOrigin(-33.9, 151.1, 40.0);
        assertThat(read).isEqualTo(DriveSimulator.simulate(s, 7L).samples());
        // 180 s at 100 + 50 + 10 Hz, plus 5 Hz GNSS less the 50 s of tunnels.
        assertThat(read).hasSize(18_000 + 9_000 + 1_800 + 900 - 250);
        assertThat(read.stream().filter(x -> x instanceof GnssFix)).hasSize(650);

        String report = out.toString();
        assertThat(report).contains("wrote " + file).contains("29450 samples").contains("180.0 s")
                .contains("gnss").contains("650").contains("tunnels").contains("(20.0 s)").contains("(30.0 s)");
    }

    @Test
    void aMalformedOriginIsRefusedWithTheOptionNameAndExitCodeTwo() {
        int code = run("simulate", "--minutes", "3", "--origin", "51.2,abc,300", "--out",
                dir.resolve("x.ndjson").toString());
        assertThat(code).isEqualTo(2);
        assertThat(err.toString()).contains("--origin").contains("'abc' is not a number");
        assertThat(dir.resolve("x.ndjson")).doesNotExist();
    }

    @Test
    void tunnelsLongerThanTheDriveAreRefusedWithTheNeededLength() {
        int code = run("simulate", "--minutes", "2", "--tunnels", "100,100", "--out",
                dir.resolve("x.ndjson").toString());
        assertThat(code).isEqualTo(2);
        assertThat(err.toString()).startsWith("wayhold simulate: --minutes: 120.0 s is too short")
                .contains("need at least").doesNotContain("route.").doesNotContain("Usage");
    }

    @Test
    void missingRequiredOptionsAndANegativeLengthAreRefused() {
        assertThat(run("simulate", "--out", dir.resolve("x.ndjson").toString())).isEqualTo(2);
        assertThat(err.toString()).contains("--minutes");
        err.getBuffer().setLength(0);
        assertThat(run("simulate", "--minutes", "-1", "--out", dir.resolve("x.ndjson").toString())).isEqualTo(2);
        assertThat(err.toString()).isEqualTo("wayhold simulate: --minutes: must be a positive number of minutes, "
                + "was -1.0" + System.lineSeparator() + "Try 'wayhold simulate --help' for the options."
                + System.lineSeparator());
        err.getBuffer().setLength(0);
        assertThat(run("simulate", "--minutes", "3", "--origin", "95,10,0", "--out", dir.resolve("x.ndjson").toString()))
                .isEqualTo(2);
        assertThat(err.toString()).startsWith("wayhold simulate: --origin: must lie within [-89, 89] degrees");
    }

    @Test
    void anUnwritableOutputFailsWithExitCodeOne() {
        int code = run("simulate", "--minutes", "1", "--out", dir.resolve("missing/dir/x.ndjson").toString());
        assertThat(code).isEqualTo(1);
        assertThat(err.toString()).contains("simulate:").contains("x.ndjson");
    }

    private List<Sample> readAll(Path file) throws IOException {
        ReadResult r = NdjsonReader.readFileAll(file);
        assertThat(r.rejected()).isEmpty();
        return r.samples();
    }

    @Test
    void theDemoLogsRegenerateByteForByteFromTheCommandsInTheirReadme() throws IOException {
        Path logs = Path.of("sample-logs");
        List<String> commands = Files.readAllLines(logs.resolve("README.md"), StandardCharsets.UTF_8).stream()
                .map(String::trim).filter(l -> l.startsWith("java -jar target/wayhold.jar simulate ")).toList();
        assertThat(commands).hasSize(3);
        for (String command : commands) {
            List<String> args = new ArrayList<>(Arrays.asList(command.split(" +")).subList(3, command.split(" +").length));
            int outAt = args.indexOf("--out");
            Path original = Path.of(args.get(outAt + 1));
            Path regenerated = dir.resolve(original.getFileName());
            args.set(outAt + 1, regenerated.toString());
            assertThat(run(args.toArray(String[]::new))).as(command).isZero();
            // gzip streams written by the JDK carry no time stamp, so equal samples give equal bytes.
            assertThat(Files.readAllBytes(regenerated)).as(command).isEqualTo(Files.readAllBytes(original));
        }
    }

    @Test
    void aScenarioWritesTheSameDriveAsThePresetAndReportsItsEffects() throws IOException {
        Path file = dir.resolve("city.ndjson");
        assertThat(run("simulate", "--minutes", "12", "--scenario", "city", "--seed", "4", "--out", file.toString()))
                .isZero();
        SimulationSettings s = Scenario.CITY.applyTo(SimulationSettings.defaults().withMinutes(12));
        assertThat(readAll(file)).isEqualTo(DriveSimulator.simulate(s, 4L).samples());
        assertThat(out.toString()).contains("queues").contains("canyons").contains("effect       gnss latency 0.15 s")
                .contains("effect       gyro scale error +1.50%").contains("canyon_nlos");
    }

    @Test
    void aMagnitudeSwitchesItsEffectOnAndNoXSwitchesAPresetsEffectOff() throws IOException {
        Path file = dir.resolve("x.ndjson");
        assertThat(run("simulate", "--minutes", "3", "--seed", "2", "--latency-s", "0.2", "--gyro-scale-pct", "-1",
                "--out", file.toString())).isZero();
        SimulationSettings base = SimulationSettings.defaults().withMinutes(3);
        SimulationSettings expected = base
                .withGnss(base.gnss().withLatency(GnssLatency.off().withLatencyS(0.2)))
                .withYawRate(base.yawRate().withScale(GyroScale.off().withError(-0.01)));
        assertThat(readAll(file)).isEqualTo(DriveSimulator.simulate(expected, 2L).samples());

        Path creep = dir.resolve("creep.ndjson");
        assertThat(run("simulate", "--minutes", "9", "--seed", "2", "--scenario", "creep", "--no-teeth",
                "--out", creep.toString())).isZero();
        SimulationSettings queuesOnly = Scenario.CREEP.applyTo(SimulationSettings.defaults().withMinutes(9));
        queuesOnly = queuesOnly.withWheelSpeed(queuesOnly.wheelSpeed().withTeeth(ToothCounting.off()));
        assertThat(readAll(creep)).isEqualTo(DriveSimulator.simulate(queuesOnly, 2L).samples());

        Path arm = dir.resolve("arm.ndjson");
        assertThat(run("simulate", "--minutes", "2", "--lever-arm", "--gnss-rate-hz", "1", "--out", arm.toString()))
                .isZero();
        SimulationSettings two = SimulationSettings.defaults().withMinutes(2);
        two = two.withGnss(two.gnss().withUnconfiguredLeverArm().withRateHz(1.0));
        assertThat(readAll(arm)).isEqualTo(DriveSimulator.simulate(two, 1L).samples());
    }

    @Test
    void badEffectOptionsAreRefusedWithTheirNames() {
        Path x = dir.resolve("x.ndjson");
        assertThat(run("simulate", "--minutes", "3", "--scenario", "downtown", "--out", x.toString())).isEqualTo(2);
        assertThat(err.toString()).contains("unknown preset 'downtown'").contains("launch-slip");
        assertThat(run("simulate", "--minutes", "3", "--lever-arm-m", "1", "--out", x.toString())).isEqualTo(2);
        assertThat(err.toString()).contains("--lever-arm-m");
        assertThat(run("simulate", "--minutes", "3", "--creep-mps", "0.1", "--out", x.toString())).isEqualTo(2);
        assertThat(err.toString()).contains("--creep-mps: expected MIN,MAX");
        assertThat(run("simulate", "--minutes", "3", "--latency-s", "0.123", "--out", x.toString())).isEqualTo(2);
        assertThat(err.toString()).contains("--latency-s: must be a whole number of 0.01 s ticks, was 0.123 s");
        assertThat(run("simulate", "--minutes", "3", "--gyro-scale-pct", "60", "--out", x.toString())).isEqualTo(2);
        assertThat(err.toString()).contains("--gyro-scale-pct: must lie in (-50, 50) percent, was 60.0");
        assertThat(run("simulate", "--minutes", "3", "--scenario", "garage", "--out", x.toString())).isEqualTo(2);
        assertThat(err.toString()).contains("need at least");
        assertThat(x).doesNotExist();
    }

    @Test
    void withoutACommandTheUsageListsSimulate() {
        assertThat(run()).isEqualTo(2);
        assertThat(err.toString()).contains("a command is required").contains("simulate");
    }
}
