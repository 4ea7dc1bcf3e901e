package org.wayhold.pipeline;

import java.util.ArrayList;
import java.util.List;
import org.wayhold.ordering.Admission;
import org.wayhold.ordering.ReorderBuffer;
import org.wayhold.ordering.Replayable;
import org.wayhold.sample.Sample;
import org.wayhold.settings.OrderingSettings;

/**
 * A recorded log put in the order a live session would apply it: the log is handed to the same time
 * ordering ({@link ReorderBuffer}) that {@link VehiclePipeline} runs, in batches of
 * {@link #BATCH_SAMPLES} lines in file order, as a logging rig would post them. So duplicates, the
 * first-batch time rule, the reorder window and its rejections are exactly the service's, and a
 * {@link VehicleTrack} fed with {@link #samples()} gives the poses the service would give.
 *
 * @param samples    the applied samples, in processing order
 * @param duplicates samples dropped as exact copies of applied ones (count)
 * @param rejected   samples refused, with their position in the log (0-based) and the reason
 */
public record OrderedLog(List<Sample> samples, long duplicates, List<Refused> rejected) {

    /** Lines per batch handed to the ordering (count). */
    public static final int BATCH_SAMPLES = 1000;

    /**
     * A refused sample.
     *
     * @param index     its position in the log (0-based)
     * @param admission why it was refused
     */
    public record Refused(int index, Admission admission) {
    }

    public OrderedLog {
        samples = List.copyOf(samples);
        rejected = List.copyOf(rejected);
    }

    /**
     * Orders a log.
     *
     * @param fileOrder the log's samples as read
     * @param settings  the reorder window and time limits
     */
    public static OrderedLog order(List<? extends Sample> fileOrder, OrderingSettings settings) {
        List<Sample> applied = new ArrayList<>(fileOrder.size());
        // A checkpoint of a recorder is the length of what it has recorded: a rewind cuts back to it.
        ReorderBuffer<Integer> ordering = new ReorderBuffer<>(new Replayable<>() {
            @Override
            public void apply(Sample sample) {
                applied.add(sample);
            }

            @Override
            public Integer checkpoint() {
                return applied.size();
            }

            @Override
            public void restore(Integer length) {
                applied.subList(length, applied.size()).clear();
            }
        }, settings);
        List<Refused> refused = new ArrayList<>();
        for (int from = 0; from < fileOrder.size(); from += BATCH_SAMPLES) {
            List<? extends Sample> batch = fileOrder.subList(from, Math.min(fileOrder.size(), from + BATCH_SAMPLES));
            List<Admission> admissions = ordering.submit(batch);
            for (int i = 0; i < admissions.size(); i++) {
                if (admissions.get(i).kind() == Admission.Kind.REJECTED) {
                    refused.add(new Refused(from + i, admissions.get(i)));
                }
            }
        }
        return new OrderedLog(applied, ordering.duplicates(), refused);
    }
}
