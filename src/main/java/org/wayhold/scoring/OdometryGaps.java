package org.wayhold.scoring;

import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import org.wayhold.filter.OdometryInterruption;
import org.wayhold.sample.Sample;
import org.wayhold.sample.SampleType;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;
import org.wayhold.settings.FilterSettings;

/**
 * The odometry gaps of a log: where its wheel-speed or yaw-rate stream was silent for longer than the
 * filter allows ({@link OdometryInterruption}: more than {@link OdometryInterruption#GAP_FACTOR} of the
 * stream's usual intervals and more than {@link OdometryInterruption#GAP_MIN_S}, the usual interval
 * being the spacing of its last two readings). Found from the samples
 * with the filter's own rule, so a gap here is exactly a stretch whose poses say
 * {@code odometry_interrupted}.
 *
 * <p>Two stretches the filter calls {@code odometry_missing} count as well, under the same rule with the
 * configured rate's interval as the usual one: a stream that begins later than that after the log's
 * first sample (a gap from that sample to its first reading), and a stream that never appears (a gap over
 * the whole log). A stream that ends early leaves a gap from its last reading to the log's last sample.
 */
public final class OdometryGaps {

    private OdometryGaps() {
    }

    /**
     * @param samples  the log in processing order (time order), as {@code pipeline.OrderedLog} gives it
     * @param settings the filter's settings: the configured rates give the usual interval before a
     *                 stream's second reading
     * @return the gaps of both streams, by start time (wheel speed first at equal starts)
     */
    public static List<OdometryGap> find(List<? extends Sample> samples, FilterSettings settings) {
        if (samples.isEmpty()) {
            return List.of();
        }
        double firstT = samples.get(0).t();
        double lastT = samples.get(samples.size() - 1).t();
        Stream wheel = new Stream(SampleType.WHEEL_SPEED, OdometryInterruption.wheelSpeedNominalIntervalS(settings));
        Stream rate = new Stream(SampleType.YAW_RATE, OdometryInterruption.yawRateNominalIntervalS(settings));
        for (Sample s : samples) {
            if (s instanceof WheelSpeed) {
                wheel.reading(s.t(), firstT);
            } else if (s instanceof YawRate) {
                rate.reading(s.t(), firstT);
            }
        }
        wheel.end(firstT, lastT);
        rate.end(firstT, lastT);
        List<OdometryGap> gaps = new ArrayList<>(wheel.gaps);
        gaps.addAll(rate.gaps);
        gaps.sort(Comparator.comparingDouble(OdometryGap::startT).thenComparing(OdometryGap::stream));
        return List.copyOf(gaps);
    }

    /** True when any of the gaps overlaps {@code [fromT, toT]} by more than an end point. */
    public static boolean anyOverlaps(List<OdometryGap> gaps, double fromT, double toT) {
        for (OdometryGap g : gaps) {
            if (g.overlaps(fromT, toT)) {
                return true;
            }
        }
        return false;
    }

    /**
     * Seconds of {@code [fromT, toT]} in which at least one stream was in a gap: the length of the union
     * of the gaps' parts inside it, so that both streams silent at once count once.
     */
    public static double silentS(List<OdometryGap> gaps, double fromT, double toT) {
        List<double[]> parts = new ArrayList<>();
        for (OdometryGap g : gaps) {
            double a = Math.max(g.startT(), fromT);
            double b = Math.min(g.endT(), toT);
            if (b > a) {
                parts.add(new double[] {a, b});
            }
        }
        parts.sort(Comparator.comparingDouble(p -> p[0]));
        double total = 0.0;
        double coveredTo = Double.NEGATIVE_INFINITY;
        for (double[] p : parts) {
            double a = Math.max(p[0], coveredTo);
            if (p[1] > a) {
                total += p[1] - a;
                coveredTo = p[1];
            }
        }
        return total;
    }

    /** One stream's readings as the filter keeps them: the newest and the one before it. */
    private static final class Stream {
        final SampleType type;
        final double nominalS;
        final List<OdometryGap> gaps = new ArrayList<>();
        boolean seen;
        double newestT;
        double previousT;

        Stream(SampleType type, double nominalS) {
            this.type = type;
            this.nominalS = nominalS;
        }

        void reading(double t, double firstT) {
            if (seen) {
                double interval = OdometryInterruption.usualIntervalS(newestT, previousT, nominalS);
                if (OdometryInterruption.interrupted(t - newestT, interval)) {
                    gaps.add(new OdometryGap(type, newestT, t));
                }
                previousT = newestT;
            } else {
                if (OdometryInterruption.interrupted(t - firstT, nominalS)) {
                    gaps.add(new OdometryGap(type, firstT, t));
                }
                // The first reading is its own predecessor, as the filter records it: no interval yet.
                previousT = t;
                seen = true;
            }
            newestT = t;
        }

        void end(double firstT, double lastT) {
            if (!seen) {
                if (OdometryInterruption.interrupted(lastT - firstT, nominalS)) {
                    gaps.add(new OdometryGap(type, firstT, lastT));
                }
                return;
            }
            double interval = OdometryInterruption.usualIntervalS(newestT, previousT, nominalS);
            if (OdometryInterruption.interrupted(lastT - newestT, interval)) {
                gaps.add(new OdometryGap(type, newestT, lastT));
            }
        }
    }
}
