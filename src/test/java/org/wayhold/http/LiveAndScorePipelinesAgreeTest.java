package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.net.http.HttpResponse;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.wayhold.pipeline.FixRecord;
import org.wayhold.pipeline.OrderedLog;
import org.wayhold.pipeline.TrackOutput;
import org.wayhold.pose.Pose;
import org.wayhold.pose.PoseHistory;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.scoring.DriveSurvey;
import org.wayhold.scoring.ProgressListener;
import org.wayhold.settings.HistorySettings;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.SimulatedDrive;

/**
 * The live service and {@code score} run one per-vehicle pipeline, so the same log gives the same
 * poses through either, to the last bit. The log is made awkward on purpose: exact duplicates (in the
 * same batch and in a later one), fixes written before the inputs of their own instant, and a batch of
 * wheel speeds posted a batch late (inside the reorder window). The service gets it batch by batch over
 * HTTP; score's drive pass reads the same lines in the same order as a file. The expected values are
 * the service's own poses: the check is that two paths agree exactly (Jackson writes each double in
 * its shortest round-trip form, so equal JSON numbers are equal doubles).
 */
class LiveAndScorePipelinesAgreeTest {

    private static final double CHUNK_S = 1.0;
    private static final int HELD_POSES = 50_000;

    @Test
    void everyPoseOfTheServiceEqualsScoresDrivePassBitForBit() {
        SimulatedDrive drive = Drives.withTunnel(21L, 90.0, 20.0, 40.0);
        List<List<Sample>> batches = awkwardBatches(drive.samples());
        List<Sample> fileOrder = new ArrayList<>();
        batches.forEach(fileOrder::addAll);

        Settings d = LiveServer.settings(s -> s);
        Settings settings = new Settings(d.server(), d.filter(), d.gating(), d.outage(), d.ordering(),
                new HistorySettings(d.history().intervalS(), HELD_POSES), d.vehicles());
        List<JsonNode> live = new ArrayList<>();
        long duplicatesLive = 0;
        try (LiveServer server = new LiveServer(settings)) {
            for (List<Sample> b : batches) {
                HttpResponse<String> r = server.postNdjson("rig-7", Drives.ndjson(b));
                assertThat(r.statusCode()).as(r.body()).isEqualTo(200);
                JsonNode reply = LiveServer.json(r);
                assertThat(reply.get("rejected_count").asLong()).as(r.body()).isZero();
                duplicatesLive += reply.get("duplicates").asLong();
            }
            JsonNode track = LiveServer.json(server.get("/v1/vehicles/rig-7/track?from=0&to=1e12"));
            track.get("poses").forEach(live::add);
        }

        OrderedLog ordered = OrderedLog.order(fileOrder, settings.ordering());
        PoseHistory offline = new PoseHistory(HELD_POSES);
        DriveSurvey.run(ordered.samples(), settings, settings.profileFor("rig-7"), null, ordered.samples().get(0).t(),
                1.0, 30.0, new double[0], new TrackOutput() {
                    @Override
                    public void pose(Pose pose) {
                        offline.add(pose);
                    }

                    @Override
                    public void fix(FixRecord record) {
                    }

                    @Override
                    public void rewoundTo(double tS) {
                        offline.truncateAfter(tS);
                    }
                }, ProgressListener.NONE);
        List<JsonNode> scored = new ArrayList<>();
        for (Pose p : offline.between(Double.NEGATIVE_INFINITY, Double.POSITIVE_INFINITY)) {
            scored.add(tree(PoseJson.toBytes(p)));
        }

        assertThat(ordered.duplicates()).isEqualTo(duplicatesLive).isGreaterThan(0);
        assertThat(ordered.rejected()).isEmpty();
        assertThat(live).hasSizeGreaterThan(500).hasSize(scored.size());
        for (int i = 0; i < live.size(); i++) {
            assertThat(scored.get(i)).as("pose %d at t = %s", i, live.get(i).get("t")).isEqualTo(live.get(i));
        }
    }

    /**
     * The drive cut into one-second batches, then spoiled: each batch writes its fixes before the other
     * samples of the same instants, every tenth batch repeats its first three samples, every seventh
     * batch repeats the last sample of the batch before it, and the wheel speeds of every thirteenth
     * batch are held back and posted with the next batch.
     */
    private static List<List<Sample>> awkwardBatches(List<Sample> samples) {
        List<List<Sample>> chunks = Drives.chunks(samples, CHUNK_S);
        List<List<Sample>> out = new ArrayList<>();
        List<Sample> heldBack = new ArrayList<>();
        for (int i = 0; i < chunks.size(); i++) {
            List<Sample> batch = fixesFirst(chunks.get(i));
            List<Sample> spoiled = new ArrayList<>();
            spoiled.addAll(heldBack);
            heldBack.clear();
            if (i % 7 == 6) {
                List<Sample> before = chunks.get(i - 1);
                spoiled.add(before.get(before.size() - 1));
            }
            for (Sample s : batch) {
                if (i % 13 == 12 && s instanceof WheelSpeed) {
                    heldBack.add(s);
                } else {
                    spoiled.add(s);
                }
            }
            if (i % 10 == 9) {
                spoiled.addAll(batch.subList(0, 3));
            }
            out.add(spoiled);
        }
        if (!heldBack.isEmpty()) {
            out.add(heldBack);
        }
        return out;
    }

    /** The batch with each fix moved before the first sample of its own time. */
    private static List<Sample> fixesFirst(List<Sample> batch) {
        List<Sample> out = new ArrayList<>(batch);
        for (int i = 1; i < out.size(); i++) {
            if (out.get(i) instanceof GnssFix) {
                int j = i;
                while (j > 0 && out.get(j - 1).t() == out.get(i).t()) {
                    j--;
                }
                out.add(j, out.remove(i));
            }
        }
        return out;
    }

    private static JsonNode tree(byte[] json) {
        try {
            return LiveServer.JSON.readTree(json);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
