package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

import com.fasterxml.jackson.databind.JsonNode;
import java.io.ByteArrayInputStream;
import java.io.IOException;
import java.io.InputStream;
import java.io.SequenceInputStream;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.util.List;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.Sample;

/**
 * Graceful stop: pose streams end cleanly, a request whose body is still arriving when the stop begins
 * is finished and answered, and the service then accepts nothing more. This class stops its own server,
 * so it has one of its own.
 */
class GracefulStopTest {

    @Test
    void stopEndsStreamsFinishesRequestsInFlightAndThenRefusesConnections() throws Exception {
        LiveServer server = new LiveServer(LiveServer.settings(s -> s));
        List<Sample> samples = Drives.openSky(51L, 10.0);
        server.postNdjson("busy", Drives.ndjson(samples.subList(0, 100)));
        SseClientLines sse = new SseClientLines(server, "/v1/vehicles/busy/stream");
        assertThat(sse.nextEvent()).containsEntry("event", "pose");

        // A body in two halves; the second half is held back until the stop has begun.
        CountDownLatch stopBegun = new CountDownLatch(1);
        byte[] firstHalf = Drives.ndjson(samples.subList(100, 300));
        byte[] secondHalf = Drives.ndjson(samples.subList(300, 500));
        InputStream held = new InputStream() {
            private InputStream rest;

            @Override
            public int read() throws IOException {
                byte[] one = new byte[1];
                return read(one, 0, 1) < 0 ? -1 : one[0] & 0xff;
            }

            @Override
            public int read(byte[] b, int off, int len) throws IOException {
                if (rest == null) {
                    try {
                        stopBegun.await(30, TimeUnit.SECONDS);
                    } catch (InterruptedException e) {
                        throw new IOException(e);
                    }
                    rest = new ByteArrayInputStream(secondHalf);
                }
                return rest.read(b, off, len);
            }
        };
        CompletableFuture<HttpResponse<String>> inFlight = server.client.sendAsync(
                server.request("/v1/vehicles/busy/samples").header("Content-Type", "application/x-ndjson")
                        .POST(HttpRequest.BodyPublishers.ofInputStream(
                                () -> new SequenceInputStream(new ByteArrayInputStream(firstHalf), held)))
                        .build(), HttpResponse.BodyHandlers.ofString());

        HttpRequest healthAfterStop = server.request("/health").GET().build();
        Thread stopper = new Thread(server::close, "stopper");
        stopper.start();
        // The stream ends first: its end shows that the stop has begun.
        String end;
        do {
            end = sse.next();
        } while (end != null && !end.equals(SseClientLines.END) && !end.equals(SseClientLines.FAILED));
        assertThat(end).as("the pose stream completes cleanly").isEqualTo(SseClientLines.END);
        stopBegun.countDown();

        HttpResponse<String> r = inFlight.get(30, TimeUnit.SECONDS);
        assertThat(r.statusCode()).as(r.body()).isEqualTo(200);
        JsonNode reply = LiveServer.json(r);
        assertThat(reply.get("accepted").asInt()).isEqualTo(400);
        stopper.join(30_000);
        assertThat(stopper.isAlive()).isFalse();
        assertThatThrownBy(() -> server.client.send(healthAfterStop, HttpResponse.BodyHandlers.ofString()))
                .isInstanceOf(IOException.class);
        sse.close();
    }
}
