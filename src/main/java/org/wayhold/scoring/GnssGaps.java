package org.wayhold.scoring;

import java.util.ArrayList;
import java.util.List;
import org.wayhold.sample.FixType;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;

/**
 * The real GNSS gaps of a log: stretches with no fix (a fix whose {@code fix} is {@code none} does not
 * count) for longer than the configured gap. Found from the data alone, so every configuration sees
 * the same gaps.
 */
public final class GnssGaps {

    private GnssGaps() {
    }

    /**
     * @param samples the log, in time order
     * @param gapS    longest spacing of fixes that is not a gap (s), normally {@code outage.gap_s}
     * @return the gaps, each from the last fix before it to the first fix after it, in time order
     */
    public static List<TimeSpan> find(List<? extends Sample> samples, double gapS) {
        List<TimeSpan> gaps = new ArrayList<>();
        double last = Double.NaN;
        for (Sample s : samples) {
            if (s instanceof GnssFix f && f.fix() != FixType.NONE) {
                if (!Double.isNaN(last) && f.t() - last > gapS) {
                    gaps.add(new TimeSpan(last, f.t()));
                }
                last = f.t();
            }
        }
        return gaps;
    }

    /** Time of the first fix with a solution, NaN when there is none. */
    public static double firstFixT(List<? extends Sample> samples) {
        for (Sample s : samples) {
            if (s instanceof GnssFix f && f.fix() != FixType.NONE) {
                return f.t();
            }
        }
        return Double.NaN;
    }

    /** Time of the last fix with a solution, NaN when there is none. */
    public static double lastFixT(List<? extends Sample> samples) {
        for (int i = samples.size() - 1; i >= 0; i--) {
            if (samples.get(i) instanceof GnssFix f && f.fix() != FixType.NONE) {
                return f.t();
            }
        }
        return Double.NaN;
    }
}
