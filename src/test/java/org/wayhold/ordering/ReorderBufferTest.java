package org.wayhold.ordering;

import static org.assertj.core.api.Assertions.assertThat;

import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.RejectionReason;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;
import org.wayhold.settings.OrderingSettings;

/**
 * Time ordering against its definition: whatever the arrival order within the window, the consumer
 * ends up having applied exactly the in-order sequence (by time, then yaw rate, wheel speed, GNSS).
 * The consumer here is a plain list, so "identical to in-order processing" is a list comparison.
 */
class ReorderBufferTest {

    /** A consumer whose whole state is the list of samples it applied. */
    private static final class Recorder implements Replayable<List<Sample>> {
        final List<Sample> applied = new ArrayList<>();

        @Override
        public void apply(Sample sample) {
            applied.add(sample);
        }

        @Override
        public List<Sample> checkpoint() {
            return List.copyOf(applied);
        }

        @Override
        public void restore(List<Sample> checkpoint) {
            applied.clear();
            applied.addAll(checkpoint);
        }
    }

    private static List<Sample> streams(double t0, double seconds) {
        List<Sample> out = new ArrayList<>();
        for (int k = 0; k < seconds * 100; k++) {
            double t = t0 + k / 100.0;
            out.add(new YawRate(t, 0.001 * k));
            if (k % 2 == 0) {
                out.add(new WheelSpeed(t, 10.0 + 0.01 * k));
            }
            if (k % 20 == 0) {
                out.add(GnssFix.position(t, 48.0 + 1e-6 * k, 11.0, 1.0));
            }
        }
        return out;
    }

    /**
     * One batch, applied in the order of a stable sort (List.sort is stable by its contract): samples of
     * equal time and type keep their arrival order. The nearly ordered batch (yaw rate before wheel speed
     * at each instant) stays within the insertion sort's budget; the reversed one exceeds it and takes the
     * merge sort. Both must give the stable order.
     */
    @Test
    void aBatchIsAppliedInStableTimeThenTypeOrderWhetherNearlyOrderedOrReversed() {
        List<Sample> nearly = new ArrayList<>();
        for (int k = 0; k < 3000; k++) {
            double t = 100.0 + (k / 4) * 0.01;
            // Four samples per instant: two yaw rates that tie on the order key, then two wheel speeds.
            nearly.add(new YawRate(t, k));
            nearly.add(new WheelSpeed(t, k));
        }
        List<Sample> reversed = new ArrayList<>(nearly);
        Collections.reverse(reversed);
        for (List<Sample> batch : List.of(nearly, reversed)) {
            List<Sample> expected = new ArrayList<>(batch);
            expected.sort(SampleOrder.BY_TIME_THEN_TYPE);
            Recorder rec = new Recorder();
            new ReorderBuffer<>(rec, new OrderingSettings(2.0, 3600.0)).submit(batch);
            assertThat(rec.applied).isEqualTo(expected);
        }
    }

    @Test
    void shuffledBatchesWithinTheWindowEndExactlyInOrder() {
        List<Sample> all = streams(1.8e9, 30.0);
        List<Sample> expected = new ArrayList<>(all);
        expected.sort(SampleOrder.BY_TIME_THEN_TYPE);

        Recorder rec = new Recorder();
        ReorderBuffer<List<Sample>> buffer = new ReorderBuffer<>(rec, new OrderingSettings(2.0, 3600.0));
        // Batches of 0.5 s of samples, each shuffled, with every GNSS fix held back by 1.2 s (latency):
        // everything arrives at most 1.7 s late, inside the 2 s window.
        SplittableRandom rnd = new SplittableRandom(31L);
        List<Sample> delayedFixes = new ArrayList<>();
        int i = 0;
        while (i < all.size()) {
            double end = all.get(i).t() + 0.5;
            List<Sample> batch = new ArrayList<>();
            while (i < all.size() && all.get(i).t() < end) {
                Sample s = all.get(i++);
                if (s instanceof GnssFix) {
                    delayedFixes.add(s);
                } else {
                    batch.add(s);
                }
            }
            double newest = batch.isEmpty() ? Double.NaN : batch.get(batch.size() - 1).t();
            while (!delayedFixes.isEmpty() && delayedFixes.get(0).t() <= newest - 1.2) {
                batch.add(delayedFixes.remove(0));
            }
            Collections.shuffle(batch, new java.util.Random(rnd.nextLong()));
            List<Admission> admissions = buffer.submit(batch);
            assertThat(admissions).allMatch(a -> a.kind() == Admission.Kind.APPLIED);
        }
        buffer.submit(delayedFixes);
        assertThat(rec.applied).isEqualTo(expected);
        assertThat(buffer.rewinds()).isPositive();
        assertThat(buffer.rejected()).isZero();
    }

    @Test
    void lateBeyondTheWindowIsRejectedWithHowLate() {
        Recorder rec = new Recorder();
        ReorderBuffer<List<Sample>> buffer = new ReorderBuffer<>(rec, new OrderingSettings(2.0, 3600.0));
        buffer.submit(streams(1000.0, 10.0));
        List<Sample> before = List.copyOf(rec.applied);
        // Newest is 1009.99 s; a sample at 1007.5 s is 2.49 s late.
        List<Admission> a = buffer.submit(List.of(new YawRate(1007.5, 0.3)));
        assertThat(a.get(0).kind()).isEqualTo(Admission.Kind.REJECTED);
        assertThat(a.get(0).detail()).contains("late by 2.490 s");
        assertThat(a.get(0).reason()).isEqualTo(RejectionReason.LATE);
        assertThat(rec.applied).isEqualTo(before);
        assertThat(buffer.rejected()).isEqualTo(1);
    }

    @Test
    void exactDuplicatesAreIgnoredAndCountedButNearDuplicatesAreApplied() {
        Recorder rec = new Recorder();
        ReorderBuffer<List<Sample>> buffer = new ReorderBuffer<>(rec, new OrderingSettings(2.0, 3600.0));
        List<Sample> all = streams(1000.0, 5.0);
        buffer.submit(all);
        List<Sample> before = List.copyOf(rec.applied);
        // The last second again, and one sample twice inside the same batch.
        List<Sample> again = new ArrayList<>(all.subList(all.size() - 150, all.size()));
        List<Admission> a = buffer.submit(again);
        assertThat(a).allMatch(x -> x.kind() == Admission.Kind.DUPLICATE);
        assertThat(rec.applied).isEqualTo(before);
        assertThat(buffer.duplicates()).isEqualTo(150);

        YawRate fresh = new YawRate(1005.0, 0.5);
        List<Admission> b = buffer.submit(List.of(fresh, fresh, new YawRate(1005.0, 0.50001)));
        assertThat(b).extracting(Admission::kind).containsExactly(Admission.Kind.APPLIED, Admission.Kind.DUPLICATE,
                Admission.Kind.APPLIED);
        assertThat(buffer.duplicates()).isEqualTo(151);
    }

    @Test
    void aForwardJumpBeyondTheLimitIsRejected() {
        Recorder rec = new Recorder();
        ReorderBuffer<List<Sample>> buffer = new ReorderBuffer<>(rec, new OrderingSettings(2.0, 3600.0));
        buffer.submit(streams(1000.0, 1.0));
        // Newest is 1000.99 s; the limit is 3600 s ahead of it.
        List<Admission> a = buffer.submit(List.of(new WheelSpeed(1000.99 + 3600.5, 3.0)));
        assertThat(a.get(0).kind()).isEqualTo(Admission.Kind.REJECTED);
        assertThat(a.get(0).detail()).contains("3600.500 s ahead");
        assertThat(a.get(0).reason()).isEqualTo(RejectionReason.AHEAD);
        // The timeline did not move: an ordinary next sample is still applied.
        List<Admission> b = buffer.submit(List.of(new WheelSpeed(1001.5, 3.0)));
        assertThat(b.get(0).kind()).isEqualTo(Admission.Kind.APPLIED);
        assertThat(buffer.newestT()).isEqualTo(1001.5);
    }

    /**
     * Regression test for a trimming bug: trim() once kept the newest checkpoint whose last sample was
     * at (not strictly before) newest - max_lag and shifted its keptBefore to 0, and merge() takes a
     * checkpoint with keptBefore == 0 as "before every sample". A sample exactly max_lag late, of the
     * same time as that checkpoint's last sample but of a lower type rank, was then applied after it,
     * out of order. trim() now keeps a checkpoint strictly older than anything still admissible.
     */
    @Test
    void aSampleExactlyMaxLagLateTakesItsPlaceBeforeALaterRankedSampleOfTheSameTime() {
        // Times on a 0.25 s grid (exact in binary) so a checkpoint's last sample can sit exactly at
        // newest - max_lag. The yaw rate at 1010.0 s arrives when the newest sample is 1012.0 s: it is
        // exactly 2 s late, so it is admitted, and in time order it goes before the wheel speed of
        // 1010.0 s (inputs rank yaw rate, then wheel speed).
        Recorder rec = new Recorder();
        ReorderBuffer<List<Sample>> buffer = new ReorderBuffer<>(rec, new OrderingSettings(2.0, 3600.0));
        List<Sample> all = new ArrayList<>();
        for (int k = 0; k <= 48; k++) {
            all.add(new WheelSpeed(1000.0 + 0.25 * k, 0.01 * k));
        }
        buffer.submit(all);
        YawRate late = new YawRate(1010.0, 5.0);
        List<Admission> a = buffer.submit(List.of(late));
        assertThat(a.get(0).kind()).isEqualTo(Admission.Kind.APPLIED);
        List<Sample> expected = new ArrayList<>(all);
        expected.add(late);
        expected.sort(SampleOrder.BY_TIME_THEN_TYPE);
        assertThat(rec.applied).isEqualTo(expected);
    }

    @Test
    void aWrongTimeInTheFirstBatchIsRefusedAndDoesNotSetTheTimeline() {
        // A logger whose clock was not yet set, or counted from another epoch, among correct samples:
        // one far ahead and one far behind the others. The median of the batch is a correct time.
        Recorder rec = new Recorder();
        ReorderBuffer<List<Sample>> buffer = new ReorderBuffer<>(rec, new OrderingSettings(2.0, 3600.0));
        List<Sample> first = new ArrayList<>(streams(1.8e9, 1.0));
        first.add(1, new WheelSpeed(1.8e9 + 4.0e6, 3.0));
        first.add(new YawRate(315_964_800.0, 0.1));
        List<Admission> a = buffer.submit(first);
        assertThat(a.get(1).kind()).isEqualTo(Admission.Kind.REJECTED);
        assertThat(a.get(1).detail()).startsWith("t: ").contains("median time of the vehicle's first samples")
                .contains("3600.000 s");
        assertThat(a.get(1).reason()).isEqualTo(RejectionReason.OFF_TIMELINE);
        assertThat(a.get(a.size() - 1).kind()).isEqualTo(Admission.Kind.REJECTED);
        assertThat(a).filteredOn(x -> x.kind() == Admission.Kind.APPLIED).hasSize(first.size() - 2);
        assertThat(buffer.newestT()).isLessThan(1.8e9 + 1.0);
        assertThat(buffer.rejected()).isEqualTo(2);
        // The next correct second is applied: the timeline is the correct one.
        List<Admission> b = buffer.submit(streams(1.8e9 + 1.0, 1.0));
        assertThat(b).allMatch(x -> x.kind() == Admission.Kind.APPLIED);
        List<Sample> expected = new ArrayList<>(streams(1.8e9, 1.0));
        expected.addAll(streams(1.8e9 + 1.0, 1.0));
        expected.sort(SampleOrder.BY_TIME_THEN_TYPE);
        assertThat(rec.applied).isEqualTo(expected);
    }

    @Test
    void aFirstBatchOfTwoHasNoMajorityAndTheEarlierSampleSetsTheTimeline() {
        // Two samples cannot say which time is wrong: the median rule keeps both, and the ordinary rule
        // takes them in time order, so the later one is too far ahead of the earlier.
        List<Sample> two = List.of(new YawRate(1.0, 0.0), new YawRate(9.0e9, 0.0));
        assertThat(ReorderBuffer.firstBatchKept(two, ReorderBuffer.medianTime(two), 3600.0)).containsExactly(true, true);
        Recorder rec = new Recorder();
        ReorderBuffer<List<Sample>> buffer = new ReorderBuffer<>(rec, new OrderingSettings(2.0, 3600.0));
        List<Admission> a = buffer.submit(List.of(new WheelSpeed(1000.0 + 1.0e6, 1.0), new WheelSpeed(1000.0, 1.0)));
        assertThat(a).extracting(Admission::kind).containsExactly(Admission.Kind.REJECTED, Admission.Kind.APPLIED);
        assertThat(a.get(0).detail()).contains("ahead of the session's newest sample");
        assertThat(a.get(0).reason()).isEqualTo(RejectionReason.AHEAD);
        assertThat(buffer.newestT()).isEqualTo(1000.0);
    }

    /**
     * Random batch sequences against a plain model of the rules, written from the class contract rather
     * than from the code: in a first batch of at least three samples, a sample more than
     * max_forward_jump from the batch's median time is rejected; each batch is taken in stable (time,
     * type) order; a sample more than max_lag behind the newest applied one, or more than
     * max_forward_jump ahead of it, is rejected; one equal to a sample applied before is a duplicate;
     * anything else is applied and may advance the newest.
     * What the consumer ends up with is every applied sample in stable (time, type, arrival) order.
     * Half the batches are strictly in order (the buffer's fast path), the others carry shuffles,
     * repeats, late samples, ties and jumps (its general path), in random interleavings, so both paths
     * and the switches between them are held to the same model.
     */
    @Test
    void randomBatchesFollowTheModelOfTheRulesOnBothPaths() {
        SplittableRandom rnd = new SplittableRandom(77L);
        for (int trial = 0; trial < 200; trial++) {
            double maxLag = 0.5 + rnd.nextInt(4) * 0.5;
            double maxJump = 5.0 + rnd.nextInt(3) * 5.0;
            Recorder rec = new Recorder();
            ReorderBuffer<List<Sample>> buffer = new ReorderBuffer<>(rec, new OrderingSettings(maxLag, maxJump));
            List<Sample> modelApplied = new ArrayList<>();
            double modelNewest = Double.NaN;
            double clock = 1000.0;
            List<Sample> history = new ArrayList<>();
            for (int b = 0; b < 30; b++) {
                List<Sample> batch = new ArrayList<>();
                int n = 1 + rnd.nextInt(40);
                boolean inOrder = rnd.nextBoolean();
                for (int k = 0; k < n; k++) {
                    clock += rnd.nextInt(3) * 0.01;
                    Sample s = switch (rnd.nextInt(3)) {
                        case 0 -> new YawRate(clock, rnd.nextInt(5) * 0.01);
                        case 1 -> new WheelSpeed(clock, rnd.nextInt(5));
                        default -> GnssFix.position(clock, 48.0, 11.0, 1.0);
                    };
                    batch.add(s);
                }
                if (!inOrder) {
                    if (rnd.nextBoolean() && !history.isEmpty()) {
                        batch.add(history.get(rnd.nextInt(history.size())));
                    }
                    if (rnd.nextInt(4) == 0) {
                        batch.add(new YawRate(clock - rnd.nextInt(300) * 0.01, 0.02));
                    }
                    if (rnd.nextInt(6) == 0) {
                        batch.add(new WheelSpeed(clock + maxJump + 0.5 * rnd.nextInt(3), 1.0));
                    }
                    Collections.shuffle(batch, new java.util.Random(rnd.nextLong()));
                } else if (rnd.nextInt(5) == 0) {
                    clock += maxJump + 1.0;
                    batch.add(new WheelSpeed(clock, 2.0));
                }
                history.addAll(batch);

                List<Sample> sorted = new ArrayList<>(batch);
                sorted.sort(SampleOrder.BY_TIME_THEN_TYPE);
                double firstMedian = Double.NaN;
                if (Double.isNaN(modelNewest) && batch.size() >= 3) {
                    double[] times = batch.stream().mapToDouble(Sample::t).sorted().toArray();
                    firstMedian = times[times.length / 2];
                }
                java.util.Map<Sample, Admission.Kind> expected = new java.util.IdentityHashMap<>();
                for (Sample s : sorted) {
                    Admission.Kind kind;
                    if (!Double.isNaN(firstMedian) && Math.abs(s.t() - firstMedian) > maxJump) {
                        kind = Admission.Kind.REJECTED;
                    } else if (!Double.isNaN(modelNewest) && (modelNewest - s.t() > maxLag || s.t() - modelNewest > maxJump)) {
                        kind = Admission.Kind.REJECTED;
                    } else if (modelApplied.contains(s)) {
                        kind = Admission.Kind.DUPLICATE;
                    } else {
                        kind = Admission.Kind.APPLIED;
                        modelApplied.add(s);
                        modelNewest = Double.isNaN(modelNewest) ? s.t() : Math.max(modelNewest, s.t());
                    }
                    expected.put(s, kind);
                }
                List<Admission> got = buffer.submit(batch);
                for (int k = 0; k < batch.size(); k++) {
                    assertThat(got.get(k).kind()).as("trial %d batch %d sample %d %s", trial, b, k, batch.get(k))
                            .isEqualTo(expected.get(batch.get(k)));
                }
                List<Sample> inOrderApplied = new ArrayList<>(modelApplied);
                inOrderApplied.sort(SampleOrder.BY_TIME_THEN_TYPE);
                assertThat(rec.applied).as("trial %d batch %d", trial, b).isEqualTo(inOrderApplied);
            }
        }
    }
}
