package org.wayhold.ordering;

import java.io.DataInput;
import java.io.DataOutput;
import java.io.IOException;
import java.util.ArrayDeque;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collections;
import java.util.Deque;
import java.util.Iterator;
import java.util.List;
import java.util.Locale;
import org.wayhold.sample.RejectionReason;
import org.wayhold.sample.Sample;
import org.wayhold.sample.SampleCodec;
import org.wayhold.settings.OrderingSettings;

/**
 * Applies a vehicle's samples to a {@link Replayable} in time order although they may arrive out of
 * order.
 *
 * <p>It keeps the samples of the last {@code max_lag_s} and checkpoints of the consumer every
 * {@link #CHECKPOINT_INTERVAL_S}. A batch whose earliest sample is older than the newest applied one
 * returns the consumer to the newest checkpoint before that sample and re-applies the kept samples
 * merged with the new ones, so the outcome is identical to in-order processing. A batch costs at most
 * one such rewind. The very first batch has no timeline to be judged against, so its samples are
 * judged against their own median time ({@link #firstBatchKept}). Not thread-safe: one writer per
 * vehicle.
 *
 * @param <C> the consumer's checkpoint type
 */
public final class ReorderBuffer<C> {

    /** Spacing of checkpoints on the vehicle's clock (s): a rewind re-applies at most this much more. */
    public static final double CHECKPOINT_INTERVAL_S = 0.25;

    private final Replayable<C> consumer;
    private final double maxLagS;
    private final double maxForwardJumpS;

    /** Applied samples since the oldest checkpoint, in order. */
    private final ArrayList<Sample> kept = new ArrayList<>();
    /** Checkpoints, oldest first; each knows how many kept samples preceded it. */
    private final Deque<Mark<C>> marks = new ArrayDeque<>();
    private final int markLimit;
    private Sample newest;
    private long duplicates;
    private long rejected;
    private long rewinds;

    private record Mark<C>(C state, int keptBefore, double lastT) {
    }

    public ReorderBuffer(Replayable<C> consumer, OrderingSettings settings) {
        this.consumer = consumer;
        this.maxLagS = settings.maxLagS();
        this.maxForwardJumpS = settings.maxForwardJumpS();
        // Twice the checkpoints the window needs, so trimming inside a long batch is amortised.
        this.markLimit = 2 * (int) Math.ceil(maxLagS / CHECKPOINT_INTERVAL_S) + 8;
    }

    /**
     * Admits a batch of samples of one vehicle.
     *
     * @return one admission per sample, in the order given
     */
    public List<Admission> submit(List<? extends Sample> batch) {
        if (batch.isEmpty()) {
            return List.of();
        }
        if (newest == null && batch.size() >= FIRST_BATCH_QUORUM) {
            double median = medianTime(batch);
            boolean[] keep = firstBatchKept(batch, median, maxForwardJumpS);
            for (boolean k : keep) {
                if (!k) {
                    return submitFirstWithout(batch, keep, median);
                }
            }
        }
        return submitChecked(batch);
    }

    /**
     * Fewest samples in a session's first batch for their times to be checked against each other
     * (count): with two there is no majority to say which one is wrong.
     */
    public static final int FIRST_BATCH_QUORUM = 3;

    /**
     * Which samples of a session's first batch to keep. The first batch sets the session's timeline,
     * so a single sample with a wrong time (a clock not yet set, a wrong epoch) would make every later
     * correct sample late, or too far ahead, by a large amount. With at least
     * {@link #FIRST_BATCH_QUORUM} samples the median time stands for the batch (one wrong time cannot
     * move it past a correct one), and a sample more than {@code max_forward_jump_s} from it is refused,
     * as it would be by an established timeline. Smaller batches are kept whole.
     *
     * @param median          the batch's median time (s), {@link #medianTime}
     * @param maxForwardJumpS the largest allowed distance from the median (s)
     * @return per sample, in the order given, whether it stays
     */
    static boolean[] firstBatchKept(List<? extends Sample> batch, double median, double maxForwardJumpS) {
        int n = batch.size();
        boolean[] keep = new boolean[n];
        Arrays.fill(keep, true);
        if (n < FIRST_BATCH_QUORUM) {
            return keep;
        }
        for (int i = 0; i < n; i++) {
            keep[i] = Math.abs(batch.get(i).t() - median) <= maxForwardJumpS;
        }
        return keep;
    }

    static double medianTime(List<? extends Sample> batch) {
        double[] times = new double[batch.size()];
        for (int i = 0; i < times.length; i++) {
            times[i] = batch.get(i).t();
        }
        Arrays.sort(times);
        return times[times.length / 2];
    }

    /** A first batch with samples far from the others' times: those are refused, the rest submitted. */
    private List<Admission> submitFirstWithout(List<? extends Sample> batch, boolean[] keep, double median) {
        List<Sample> kept = new ArrayList<>(batch.size());
        for (int i = 0; i < batch.size(); i++) {
            if (keep[i]) {
                kept.add(batch.get(i));
            }
        }
        List<Admission> keptResult = submitChecked(kept);
        Admission[] result = new Admission[batch.size()];
        int k = 0;
        for (int i = 0; i < batch.size(); i++) {
            if (keep[i]) {
                result[i] = keptResult.get(k++);
            } else {
                rejected++;
                result[i] = Admission.rejected(RejectionReason.OFF_TIMELINE, String.format(Locale.ROOT,
                        "t: %.3f s from the median time of the vehicle's first samples (%.3f s), more than the"
                                + " allowed %.3f s", Math.abs(batch.get(i).t() - median), median, maxForwardJumpS));
            }
        }
        return List.of(result);
    }

    /** {@link #submit} once the first batch's times are known to agree. */
    private List<Admission> submitChecked(List<? extends Sample> batch) {
        if (appendedInOrder(batch)) {
            return Collections.nCopies(batch.size(), Admission.APPLIED);
        }
        Admission[] result = new Admission[batch.size()];
        int[] order = processingOrder(batch);

        List<Sample> fresh = new ArrayList<>(batch.size());
        double newestT = newest == null ? Double.NaN : newest.t();
        for (int idx : order) {
            Sample s = batch.get(idx);
            Admission a = admit(s, newestT, fresh);
            result[idx] = a;
            if (a.kind() == Admission.Kind.APPLIED) {
                fresh.add(s);
                if (Double.isNaN(newestT) || s.t() > newestT) {
                    newestT = s.t();
                }
            } else if (a.kind() == Admission.Kind.DUPLICATE) {
                duplicates++;
            } else {
                rejected++;
            }
        }
        if (!fresh.isEmpty()) {
            merge(fresh);
            trim();
        }
        return List.of(result);
    }

    /**
     * The common case, decided and applied without the general path's sorting and searching: each
     * sample ranks strictly after the one before it (the first after the newest applied sample) and none
     * lies more than {@code max_forward_jump_s} ahead of its predecessor. Such a batch can hold no late
     * sample and no duplicate (a duplicate ranks equal to an applied sample), and the general path would
     * apply every sample in the given order with no rewind: the outcome is the same. The whole batch is
     * checked before anything is applied, because one sample out of order changes how the general path
     * judges the others.
     *
     * @return whether the batch was of this kind and has been applied
     */
    private boolean appendedInOrder(List<? extends Sample> batch) {
        int n = batch.size();
        double[] times = new double[n];
        double prevT = newest == null ? Double.NaN : newest.t();
        int prevRank = newest == null ? -1 : newest.type().rank();
        for (int i = 0; i < n; i++) {
            Sample s = batch.get(i);
            double t = s.t();
            int rank = s.type().rank();
            if (!Double.isNaN(prevT)) {
                int byTime = Double.compare(t, prevT);
                if (byTime < 0 || (byTime == 0 && rank <= prevRank) || t - prevT > maxForwardJumpS) {
                    return false;
                }
            }
            times[i] = t;
            prevT = t;
            prevRank = rank;
        }
        for (int i = 0; i < n; i++) {
            applyAndKeep(batch.get(i), times[i]);
        }
        trim();
        return true;
    }

    /**
     * Indices of the batch in processing order: by time then type, arrival order among equals (a stable
     * sort). Batches are usually in order or nearly so (samples of one instant in another type order), so
     * a stable insertion sort runs first, in time linear in the batch plus its inversions; past a budget
     * of moves it gives way to the library's stable merge sort, which bounds the worst case.
     */
    private static int[] processingOrder(List<? extends Sample> batch) {
        int n = batch.size();
        int[] order = new int[n];
        long budget = 4L * n + 64;
        for (int i = 0; i < n; i++) {
            Sample s = batch.get(i);
            int j = i;
            while (j > 0 && SampleOrder.compare(batch.get(order[j - 1]), s) > 0) {
                order[j] = order[j - 1];
                j--;
                if (--budget < 0) {
                    return mergeSorted(batch);
                }
            }
            order[j] = i;
        }
        return order;
    }

    private static int[] mergeSorted(List<? extends Sample> batch) {
        int n = batch.size();
        Integer[] boxed = new Integer[n];
        for (int i = 0; i < n; i++) {
            boxed[i] = i;
        }
        // Arrays.sort on objects is a stable merge sort (TimSort).
        Arrays.sort(boxed, (a, b) -> SampleOrder.compare(batch.get(a), batch.get(b)));
        int[] order = new int[n];
        for (int i = 0; i < n; i++) {
            order[i] = boxed[i];
        }
        return order;
    }

    private Admission admit(Sample s, double newestT, List<Sample> fresh) {
        if (!Double.isNaN(newestT)) {
            double lateS = newestT - s.t();
            if (lateS > maxLagS) {
                // A retry of something applied long ago is harmless: say so where the consumer can tell.
                if (consumer.alreadyApplied(s)) {
                    return Admission.DUPLICATE;
                }
                return Admission.rejected(RejectionReason.LATE, String.format(Locale.ROOT,
                        "t: late by %.3f s, more than the reorder window of %.3f s", lateS, maxLagS));
            }
            if (-lateS > maxForwardJumpS) {
                return Admission.rejected(RejectionReason.AHEAD, String.format(Locale.ROOT,
                        "t: %.3f s ahead of the session's newest sample, more than the allowed %.3f s",
                        -lateS, maxForwardJumpS));
            }
        }
        if (containsEqual(kept, s) || containsEqual(fresh, s)) {
            return Admission.DUPLICATE;
        }
        return Admission.APPLIED;
    }

    /** True when an equal sample is in the sorted list (binary search on the order, then equals). */
    private static boolean containsEqual(List<Sample> sorted, Sample s) {
        // In-order arrivals rank after everything kept: no equal sample can be there.
        if (sorted.isEmpty() || SampleOrder.compare(s, sorted.get(sorted.size() - 1)) > 0) {
            return false;
        }
        int i = Collections.binarySearch(sorted, s, SampleOrder.BY_TIME_THEN_TYPE);
        if (i < 0) {
            return false;
        }
        for (int j = i; j >= 0 && SampleOrder.BY_TIME_THEN_TYPE.compare(sorted.get(j), s) == 0; j--) {
            if (sorted.get(j).equals(s)) {
                return true;
            }
        }
        for (int j = i + 1; j < sorted.size() && SampleOrder.BY_TIME_THEN_TYPE.compare(sorted.get(j), s) == 0; j++) {
            if (sorted.get(j).equals(s)) {
                return true;
            }
        }
        return false;
    }

    private void merge(List<Sample> fresh) {
        Sample first = fresh.get(0);
        if (newest == null || SampleOrder.BY_TIME_THEN_TYPE.compare(first, newest) >= 0) {
            for (Sample s : fresh) {
                applyAndKeep(s, s.t());
            }
            return;
        }
        // Return to the newest checkpoint whose last applied sample is not after the earliest new one.
        rewinds++;
        Mark<C> mark = null;
        Iterator<Mark<C>> it = marks.descendingIterator();
        while (it.hasNext()) {
            Mark<C> m = it.next();
            if (m.keptBefore == 0 || SampleOrder.BY_TIME_THEN_TYPE.compare(kept.get(m.keptBefore - 1), first) <= 0) {
                mark = m;
                break;
            }
        }
        if (mark == null) {
            throw new IllegalStateException("no checkpoint before t = " + first.t() + " s; trim kept too little");
        }
        while (marks.peekLast() != mark) {
            marks.removeLast();
        }
        consumer.restore(mark.state);
        List<Sample> replay = new ArrayList<>(kept.subList(mark.keptBefore, kept.size()));
        kept.subList(mark.keptBefore, kept.size()).clear();
        newest = mark.keptBefore == 0 ? null : kept.get(mark.keptBefore - 1);
        // Merge: at equal order keys the sample applied earlier goes first (arrival order).
        int a = 0;
        int b = 0;
        while (a < replay.size() || b < fresh.size()) {
            Sample next;
            if (b >= fresh.size()
                    || (a < replay.size() && SampleOrder.BY_TIME_THEN_TYPE.compare(replay.get(a), fresh.get(b)) <= 0)) {
                next = replay.get(a++);
            } else {
                next = fresh.get(b++);
            }
            applyAndKeep(next, next.t());
        }
    }

    /** @param t the sample's time (s), passed in because the caller has it at hand */
    private void applyAndKeep(Sample s, double t) {
        Mark<C> last = marks.peekLast();
        if (last == null || t - last.lastT >= CHECKPOINT_INTERVAL_S) {
            double lastT = newest == null ? Double.NEGATIVE_INFINITY : newest.t();
            if (last == null || last.keptBefore != kept.size()) {
                marks.addLast(new Mark<>(consumer.checkpoint(), kept.size(), lastT));
            }
        }
        consumer.apply(s);
        kept.add(s);
        newest = s;
        if (marks.size() > markLimit) {
            trim();
        }
    }

    /**
     * Drops checkpoints and samples no late sample can need: keeps the newest checkpoint whose last
     * sample lies strictly before (newest - max_lag) and everything after it. Strictly: a sample exactly
     * max_lag late is still admitted and may rank before a sample of the same time.
     */
    private void trim() {
        double horizon = newest.t() - maxLagS;
        while (marks.size() > 1) {
            Iterator<Mark<C>> it = marks.iterator();
            it.next();
            Mark<C> second = it.next();
            if (second.lastT < horizon) {
                marks.removeFirst();
            } else {
                break;
            }
        }
        Mark<C> oldest = marks.peekFirst();
        int drop = oldest.keptBefore;
        if (drop > 0) {
            kept.subList(0, drop).clear();
            Deque<Mark<C>> shifted = new ArrayDeque<>(marks.size());
            for (Mark<C> m : marks) {
                shifted.addLast(new Mark<>(m.state, m.keptBefore - drop, m.lastT));
            }
            marks.clear();
            marks.addAll(shifted);
        }
    }

    /** Writes a checkpoint of the consumer. */
    @FunctionalInterface
    public interface CheckpointWriter<C> {
        void write(DataOutput out, C checkpoint) throws IOException;
    }

    /** Reads a checkpoint of the consumer. */
    @FunctionalInterface
    public interface CheckpointReader<C> {
        C read(DataInput in) throws IOException;
    }

    /**
     * Writes the kept samples, the checkpoints and the counters, so that {@link #readState} on a buffer
     * around a restored consumer continues exactly as this one would.
     */
    public void writeState(DataOutput out, CheckpointWriter<C> checkpoints) throws IOException {
        out.writeInt(kept.size());
        for (Sample s : kept) {
            SampleCodec.write(out, s);
        }
        out.writeInt(marks.size());
        for (Mark<C> m : marks) {
            checkpoints.write(out, m.state);
            out.writeInt(m.keptBefore);
            out.writeDouble(m.lastT);
        }
        out.writeBoolean(newest != null);
        if (newest != null) {
            SampleCodec.write(out, newest);
        }
        out.writeLong(duplicates);
        out.writeLong(rejected);
        out.writeLong(rewinds);
    }

    /** Reads what {@link #writeState} wrote, replacing this buffer's state. */
    public void readState(DataInput in, CheckpointReader<C> checkpoints) throws IOException {
        kept.clear();
        marks.clear();
        int n = in.readInt();
        for (int i = 0; i < n; i++) {
            kept.add(SampleCodec.read(in));
        }
        int m = in.readInt();
        for (int i = 0; i < m; i++) {
            C state = checkpoints.read(in);
            int keptBefore = in.readInt();
            double lastT = in.readDouble();
            if (keptBefore < 0 || keptBefore > kept.size()) {
                throw new IOException("ordering state: checkpoint after " + keptBefore + " of " + kept.size()
                        + " samples");
            }
            marks.addLast(new Mark<>(state, keptBefore, lastT));
        }
        newest = in.readBoolean() ? SampleCodec.read(in) : null;
        duplicates = in.readLong();
        rejected = in.readLong();
        rewinds = in.readLong();
    }

    /** Time of the newest applied sample (s, vehicle clock), NaN before any. */
    public double newestT() {
        return newest == null ? Double.NaN : newest.t();
    }

    public long duplicates() {
        return duplicates;
    }

    public long rejected() {
        return rejected;
    }

    public long rewinds() {
        return rewinds;
    }
}
