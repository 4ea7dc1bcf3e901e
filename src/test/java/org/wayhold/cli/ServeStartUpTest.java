package org.wayhold.cli;

import static org.assertj.core.api.Assertions.assertThat;
import static org.junit.jupiter.api.Assertions.assertTimeoutPreemptively;

import java.io.PrintWriter;
import java.io.RandomAccessFile;
import java.io.StringWriter;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.ByteBuffer;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.wayhold.journal.Journal;
import org.wayhold.sample.Sample;
import org.wayhold.settings.JournalSettings;
import org.wayhold.testing.JournalFixtures;
import org.wayhold.testing.ServeChild;
import org.wayhold.testing.SessionSurgery;
import picocli.CommandLine;

/**
 * {@code wayhold serve} at start-up, with the real command: one service per data directory, and a start
 * that says what it lost. Expected values: the child's own process id, and damage made by hand whose
 * sequence number the test reads from the documented framing {@code [length u32][CRC32C u32][seq u64]...}.
 */
class ServeStartUpTest {

    private static final long START_TIMEOUT_S = 120;

    @TempDir
    Path tmp;

    /**
     * Rule: a second serve on the same --data exits non-zero, naming the directory and the process that
     * holds it, instead of starting beside the first and losing acknowledged samples after a restart.
     */
    @Test
    void aSecondServeOnTheSameDataDirectoryExitsNamingTheHolder() throws Exception {
        Path data = tmp.resolve("data");
        ServeChild first = ServeChild.start(tmp.resolve("first.log"), List.of("--data", data.toString(), "--config",
                tmp.resolve("none.yaml").toString()), null, START_TIMEOUT_S);
        try {
            StringWriter out = new StringWriter();
            StringWriter err = new StringWriter();
            CommandLine cl = Main.newCommandLine();
            cl.setOut(new PrintWriter(out));
            cl.setErr(new PrintWriter(err));
            int code = assertTimeoutPreemptively(Duration.ofSeconds(60), () -> cl.execute("serve", "--port", "0",
                    "--data", data.toString(), "--config", tmp.resolve("none.yaml").toString()));
            assertThat(code).isEqualTo(1);
            assertThat(err.toString()).contains(data.toRealPath().toString())
                    .contains("pid " + first.process().pid());
            assertThat(out.toString()).doesNotContain("wayhold serving on");
        } finally {
            first.stop();
        }
    }

    /**
     * Rule: after a loss the start-up report (serve's output) says which acknowledged records were lost,
     * and why, before the service serves.
     */
    @Test
    void theStartUpReportSaysWhichRecordsWereLost() throws Exception {
        Path data = tmp.resolve("data");
        List<List<Sample>> drive = SessionSurgery.batches(111L, 1.0);
        try (Journal j = Journal.open(data, new JournalSettings(true, 0.0, 4096, 3600.0, 1L << 30, 60.0))) {
            j.recover(JournalFixtures.KEEP_NOTHING);
            for (List<Sample> b : drive) {
                Journal.await(j.append("van-a", b));
            }
        }
        Path second = JournalFixtures.segments(data).get(1);
        long seq = ByteBuffer.wrap(Files.readAllBytes(second)).getLong(8);
        try (RandomAccessFile f = new RandomAccessFile(second.toFile(), "rw")) {
            f.seek(30);
            int b = f.read();
            f.seek(30);
            f.write(b ^ 0x11);
        }
        ServeChild child = ServeChild.start(tmp.resolve("serve.log"), List.of("--data", data.toString(), "--config",
                tmp.resolve("none.yaml").toString()), null, START_TIMEOUT_S);
        try {
            String output = Files.readString(child.output());
            assertThat(output).contains("journal: LOST records " + seq + " lost: ")
                    .contains((drive.size() - 1) + " records");
            assertThat(output.indexOf("LOST")).isLessThan(output.indexOf("wayhold serving on"));
            HttpResponse<String> health = HttpClient.newHttpClient().send(HttpRequest.newBuilder(
                    URI.create(child.baseUrl() + "/health")).timeout(Duration.ofSeconds(30)).build(),
                    HttpResponse.BodyHandlers.ofString());
            assertThat(health.body()).contains("\"status\":\"degraded\"").contains("\"from_seq\":" + seq);
        } finally {
            child.stop();
        }
    }
}
