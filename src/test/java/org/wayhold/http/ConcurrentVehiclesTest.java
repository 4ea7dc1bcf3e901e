package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;

import java.net.http.HttpResponse;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Random;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.Sample;

/**
 * Vehicles are independent and each one's samples are processed in order by one writer: 20 vehicles
 * posted in 1 s chunks from 4 threads, interleaved in a seeded random order, end with exactly the poses
 * (the JSON text, to the last digit) and tracks that each vehicle gets when it is fed alone; and chunks
 * swapped in pairs, within the reorder window, give the same final pose as chunks in order.
 */
class ConcurrentVehiclesTest {

    private static final int VEHICLES = 20;
    private static LiveServer server;
    private static final List<List<List<Sample>>> drives = new ArrayList<>();

    @BeforeAll
    static void start() {
        server = new LiveServer(LiveServer.settings(s -> s));
        for (int v = 0; v < VEHICLES; v++) {
            drives.add(Drives.chunks(Drives.openSky(100L + v, 25.0), 1.0));
        }
    }

    @AfterAll
    static void stop() {
        server.close();
    }

    private record Post(String vehicle, byte[] body) {
    }

    @Test
    void interleavedPostsFromSeveralThreadsEqualEachVehicleFedAlone() throws Exception {
        // Alone: one vehicle at a time, chunk after chunk, from this thread.
        for (int v = 0; v < VEHICLES; v++) {
            for (List<Sample> chunk : drives.get(v)) {
                assertThat(server.postNdjson("alone-" + v, Drives.ndjson(chunk)).statusCode()).isEqualTo(200);
            }
        }
        // Together: each vehicle's chunks stay in order on one queue; four threads take from 20 queues in
        // a seeded random interleaving, so different vehicles are fed at the same time.
        List<List<Post>> queues = new ArrayList<>();
        for (int v = 0; v < VEHICLES; v++) {
            List<Post> q = new ArrayList<>();
            for (List<Sample> chunk : drives.get(v)) {
                q.add(new Post("mixed-" + v, Drives.ndjson(chunk)));
            }
            queues.add(q);
        }
        List<Integer> order = new ArrayList<>();
        for (int v = 0; v < VEHICLES; v++) {
            for (int k = 0; k < queues.get(v).size(); k++) {
                order.add(v);
            }
        }
        Collections.shuffle(order, new Random(7));
        int threads = 4;
        // Vehicle v is served by thread v % 4, so one vehicle's chunks leave in order while the four
        // threads interleave different vehicles.
        List<List<Post>> perThread = new ArrayList<>();
        for (int t = 0; t < threads; t++) {
            perThread.add(new ArrayList<>());
        }
        int[] next = new int[VEHICLES];
        for (int v : order) {
            perThread.get(v % threads).add(queues.get(v).get(next[v]++));
        }
        ExecutorService pool = Executors.newFixedThreadPool(threads);
        try {
            List<Future<Integer>> done = new ArrayList<>();
            for (List<Post> posts : perThread) {
                done.add(pool.submit(() -> {
                    int failures = 0;
                    for (Post p : posts) {
                        HttpResponse<String> r = server.postNdjson(p.vehicle(), p.body());
                        if (r.statusCode() != 200 || !r.body().contains("\"rejected_count\":0")) {
                            failures++;
                        }
                    }
                    return failures;
                }));
            }
            for (Future<Integer> f : done) {
                assertThat(f.get()).isZero();
            }
        } finally {
            pool.shutdown();
        }
        for (int v = 0; v < VEHICLES; v++) {
            assertThat(LiveServer.withoutLiveness(server.get("/v1/vehicles/mixed-" + v + "/pose").body()))
                    .as("vehicle %d", v)
                    .isEqualTo(LiveServer.withoutLiveness(server.get("/v1/vehicles/alone-" + v + "/pose").body()));
            assertThat(server.get("/v1/vehicles/mixed-" + v + "/track").body().replace("mixed-", "alone-"))
                    .as("track of vehicle %d", v)
                    .isEqualTo(server.get("/v1/vehicles/alone-" + v + "/track").body());
        }
    }

    @Test
    void chunksSwappedWithinTheReorderWindowGiveTheSameFinalPose() {
        List<List<Sample>> chunks = drives.get(0);
        for (List<Sample> chunk : chunks) {
            server.postNdjson("in-order", Drives.ndjson(chunk));
        }
        // The first chunk opens the session in both runs; after it, chunks 1 s long go in swapped
        // pairs (2 before 1, 4 before 3...): each late sample is less than 2 s behind the newest, inside
        // the default 2 s reorder window, so it is re-filtered in order rather than rejected.
        server.postNdjson("swapped", Drives.ndjson(chunks.get(0)));
        for (int k = 1; k < chunks.size(); k += 2) {
            if (k + 1 < chunks.size()) {
                assertThat(server.postNdjson("swapped", Drives.ndjson(chunks.get(k + 1))).body())
                        .contains("\"rejected_count\":0");
            }
            assertThat(server.postNdjson("swapped", Drives.ndjson(chunks.get(k))).body())
                    .contains("\"rejected_count\":0");
        }
        assertThat(LiveServer.withoutLiveness(server.get("/v1/vehicles/swapped/pose").body()))
                .isEqualTo(LiveServer.withoutLiveness(server.get("/v1/vehicles/in-order/pose").body()));
    }
}
