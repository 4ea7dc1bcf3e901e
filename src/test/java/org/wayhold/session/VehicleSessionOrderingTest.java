package org.wayhold.session;

import static org.assertj.core.api.Assertions.assertThat;

import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Random;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.RejectionReason;
import org.wayhold.ordering.Admission;
import org.wayhold.pose.NavState;
import org.wayhold.pose.Pose;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.sample.YawRate;
import org.wayhold.settings.Settings;

/**
 * The session's promise on ordering: samples up to max_lag_s late give a result identical, bit for
 * bit, to in-order processing, whatever the batching; later ones are refused (README.md, "The HTTP
 * service"; DEVELOPERS.md, "Targets the tests hold").
 * The expected value is the session's own in-order run on the same seeded drive, so equality here is
 * exact ({@code Pose} is a record of doubles: {@code equals} compares bit patterns).
 */
class VehicleSessionOrderingTest {

    private static final double T0 = 1.8e9 + 0.95;

    private static List<Pose> fullTrack(VehicleSession s) {
        return s.track(Double.NEGATIVE_INFINITY, Double.POSITIVE_INFINITY);
    }

    private static VehicleSession inOrder(List<Sample> drive) {
        VehicleSession s = new VehicleSession("car-1", Settings.defaults(), null);
        // One sample per batch: the plainest in-order feed.
        for (Sample x : drive) {
            assertThat(s.submit(List.of(x)).get(0).kind()).isEqualTo(Admission.Kind.APPLIED);
        }
        return s;
    }

    /**
     * Batches per stream as separate HTTP posts would bring them: every 0.5 s one batch of yaw rates
     * and one of wheel speeds (in either order), and the fixes 1.5 s late, each batch shuffled.
     */
    private static List<List<Sample>> outOfOrderBatches(List<Sample> drive, long seed) {
        Random rnd = new Random(seed);
        List<List<Sample>> batches = new ArrayList<>();
        List<Sample> fixes = new ArrayList<>();
        int i = 0;
        while (i < drive.size()) {
            double end = drive.get(i).t() + 0.5;
            List<Sample> rates = new ArrayList<>();
            List<Sample> wheels = new ArrayList<>();
            while (i < drive.size() && drive.get(i).t() < end) {
                Sample s = drive.get(i++);
                if (s instanceof GnssFix) {
                    fixes.add(s);
                } else if (s instanceof YawRate) {
                    rates.add(s);
                } else {
                    wheels.add(s);
                }
            }
            Collections.shuffle(rates, rnd);
            Collections.shuffle(wheels, rnd);
            if (rnd.nextBoolean()) {
                batches.add(rates);
                batches.add(wheels);
            } else {
                batches.add(wheels);
                batches.add(rates);
            }
            List<Sample> due = new ArrayList<>();
            while (!fixes.isEmpty() && fixes.get(0).t() <= end - 1.5) {
                due.add(fixes.remove(0));
            }
            if (!due.isEmpty()) {
                Collections.shuffle(due, rnd);
                batches.add(due);
            }
        }
        batches.add(fixes);
        return batches;
    }

    @Test
    void outOfOrderBatchesWithinTheWindowGiveTheInOrderPoseAndHistoryBitForBit() {
        List<Sample> drive = SyntheticDrive.generate(T0, 90.0, 40.0, 52.0, 5L);
        VehicleSession reference = inOrder(drive);

        VehicleSession shuffled = new VehicleSession("car-1", Settings.defaults(), null);
        for (List<Sample> batch : outOfOrderBatches(drive, 77L)) {
            assertThat(shuffled.submit(batch)).allMatch(a -> a.kind() == Admission.Kind.APPLIED);
        }
        assertThat(shuffled.stats().rewinds()).as("the feed must actually exercise re-filtering").isPositive();
        assertThat(shuffled.latest()).isEqualTo(reference.latest());
        assertThat(fullTrack(shuffled)).isEqualTo(fullTrack(reference));
        assertThat(fullTrack(reference)).hasSizeGreaterThan(400);
        // The drive must have reached an aided state, or equality would prove little.
        assertThat(reference.latest().orElseThrow().state()).isEqualTo(NavState.AIDED);
    }

    @Test
    void theFirstSamplesArrivingLateAcrossAWholeSecondGiveTheInOrderResult() {
        // The drive starts at ...0.95 s; the first batch that arrives starts at ...1.05 s, so the session
        // sees a different first time (and whole second) than the in-order run would.
        List<Sample> drive = SyntheticDrive.generate(T0, 20.0, Double.NaN, 0.0, 6L);
        VehicleSession reference = inOrder(drive);
        List<Sample> early = drive.stream().filter(s -> s.t() < T0 + 0.1).toList();
        List<Sample> rest = drive.stream().filter(s -> s.t() >= T0 + 0.1).toList();
        VehicleSession late = new VehicleSession("car-1", Settings.defaults(), null);
        late.submit(rest.subList(0, 100));
        assertThat(late.submit(early)).allMatch(a -> a.kind() == Admission.Kind.APPLIED);
        late.submit(rest.subList(100, rest.size()));
        assertThat(late.latest()).isEqualTo(reference.latest());
        assertThat(fullTrack(late)).isEqualTo(fullTrack(reference));
    }

    @Test
    void lateBeyondTheWindowIsRejectedAndChangesNothing() {
        List<Sample> drive = SyntheticDrive.generate(T0, 20.0, Double.NaN, 0.0, 7L);
        VehicleSession s = inOrder(drive);
        Pose before = s.latest().orElseThrow();
        List<Pose> trackBefore = fullTrack(s);
        // Newest is T0 + 20 s; default max_lag_s is 2 s.
        List<Admission> a = s.submit(List.of(new YawRate(T0 + 17.5, 0.4)));
        assertThat(a.get(0).kind()).isEqualTo(Admission.Kind.REJECTED);
        assertThat(a.get(0).detail()).contains("late by 2.500 s");
        assertThat(a.get(0).reason()).isEqualTo(RejectionReason.LATE);
        assertThat(s.latest().orElseThrow()).isEqualTo(before);
        assertThat(fullTrack(s)).isEqualTo(trackBefore);
        assertThat(s.stats().orderingRejected()).isEqualTo(1);
    }

    @Test
    void exactDuplicatesAreIgnoredAndCounted() {
        List<Sample> drive = SyntheticDrive.generate(T0, 20.0, Double.NaN, 0.0, 8L);
        VehicleSession s = inOrder(drive);
        Pose before = s.latest().orElseThrow();
        List<Pose> trackBefore = fullTrack(s);
        List<Sample> lastSecond = drive.stream().filter(x -> x.t() > T0 + 19.0).toList();
        List<Admission> a = s.submit(lastSecond);
        assertThat(a).allMatch(x -> x.kind() == Admission.Kind.DUPLICATE);
        assertThat(s.stats().duplicates()).isEqualTo(lastSecond.size());
        assertThat(s.latest().orElseThrow()).isEqualTo(before);
        assertThat(fullTrack(s)).isEqualTo(trackBefore);
    }

    @Test
    void aForwardJumpIsRejected() {
        List<Sample> drive = SyntheticDrive.generate(T0, 5.0, Double.NaN, 0.0, 9L);
        VehicleSession s = inOrder(drive);
        // Default max_forward_jump_s is 3600 s.
        List<Admission> a = s.submit(List.of(new YawRate(T0 + 5.0 + 3700.0, 0.0)));
        assertThat(a.get(0).kind()).isEqualTo(Admission.Kind.REJECTED);
        assertThat(a.get(0).detail()).contains("ahead");
        assertThat(a.get(0).reason()).isEqualTo(RejectionReason.AHEAD);
        assertThat(s.latest().orElseThrow().t()).isEqualTo(T0 + 5.0);
    }

    @Test
    void aWrongTimeInTheFirstBatchNeitherSetsTheEpochNorBlocksTheDrive() {
        // The first post carries one sample stamped by a clock that was not yet set (counted from 1970):
        // it is refused, and the drive then runs exactly as if it had never been sent.
        List<Sample> drive = SyntheticDrive.generate(T0, 20.0, Double.NaN, 0.0, 11L);
        VehicleSession reference = inOrder(drive);
        VehicleSession s = new VehicleSession("car-1", Settings.defaults(), null);
        List<Sample> first = new ArrayList<>(drive.subList(0, 50));
        first.add(7, new YawRate(12.5, 0.02));
        List<Admission> a = s.submit(first);
        assertThat(a.get(7).kind()).isEqualTo(Admission.Kind.REJECTED);
        assertThat(a.get(7).detail()).contains("first samples");
        assertThat(a.get(7).reason()).isEqualTo(RejectionReason.OFF_TIMELINE);
        for (int i = 50; i < drive.size(); i += 40) {
            List<Admission> b = s.submit(drive.subList(i, Math.min(drive.size(), i + 40)));
            assertThat(b).allMatch(x -> x.kind() == Admission.Kind.APPLIED);
        }
        assertThat(fullTrack(s)).isEqualTo(fullTrack(reference));
        assertThat(s.latest()).isEqualTo(reference.latest());
    }

    @Test
    void twoSessionsFedTheSameBatchesGiveIdenticalPoses() {
        List<Sample> drive = SyntheticDrive.generate(T0, 60.0, 20.0, 35.0, 10L);
        VehicleSession a = new VehicleSession("car-1", Settings.defaults(), null);
        VehicleSession b = new VehicleSession("car-1", Settings.defaults(), null);
        for (List<Sample> batch : outOfOrderBatches(drive, 3L)) {
            a.submit(batch);
            b.submit(batch);
            assertThat(a.latest()).isEqualTo(b.latest());
        }
        assertThat(fullTrack(a)).isEqualTo(fullTrack(b));
        assertThat(a.stats()).isEqualTo(b.stats());
    }
}
