package org.wayhold.ordering;

import java.util.Comparator;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.ReferencePoint;
import org.wayhold.sample.Sample;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;

/**
 * The processing order of samples: by time, and at equal times inputs before fixes, so a fix is
 * always applied to a state that has seen the inputs of its own instant. Among inputs the yaw rate
 * comes first, as loggers (and the simulator) usually write it: a batch boundary between the two then
 * costs no re-filtering.
 */
public final class SampleOrder {

    /** Time, then type rank. Stable sorts keep arrival order among equals. */
    public static final Comparator<Sample> BY_TIME_THEN_TYPE = SampleOrder::compare;

    private SampleOrder() {
    }

    /**
     * Time ({@link Double#compare}), then type rank: the order of {@link #BY_TIME_THEN_TYPE}, written
     * out because it runs for every sample of every batch.
     */
    public static int compare(Sample a, Sample b) {
        int byTime = Double.compare(a.t(), b.t());
        return byTime != 0 ? byTime : Integer.compare(rank(a), rank(b));
    }

    /** Rank of a sample's type among samples of the same time. */
    public static int rank(Sample s) {
        if (s instanceof YawRate) {
            return 0;
        }
        if (s instanceof WheelSpeed) {
            return 1;
        }
        if (s instanceof GnssFix) {
            return 2;
        }
        if (s instanceof ReferencePoint) {
            return 3;
        }
        throw new IllegalArgumentException("type: unknown sample type " + s.getClass().getSimpleName());
    }
}
