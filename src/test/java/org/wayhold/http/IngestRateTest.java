package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

import java.io.IOException;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.wayhold.ingest.LineError;
import org.wayhold.ingest.NdjsonReader;
import org.wayhold.ingest.SampleSink;
import org.wayhold.sample.Sample;
import org.wayhold.settings.ServerSettings;

/**
 * The per-vehicle token bucket, on a hand-driven clock (no test here depends on real time): exact
 * hand cases for the refill, the debt and the Retry-After rounding, and the default rate against a
 * recorded drive replayed 100 times faster than real time.
 */
class IngestRateTest {

    private long nowNanos;

    private IngestRate rate(double perS, double burstS) {
        return new IngestRate(perS, burstS, () -> nowNanos);
    }

    private void advanceS(double s) {
        nowNanos += Math.round(s * 1e9);
    }

    private static long retryAfterS(IngestRate rate, String vehicle) {
        try {
            rate.admit(vehicle);
            return 0;
        } catch (HttpProblem p) {
            assertThat(p.status()).isEqualTo(429);
            return Long.parseLong(p.headers().get("Retry-After"));
        }
    }

    @Test
    void aLargeBatchIsTakenWholeAndTheNextRequestWaitsForTheDebt() {
        IngestRate r = rate(100.0, 1.0);
        r.admit("a");
        r.charge("a", 350);
        // 100 tokens in the bucket, 350 taken: a debt of 250 samples = 2.5 s at 100/s, rounded up to 3 s.
        assertThat(retryAfterS(r, "a")).isEqualTo(3);
        advanceS(2.0);
        assertThat(retryAfterS(r, "a")).isEqualTo(1);
        advanceS(0.5);
        assertThat(retryAfterS(r, "a")).isZero();
        // Another vehicle has its own bucket.
        assertThat(retryAfterS(r, "b")).isZero();
    }

    @Test
    void theBucketRefillsOnlyToItsBurst() {
        IngestRate r = rate(100.0, 2.0);
        r.charge("a", 1);
        advanceS(3600.0);
        // An hour idle still leaves only 2 s of rate (200 samples): 201 more put it 2 samples in debt.
        r.charge("a", 201);
        assertThat(retryAfterS(r, "a")).isEqualTo(1);
    }

    @Test
    void aForgottenVehicleStartsAfresh() {
        IngestRate r = rate(10.0, 1.0);
        r.charge("a", 1000);
        // A full bucket of 10, 1000 taken: 990 samples of debt at 10/s is 99 s.
        assertThat(retryAfterS(r, "a")).isEqualTo(99);
        r.forget("a");
        assertThat(r.size()).isZero();
        assertThat(retryAfterS(r, "a")).isZero();
    }

    @Test
    void theProblemNamesTheVehicleTheRateAndTheKey() {
        IngestRate r = rate(10.0, 1.0);
        r.charge("van-7", 100);
        assertThatThrownBy(() -> r.admit("van-7")).isInstanceOfSatisfying(HttpProblem.class, p -> {
            assertThat(p.field()).isEqualTo("vehicle");
            assertThat(p.detail()).contains("'van-7'", "10 per second", "server.max_samples_per_second_per_vehicle");
        });
    }

    /**
     * The defaults let a recorded drive through at 100 times real time: the open-sky demo log, driven 20
     * times in a row and posted as one batch per second of drive time every 10 ms of wall time, is never
     * refused; at 1000 times real time it is (once the 2 s burst is spent), which shows the limit is real.
     */
    @Test
    void theDefaultRateLetsARecordedDriveReplayAtAHundredTimesRealTime() throws IOException {
        List<Sample> drive = new ArrayList<>();
        NdjsonReader.readFile(Path.of("sample-logs", "open-sky.ndjson.gz"), new SampleSink() {
            @Override
            public void accept(long line, Sample s) {
                drive.add(s);
            }

            @Override
            public void reject(LineError e) {
                throw new AssertionError("demo log line " + e.line() + ": " + e.reason());
            }
        });
        double durationS = drive.get(drive.size() - 1).t() - drive.get(0).t();
        double samplesPerS = drive.size() / durationS;
        // The demo rigs: 100 Hz yaw rate, 50 Hz wheel speed, 5 Hz GNSS, 10 Hz reference (sample-logs/README.md).
        assertThat(samplesPerS).isBetween(160.0, 170.0);

        ServerSettings d = ServerSettings.defaults();
        assertThat(refusalsReplaying(drive, durationS, d, 100.0, 20)).isZero();
        assertThat(refusalsReplaying(drive, durationS, d, 1000.0, 20)).isPositive();
    }

    private int refusalsReplaying(List<Sample> drive, double durationS, ServerSettings d, double speedup, int laps) {
        nowNanos = 0;
        IngestRate r = rate(d.maxSamplesPerSecondPerVehicle(), d.rateBurstS());
        double t0 = drive.get(0).t();
        int refusals = 0;
        for (int lap = 0; lap < laps; lap++) {
            double lapStartS = lap * Math.ceil(durationS + 1.0);
            int i = 0;
            for (double batchEnd = t0 + 1.0; i < drive.size(); batchEnd += 1.0) {
                int n = 0;
                while (i < drive.size() && drive.get(i).t() < batchEnd) {
                    i++;
                    n++;
                }
                nowNanos = Math.round((lapStartS + batchEnd - t0) / speedup * 1e9);
                if (retryAfterS(r, "replay") > 0) {
                    refusals++;
                    continue;
                }
                r.charge("replay", n);
            }
        }
        return refusals;
    }
}
