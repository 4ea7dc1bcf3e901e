package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;

import java.net.InetAddress;
import java.net.Socket;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.Timeout;
import org.wayhold.sample.FixType;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;
import org.wayhold.settings.ServerSettings;

/**
 * Rule: a pose stream whose client stops reading is dropped within a bounded time, so that it frees
 * its slot and its thread: once its queue is full the stream is closed, and a write that blocks on the
 * full connection fails after {@code server.idle_timeout_s} (2 s here). The client here opens a stream
 * with a small receive buffer and never reads; the vehicle then gets 40 minutes of driving, about
 * 12,000 poses or 8 MB of events, far more than the socket buffers on both ends hold. A guard of the
 * stream's bounds (the race on the stream limit itself is {@link EdgeFaultsTest}); the sample times are
 * an exact hand case, and 15 s leaves room for a busy machine.
 */
class SlowStreamConsumerTest {

    private static final double IDLE_TIMEOUT_S = 2.0;

    @Test
    @Timeout(value = 2, unit = TimeUnit.MINUTES)
    void aStreamWhoseClientStopsReadingIsDroppedAndItsSlotFreed() throws Exception {
        try (LiveServer server = new LiveServer(LiveServer.settings(s -> new ServerSettings(s.port(), s.bind(),
                s.writeTokens(), s.readTokens(), s.maxBodyBytes(), s.maxLineBytes(), s.maxSamplesPerRequest(),
                s.maxSessions(), s.maxVehicleIdChars(), s.maxSamplesPerSecondPerVehicle(), s.rateBurstS(),
                s.corsOrigins(), 0.5, IDLE_TIMEOUT_S, s.minBodyBytesPerS(), s.drainTimeoutS(),
                s.maxConcurrentUploads(), s.maxStreams())))) {
            List<Sample> drive = straightDrive(2400.0);
            assertThat(server.postNdjson("stalled", Drives.ndjson(drive.subList(0, 100))).statusCode()).isEqualTo(200);
            try (Socket reader = new Socket()) {
                reader.setReceiveBufferSize(4096);
                reader.connect(new java.net.InetSocketAddress(InetAddress.getLoopbackAddress(), server.service.port()));
                reader.getOutputStream().write(("GET /v1/vehicles/stalled/stream HTTP/1.1\r\nHost: x\r\n"
                        + "Accept: text/event-stream\r\n\r\n").getBytes(StandardCharsets.US_ASCII));
                reader.getOutputStream().flush();
                awaitStreams(server, 1, 10);
                for (List<Sample> chunk : Drives.chunks(drive.subList(100, drive.size()), 300.0)) {
                    assertThat(server.postNdjson("stalled", Drives.ndjson(chunk)).statusCode()).isEqualTo(200);
                }
                // Dropped well within the bound: the queue fills at once, a blocked write waits 2 s.
                awaitStreams(server, 0, 15);
            }
        }
    }

    private static void awaitStreams(LiveServer server, int count, long withinS) throws InterruptedException {
        long deadline = System.nanoTime() + TimeUnit.SECONDS.toNanos(withinS);
        int open;
        while ((open = LiveServer.json(server.get("/health")).path("streams").asInt()) != count
                && System.nanoTime() < deadline) {
            Thread.sleep(50);
        }
        assertThat(open).as("open pose streams within %d s", withinS).isEqualTo(count);
    }

    /** Driving north at 10 m/s: inputs at 10 Hz, fixes at 5 Hz (exact hand case, no noise). */
    private static List<Sample> straightDrive(double durationS) {
        List<Sample> out = new ArrayList<>();
        double t0 = 1.8e9;
        for (int i = 0; i * 0.1 < durationS; i++) {
            double t = t0 + i * 0.1;
            out.add(new YawRate(t, 0.0));
            out.add(new WheelSpeed(t, 10.0));
            if (i % 2 == 0) {
                // 10 m/s north: 1 m is about 8.99e-6 degrees of latitude near 48 N.
                out.add(new GnssFix(t, 48.0 + i * 1.0 * 8.99e-6, 11.0, 500.0, 1.0, 2.0, FixType.THREE_D, 9, 1.0,
                        10.0, 0.0));
            }
        }
        return out;
    }
}
