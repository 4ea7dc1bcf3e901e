package org.wayhold.pipeline;

import org.wayhold.pose.Pose;
import org.wayhold.sample.GnssFix;

/**
 * Where a {@link VehicleTrack} puts what it produces: poses at history points and the filter's
 * decision on each fix. A track that returns to an earlier state (a late sample re-filters) first says
 * so with {@link #rewoundTo}, then produces the re-filtered output again.
 */
public interface TrackOutput {

    /** A pose at a history point: at every fix and at least every {@code history.interval_s}. */
    void pose(Pose pose);

    /** A fix and the filter's decision on it. */
    void fix(FixRecord record);

    /** Everything produced after {@code tS} (s, vehicle clock) is void; -infinity voids everything. */
    void rewoundTo(double tS);

    /**
     * Whether this output still holds an exact copy of a fix it was given (a fix log remembers the
     * recent ones); lets the time ordering count a late copy of an applied fix as a duplicate. False
     * when it cannot tell.
     */
    default boolean holds(GnssFix fix) {
        return false;
    }

    /** Drops everything: for branches and passes that only need the filter's state. */
    TrackOutput NONE = new TrackOutput() {
        @Override
        public void pose(Pose pose) {
        }

        @Override
        public void fix(FixRecord record) {
        }

        @Override
        public void rewoundTo(double tS) {
        }
    };
}
