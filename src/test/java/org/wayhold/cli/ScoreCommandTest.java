package org.wayhold.cli;

import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.BufferedWriter;
import java.io.PrintWriter;
import java.io.StringWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Instant;
import java.time.ZoneOffset;
import java.util.Locale;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.wayhold.ingest.NdjsonWriter;
import org.wayhold.nmea.NmeaReader;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;
import picocli.CommandLine;

class ScoreCommandTest {

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

    private static Path writeLog(Path dir, SimulatedDrive drive) throws Exception {
        Path log = dir.resolve("drive.ndjson.gz");
        try (NdjsonWriter w = NdjsonWriter.open(log)) {
            for (Sample s : drive.samples()) {
                w.write(s);
            }
        }
        return log;
    }

    @Test
    void scoresALogIntoTheThreeFilesAndComparesTwoConfigurations(@TempDir Path dir) throws Exception {
        SimulatedDrive drive = DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(5).withWarmUpS(120)
                .withTunnelsS(30), 61L);
        Path log = writeLog(dir, drive);
        Path a = dir.resolve("a.yaml");
        Path b = dir.resolve("b.yaml");
        Files.writeString(a, "outage:\n  alert_limit_m: 10.0\n");
        Files.writeString(b, "outage:\n  alert_limit_m: 5.0\n");
        Path out = dir.resolve("report");
        Run r = run("score", log.toString(), "--outage", "10,30", "--every", "20", "--min-aided", "30",
                "--config", a.toString(), "--config", b.toString(), "--out", out.toString(), "--quiet");
        assertThat(r.exit()).as(r.err()).isZero();
        assertThat(r.err()).isEmpty();
        assertThat(r.out()).contains("wrote report.json");
        JsonNode json = new ObjectMapper().readTree(out.resolve("report.json").toFile());
        assertThat(json.get("reference").asText()).isEqualTo("reference");
        assertThat(json.get("outages").size()).isGreaterThan(4);
        assertThat(json.get("outages").get(0).get("config").asText()).isEqualTo("a");
        assertThat(json.get("comparison").get(0).get("config").asText()).isEqualTo("b");
        assertThat(json.get("configs").get(1).get("settings").get("outage").get("alert_limit_m").asDouble())
                .isEqualTo(5.0);
        assertThat(out.resolve("outages.csv")).exists();
        assertThat(out.resolve("report.html")).exists();
    }

    /**
     * A report says what made it: the tool's version (the build's own, org.wayhold.BuildInfo), the
     * command line as given, the date, and every input with its rejected-line count (two bad lines
     * planted here), in the JSON and the HTML.
     */
    @Test
    void theReportRecordsTheToolTheCommandLineTheDateAndEveryInput(@TempDir Path dir) throws Exception {
        SimulatedDrive drive = DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(4).withWarmUpS(120)
                .withStartT(1_800_000_000.0), 64L);
        Path log = dir.resolve("drive.ndjson");
        try (NdjsonWriter w = NdjsonWriter.open(log)) {
            for (Sample s : drive.samples()) {
                w.write(s);
            }
        }
        Files.writeString(log, "not json\n{\"type\":\"warp\",\"t\":1}\n" + Files.readString(log));
        Path config = dir.resolve("mine.yaml");
        Files.writeString(config, "outage:\n  alert_limit_m: 8.0\n");
        Path out = dir.resolve("out");
        Instant before = Instant.now().minusSeconds(1);
        Run r = run("score", log.toString(), "--outage", "10", "--every", "30", "--config", config.toString(),
                "--out", out.toString(), "--quiet");
        assertThat(r.exit()).as(r.err()).isZero();
        JsonNode json = new ObjectMapper().readTree(out.resolve("report.json").toFile());
        JsonNode about = json.get("report");
        assertThat(about.get("version").asText()).isEqualTo(org.wayhold.BuildInfo.current().version());
        assertThat(about.get("command_line").asText()).isEqualTo("wayhold score " + log + " --outage 10 --every 30"
                + " --config " + config + " --out " + out + " --quiet");
        Instant date = Instant.parse(about.get("date").asText());
        assertThat(date).isBetween(before, Instant.now().plusSeconds(1));
        JsonNode inputs = json.get("inputs");
        assertThat(inputs.get(0).get("file").asText()).isEqualTo(log.toString());
        assertThat(inputs.get(0).get("rejected_lines").asInt()).isEqualTo(2);
        assertThat(inputs.get(0).get("accepted").asInt()).isEqualTo(drive.samples().size());
        assertThat(inputs.get(1).get("file").asText()).isEqualTo(config.toString());
        assertThat(inputs.get(1).get("kind").asText()).isEqualTo("config");
        String html = Files.readString(out.resolve("report.html"));
        assertThat(html).contains(about.get("command_line").asText()).contains(about.get("date").asText())
                .contains("<td>2</td>").contains(org.wayhold.BuildInfo.current().version());
    }

    /**
     * A run in which no window can be scored (1000 s outages in a 4-minute log) must not pass for a good
     * one: a warning on stderr that says why, exit code 1, and the report written with every planned
     * window and its reason.
     */
    @Test
    void aRunThatScoresNoWindowWarnsAndExitsNonZero(@TempDir Path dir) throws Exception {
        SimulatedDrive drive = DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(4), 65L);
        Path log = writeLog(dir, drive);
        Path out = dir.resolve("out");
        Run r = run("score", log.toString(), "--outage", "1000", "--out", out.toString(), "--quiet");
        assertThat(r.exit()).isEqualTo(1);
        assertThat(r.err()).startsWith("score: warning: no window could be scored: ")
                .contains("it would end after the log's last GNSS fix").contains("the longest log lasts");
        JsonNode json = new ObjectMapper().readTree(out.resolve("report.json").toFile());
        assertThat(json.get("outages").size()).isZero();
        assertThat(json.get("unscored_windows").size()).isPositive();
        json.get("unscored_windows").forEach(u -> assertThat(u.get("reason").asText()).isEqualTo("beyond_log_end"));
        assertThat(Files.readString(out.resolve("report.html"))).contains("id=\"nothing-scored\"");
    }

    @Test
    void badOptionsExitWithTwoAndNameTheOptionInOneLineAndAPointerToTheHelp(@TempDir Path dir) throws Exception {
        Path log = dir.resolve("some.ndjson");
        Files.writeString(log, "");
        Run r = run("score", log.toString(), "--every", "12.5", "--out", dir.toString());
        assertThat(r.exit()).isEqualTo(2);
        assertThat(r.err()).isEqualTo("wayhold score: --every: must be a whole number of 1.0 s steps, was 12.5 s"
                + System.lineSeparator() + "Try 'wayhold score --help' for the options." + System.lineSeparator());
        assertThat(run("score", log.toString(), "--min-aided", "-5", "--out", dir.toString()).err())
                .startsWith("wayhold score: --min-aided: ");
    }

    @Test
    void aMissingFileIsBlamedOnTheOptionThatNamedIt(@TempDir Path dir) throws Exception {
        Path log = dir.resolve("drive.ndjson");
        Files.writeString(log, "");
        Run r = run("score", log.toString(), "--gnss", dir.resolve("missing.nmea").toString(), "--out", dir.toString());
        assertThat(r.exit()).isEqualTo(2);
        assertThat(r.err()).startsWith("wayhold score: --gnss: no such file ").contains("missing.nmea")
                .doesNotContain("drive.ndjson");
        r = run("score", dir.resolve("absent.ndjson").toString(), "--out", dir.toString());
        assertThat(r.err()).startsWith("wayhold score: LOG: no such file ").contains("absent.ndjson");
        r = run("score", log.toString(), "--config", dir.resolve("absent.yaml").toString(), "--out", dir.toString());
        assertThat(r.err()).startsWith("wayhold score: --config: no such file ");
    }

    @Test
    void aLogWithoutGnssIsADataErrorInOneLineWithoutTheUsage(@TempDir Path dir) throws Exception {
        Path log = dir.resolve("odometry-only.ndjson");
        Files.writeString(log, "{\"type\":\"wheel_speed\",\"t\":1800000000.0,\"speed\":10.0}\n"
                + "{\"type\":\"yaw_rate\",\"t\":1800000000.01,\"rate\":0.0}\n");
        Run r = run("score", log.toString(), "--out", dir.resolve("out").toString(), "--quiet");
        assertThat(r.exit()).isEqualTo(1);
        assertThat(r.err()).isEqualTo("wayhold score: odometry-only.ndjson: has no GNSS fix with a solution, "
                + "nothing to score" + System.lineSeparator());
    }

    @Test
    void fieldsOfNoSampleTypeAreCountedAndNamedInTheLogsNotes(@TempDir Path dir) throws Exception {
        SimulatedDrive drive = DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(4).withWarmUpS(120)
                .withStartT(1_800_000_000.0), 63L);
        Path log = dir.resolve("drive.ndjson");
        try (BufferedWriter w = Files.newBufferedWriter(log)) {
            w.write("{\"type\":\"gnss\",\"t\":1799999999.0,\"lat\":0.0,\"lon\":0.0,\"sigma_hz\":1.0}\n");
            w.write("{\"type\":\"wheel_speed\",\"t\":1799999999.5,\"speed\":0.0,\"spede\":1,\"sigma_hz\":2}\n");
        }
        try (NdjsonWriter w = NdjsonWriter.open(dir.resolve("rest.ndjson"))) {
            for (Sample s : drive.samples()) {
                w.write(s);
            }
        }
        Files.write(log, Files.readAllBytes(dir.resolve("rest.ndjson")), java.nio.file.StandardOpenOption.APPEND);
        Path out = dir.resolve("out");
        Run r = run("score", log.toString(), "--outage", "10", "--every", "30", "--min-aided", "0", "--out",
                out.toString(), "--quiet");
        assertThat(r.exit()).as(r.err()).isZero();
        String notes = new ObjectMapper().readTree(out.resolve("report.json").toFile()).get("logs").get(0)
                .get("notes").toString();
        assertThat(notes).contains("2 lines carry fields that no sample type has, ignored: sigma_hz, spede");
    }

    /**
     * NMEA fixes replace the log's gnss lines: the same drive's fixes written as GGA and RMC (positions to
     * 1e-7 minute, about 0.2 mm) give the same windows and nearly the same errors.
     */
    @Test
    void nmeaFixesReplaceTheGnssLines(@TempDir Path dir) throws Exception {
        SimulatedDrive drive = DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(4).withWarmUpS(120)
                .withStartT(1_800_000_000.0), 62L);
        Path log = writeLog(dir, drive);
        Path nmea = dir.resolve("drive.nmea");
        int fixes = 0;
        try (BufferedWriter w = Files.newBufferedWriter(nmea)) {
            w.write("$GPGGA,bad line*00\n");
            for (GnssFix f : drive.samplesOf(GnssFix.class)) {
                w.write(gga(f) + "\n" + rmc(f) + "\n");
                fixes++;
            }
        }
        Path outA = dir.resolve("ndjson");
        Path outB = dir.resolve("nmea");
        assertThat(run("score", log.toString(), "--outage", "10", "--every", "20", "--out", outA.toString(),
                "--quiet").exit()).isZero();
        Run r = run("score", log.toString(), "--gnss", nmea.toString(), "--outage", "10", "--every", "20", "--out",
                outB.toString(), "--quiet");
        assertThat(r.exit()).as(r.err()).isZero();
        ObjectMapper mapper = new ObjectMapper();
        JsonNode a = mapper.readTree(outA.resolve("report.json").toFile());
        JsonNode b = mapper.readTree(outB.resolve("report.json").toFile());
        assertThat(b.get("logs").get(0).get("notes").toString()).contains(fixes + " fixes").contains("1 sentences skipped")
                .contains("line 1: checksum");
        // Both files are recorded as inputs, each with its count of refused lines.
        JsonNode inputs = b.get("inputs");
        assertThat(inputs.get(0).get("kind").asText()).isEqualTo("ndjson");
        assertThat(inputs.get(1).get("kind").asText()).isEqualTo("nmea");
        assertThat(inputs.get(1).get("file").asText()).isEqualTo(nmea.toString());
        assertThat(inputs.get(1).get("accepted").asInt()).isEqualTo(fixes);
        assertThat(inputs.get(1).get("rejected_lines").asInt()).isEqualTo(1);
        assertThat(a.get("outages").size()).isPositive();
        assertThat(b.get("outages").size()).isPositive();
        // The fixes read back are the drive's own, to the 1e-7 minute written (0.2 mm) and the millisecond.
        java.util.List<GnssFix> read = NmeaReader.readFile(nmea).fixes();
        java.util.List<GnssFix> orig = drive.samplesOf(GnssFix.class);
        assertThat(read).hasSize(orig.size());
        for (int i = 0; i < orig.size(); i++) {
            assertThat(read.get(i).t()).isCloseTo(orig.get(i).t(), org.assertj.core.data.Offset.offset(5e-4));
            assertThat(read.get(i).latDeg()).isCloseTo(orig.get(i).latDeg(), org.assertj.core.data.Offset.offset(2e-9));
            assertThat(read.get(i).lonDeg()).isCloseTo(orig.get(i).lonDeg(), org.assertj.core.data.Offset.offset(2e-9));
        }
        // NMEA has no sigma_h, so the filter weighs these fixes by HDOP instead: windows and errors differ.
    }

    private static String gga(GnssFix f) {
        return sentence(String.format(Locale.ROOT, "GPGGA,%s,%s,1,%02d,%.2f,%.3f,M,0.000,M,,", time(f.t()),
                latLon(f.latDeg(), f.lonDeg()), f.sats(), f.hdop(), f.altM()));
    }

    private static String rmc(GnssFix f) {
        Instant i = Instant.ofEpochMilli(Math.round(f.t() * 1000));
        String date = String.format(Locale.ROOT, "%02d%02d%02d", i.atZone(ZoneOffset.UTC).getDayOfMonth(),
                i.atZone(ZoneOffset.UTC).getMonthValue(), i.atZone(ZoneOffset.UTC).getYear() % 100);
        return sentence(String.format(Locale.ROOT, "GPRMC,%s,A,%s,%.3f,%.1f,%s,,", time(f.t()),
                latLon(f.latDeg(), f.lonDeg()), f.hasSpeed() ? f.speedMps() / NmeaReader.MPS_PER_KNOT : 0.0,
                f.hasCourse() ? f.courseDeg() : 0.0, date));
    }

    private static String time(double t) {
        Instant i = Instant.ofEpochMilli(Math.round(t * 1000));
        var z = i.atZone(ZoneOffset.UTC);
        return String.format(Locale.ROOT, "%02d%02d%02d.%03d", z.getHour(), z.getMinute(), z.getSecond(),
                z.getNano() / 1_000_000);
    }

    private static String latLon(double lat, double lon) {
        return String.format(Locale.ROOT, "%02d%010.7f,%s,%03d%010.7f,%s", (int) Math.abs(lat),
                (Math.abs(lat) % 1) * 60, lat >= 0 ? "N" : "S", (int) Math.abs(lon), (Math.abs(lon) % 1) * 60,
                lon >= 0 ? "E" : "W");
    }

    private static String sentence(String body) {
        return "$" + body + "*" + String.format("%02X", NmeaReader.checksum(body));
    }
}
