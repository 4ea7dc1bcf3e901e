package org.wayhold.cli;

import static org.assertj.core.api.Assertions.assertThat;

import java.io.IOException;
import java.io.PrintWriter;
import java.io.StringWriter;
import java.nio.file.Path;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.wayhold.ingest.LineError;
import org.wayhold.ingest.NdjsonReader;
import org.wayhold.ingest.ReadResult;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulationSettings;
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
        assertThat(err.toString()).contains("route.durationS").contains("need at least");
    }

    @Test
    void missingRequiredOptionsAndANegativeLengthAreRefused() {
        assertThat(run("simulate", "--out", dir.resolve("x.ndjson").toString())).isEqualTo(2);
        assertThat(err.toString()).contains("--minutes");
        assertThat(run("simulate", "--minutes", "-1", "--out", dir.resolve("x.ndjson").toString())).isEqualTo(2);
        assertThat(err.toString()).contains("route.durationS: must be a positive finite number of s, was -60.0");
    }

    @Test
    void anUnwritableOutputFailsWithExitCodeOne() {
        int code = run("simulate", "--minutes", "1", "--out", dir.resolve("missing/dir/x.ndjson").toString());
        assertThat(code).isEqualTo(1);
        assertThat(err.toString()).contains("simulate:").contains("x.ndjson");
    }

    @Test
    void withoutACommandTheUsageListsSimulate() {
        assertThat(run()).isEqualTo(2);
        assertThat(err.toString()).contains("a command is required").contains("simulate");
    }
}
