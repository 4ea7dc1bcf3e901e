package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;
import java.util.concurrent.TimeUnit;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.Timeout;
import org.junit.jupiter.api.io.TempDir;
import org.wayhold.settings.IngestSettings;
import org.wayhold.testing.ServeChild;

/**
 * Memory is bounded per request: a body of nothing but bad lines costs no more than a good one.
 *
 * <p>Rule: an all-invalid body of 60 MiB (a million lines of {@code x}) posted to the real service in a
 * child JVM with a 256 MiB heap gets an ordinary reply: every line counted in {@code rejected_count},
 * the first {@code ingest.max_listed_rejections} (1000) listed with their line numbers. The rejections
 * were once all kept until the reply was written, about 350 bytes each, and the child ran out of
 * memory. The heap the child reports afterwards goes to {@code target/request-memory.txt}.
 */
class InvalidBodyMemoryTest {

    private static final int LINE_BYTES = 64;
    private static final int BODY_BYTES = 60 * 1024 * 1024;
    private static final Pattern HEAP_USED = Pattern.compile("(?m)^jvm_memory_used_bytes\\{area=\"heap\",[^}]*\\} (\\S+)$");

    @TempDir
    Path tmp;

    @Test
    @Timeout(value = 5, unit = TimeUnit.MINUTES)
    void aSixtyMebibyteBodyOfBadLinesGetsAnOrdinaryReplyInA256MebibyteHeap() throws Exception {
        byte[] body = new byte[BODY_BYTES];
        Arrays.fill(body, (byte) 'x');
        for (int i = LINE_BYTES - 1; i < body.length; i += LINE_BYTES) {
            body[i] = '\n';
        }
        long lines = BODY_BYTES / LINE_BYTES;
        ServeChild child = ServeChild.start(tmp.resolve("serve.log"), List.of("--data", tmp.resolve("data").toString()),
                null, 120);
        try {
            HttpClient http = HttpClient.newBuilder().connectTimeout(Duration.ofSeconds(10)).build();
            HttpResponse<String> r = http.send(HttpRequest.newBuilder(URI.create(child.baseUrl() + "/v1/vehicles/junk/samples"))
                    .timeout(Duration.ofMinutes(3)).header("Content-Type", "application/x-ndjson")
                    .POST(HttpRequest.BodyPublishers.ofByteArray(body)).build(), HttpResponse.BodyHandlers.ofString());
            assertThat(r.statusCode()).as(r.body()).isEqualTo(200);
            JsonNode reply = LiveServer.JSON.readTree(r.body());
            assertThat(reply.path("accepted").asLong()).isZero();
            assertThat(reply.path("rejected_count").asLong()).isEqualTo(lines);
            int listed = IngestSettings.defaults().maxListedRejections();
            assertThat(reply.path("rejected")).hasSize(listed);
            assertThat(reply.path("rejected").get(0).path("line").asLong()).isEqualTo(1);
            assertThat(reply.path("rejected").get(listed - 1).path("line").asLong()).isEqualTo(listed);
            assertThat(reply.path("rejected").get(0).path("code").asText()).isEqualTo("malformed");

            String metrics = http.send(HttpRequest.newBuilder(URI.create(child.baseUrl() + "/metrics")).GET().build(),
                    HttpResponse.BodyHandlers.ofString()).body();
            double heapUsed = 0;
            Matcher m = HEAP_USED.matcher(metrics);
            while (m.find()) {
                heapUsed += Double.parseDouble(m.group(1));
            }
            assertThat(heapUsed).as("heap pools reported").isPositive();
            Files.createDirectories(Path.of("target"));
            Files.writeString(Path.of("target", "request-memory.txt"), String.format(Locale.ROOT,
                    "a %d MiB body of %d invalid lines to serve in a child JVM with -Xmx256m: reply 200, %d rejections"
                            + " counted, %d listed; heap used after the request: %.1f MiB%n",
                    BODY_BYTES >> 20, lines, reply.path("rejected_count").asLong(), reply.path("rejected").size(),
                    heapUsed / (1024.0 * 1024.0)));
        } finally {
            child.stop();
        }
    }
}
