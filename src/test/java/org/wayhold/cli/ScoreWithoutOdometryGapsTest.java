package org.wayhold.cli;

import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.ObjectNode;
import java.io.InputStream;
import java.io.PrintWriter;
import java.io.StringWriter;
import java.nio.file.Path;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import picocli.CommandLine;

/**
 * Finding odometry gaps changes nothing for a log that has none. The expected report is the one the
 * tool wrote before it looked for odometry gaps (commit a9e8ec8, its jar run with the same arguments
 * on the same demo log; the file keeps its own {@code report} block, which says so). Every figure must
 * be as it was: the windows and their scores, the summaries, the windows not scored and their reasons,
 * the real gaps and the logs' notes. What is new may only say "none": {@code odometry_gap_s} is 0 in
 * every row and {@code odometry_gaps} is empty.
 *
 * <p>This is a regression check of scores, so a deliberate change of the filter or of scoring that
 * moves a figure of this log makes it fail: then write the file anew with that change's jar
 * ({@code java -jar target/wayhold.jar} and the arguments of {@link #ARGS}) and say why in the commit.
 */
class ScoreWithoutOdometryGapsTest {

    private static final String LOG = "sample-logs/two-tunnels.ndjson.gz";
    private static final String[] ARGS = {"score", LOG, "--outage", "10,30,60", "--every", "20", "--min-aided", "30",
            "--threads", "1", "--quiet"};
    private static final String EXPECTED = "two-tunnels-report-before-odometry-gaps.json";
    /** The parts of report.json that hold figures and decisions, not the run's date or settings. */
    private static final List<String> FIGURES = List.of("reference", "outages", "summary", "summary_by_log",
            "unscored_windows", "logs");

    @Test
    void aLogWithoutSilencesGivesTheSameFiguresAsBeforeOdometryGapsWereFound(@TempDir Path dir) throws Exception {
        Path out = dir.resolve("report");
        String[] args = java.util.Arrays.copyOf(ARGS, ARGS.length + 2);
        args[ARGS.length] = "--out";
        args[ARGS.length + 1] = out.toString();
        CommandLine cl = Main.newCommandLine();
        StringWriter err = new StringWriter();
        cl.setOut(new PrintWriter(new StringWriter()));
        cl.setErr(new PrintWriter(err));
        assertThat(cl.execute(args)).as(err.toString()).isZero();

        ObjectMapper json = new ObjectMapper();
        JsonNode now = json.readTree(out.resolve("report.json").toFile());
        JsonNode before;
        try (InputStream in = ScoreWithoutOdometryGapsTest.class.getResourceAsStream(EXPECTED)) {
            before = json.readTree(in);
        }
        assertThat(before.get("report").get("commit").asText()).isEqualTo("a9e8ec8");
        assertThat(now.get("outages")).hasSize(11);
        for (JsonNode row : now.get("outages")) {
            assertThat(row.get("odometry_gap_s").asDouble()).isZero();
            ((ObjectNode) row).remove("odometry_gap_s");
        }
        for (JsonNode log : now.get("logs")) {
            assertThat(log.get("odometry_gaps")).isEmpty();
            ((ObjectNode) log).remove("odometry_gaps");
        }
        for (String key : FIGURES) {
            assertThat(now.get(key)).as(key).isEqualTo(before.get(key));
        }
    }
}
