package org.wayhold.filter;

import org.wayhold.filter.FilterState.Slot;

/**
 * The inputs between readings. Wheel speed and yaw rate drive the prediction; each step takes them at
 * its midpoint on the line through their last two readings, at most one reading interval (and
 * {@link #MAX_EXTRAPOLATION_S}) past the newest. A held value lags a changing input by half a reading
 * interval on average, which adds up while the vehicle accelerates or enters a turn; the line does
 * not, and its noise telescopes over consecutive steps (the weights 1.5 and -0.5 of two readings sum
 * to 1), so the integrated noise is that of holding.
 *
 * <p>A stream that stops for longer than {@link OdometryInterruption} allows is interrupted: its last
 * reading is held, and {@link ProcessNoise} lets the uncertainty grow with the reading's age.
 */
final class InputHold {

    /** Inputs are extended along their trend at most this far past the latest reading (s). */
    static final double MAX_EXTRAPOLATION_S = 0.1;
    /**
     * Wheel-distance marks are kept at most this often (s), so that the ring of
     * {@link FilterState#WHEEL_MARKS} spans two speed windows at any reading rate.
     */
    static final double MARK_SPACING_S = 0.04;
    private InputHold() {
    }

    /** Records a wheel-speed reading at the state's time (m/s, signed). */
    static void recordWheelSpeed(FilterState s, double speedMps) {
        // The first reading is its own predecessor at the same time: no trend and no interval yet.
        boolean first = !s.is(Slot.HAS_WHEEL_SPEED);
        s.set(Slot.PREVIOUS_WHEEL_SPEED_MPS, first ? speedMps : s.get(Slot.WHEEL_SPEED_MPS));
        s.set(Slot.PREVIOUS_WHEEL_SPEED_T_REL, first ? s.get(Slot.T_REL) : s.get(Slot.WHEEL_SPEED_T_REL));
        s.set(Slot.WHEEL_SPEED_MPS, speedMps);
        s.set(Slot.WHEEL_SPEED_T_REL, s.get(Slot.T_REL));
        s.set(Slot.HAS_WHEEL_SPEED, true);
        int next = s.whole(Slot.WHEEL_MARK_NEXT);
        int count = s.whole(Slot.WHEEL_MARK_COUNT);
        if (count > 0) {
            int newest = (next - 1 + FilterState.WHEEL_MARKS) % FilterState.WHEEL_MARKS;
            if (s.get(Slot.T_REL) - s.wheelMarkT[newest] < MARK_SPACING_S) {
                return;
            }
        }
        s.wheelMarkT[next] = s.get(Slot.T_REL);
        s.wheelMarkDistance[next] = s.get(Slot.WHEEL_DISTANCE_M);
        s.set(Slot.WHEEL_MARK_NEXT, (next + 1) % FilterState.WHEEL_MARKS);
        s.set(Slot.WHEEL_MARK_COUNT, Math.min(s.whole(Slot.WHEEL_MARK_COUNT) + 1, FilterState.WHEEL_MARKS));
    }

    /**
     * The wheel speed now (m/s), from the distance the readings integrate to rather than from one
     * reading: a sensor that counts teeth jumps by a tooth's length per sample interval (metres per
     * second at 50 Hz), while the distance is right to within a tooth. The mean over the last
     * {@code windowS} or a little more, m1, is the speed at that span's midpoint when the speed changes
     * linearly, and the mean over the span before it, m2, the speed at its midpoint; the line through the
     * two gives the speed now, so a vehicle that accelerates is not compared with where it was a tenth
     * of a second ago. NaN when the marks do not reach back two spans of at most {@code maxWindowS}.
     */
    static double wheelSpeedNowMps(FilterState s, double windowS, double maxWindowS) {
        double t = s.get(Slot.T_REL);
        int k1 = markAtLeast(s, t, windowS, 0);
        if (k1 < 0) {
            return Double.NaN;
        }
        double t1 = s.wheelMarkT[k1];
        if (t - t1 > maxWindowS) {
            return Double.NaN;
        }
        int k2 = markAtLeast(s, t1, windowS, ageRank(s, k1) + 1);
        if (k2 < 0) {
            return Double.NaN;
        }
        double t2 = s.wheelMarkT[k2];
        if (t1 - t2 > maxWindowS) {
            return Double.NaN;
        }
        double m1 = (s.get(Slot.WHEEL_DISTANCE_M) - s.wheelMarkDistance[k1]) / (t - t1);
        double m2 = (s.wheelMarkDistance[k1] - s.wheelMarkDistance[k2]) / (t1 - t2);
        double mid1 = 0.5 * (t + t1);
        double mid2 = 0.5 * (t1 + t2);
        return m1 + (m1 - m2) * (t - mid1) / (mid1 - mid2);
    }

    /** The newest mark at least {@code spanS} older than {@code fromT}, searched from the given age rank; -1 if none. */
    private static int markAtLeast(FilterState s, double fromT, double spanS, int fromRank) {
        int count = s.whole(Slot.WHEEL_MARK_COUNT);
        int next = s.whole(Slot.WHEEL_MARK_NEXT);
        for (int i = fromRank + 1; i <= count; i++) {
            int k = (next - i + FilterState.WHEEL_MARKS) % FilterState.WHEEL_MARKS;
            if (fromT - s.wheelMarkT[k] >= spanS) {
                return k;
            }
        }
        return -1;
    }

    /** How many marks are newer than mark k (0 for the newest). */
    private static int ageRank(FilterState s, int k) {
        int next = s.whole(Slot.WHEEL_MARK_NEXT);
        return (next - 1 - k + 2 * FilterState.WHEEL_MARKS) % FilterState.WHEEL_MARKS;
    }

    /** Records a yaw-rate reading at the state's time (rad/s, counter-clockwise positive). */
    static void recordYawRate(FilterState s, double rateRadPerS) {
        boolean first = !s.is(Slot.HAS_YAW_RATE);
        s.set(Slot.PREVIOUS_YAW_RATE_RAD_PER_S, first ? rateRadPerS : s.get(Slot.YAW_RATE_RAD_PER_S));
        s.set(Slot.PREVIOUS_YAW_RATE_T_REL, first ? s.get(Slot.T_REL) : s.get(Slot.YAW_RATE_T_REL));
        s.set(Slot.YAW_RATE_RAD_PER_S, rateRadPerS);
        s.set(Slot.YAW_RATE_T_REL, s.get(Slot.T_REL));
        s.set(Slot.HAS_YAW_RATE, true);
    }

    /** The wheel speed to use over a step whose midpoint is {@code tMidRel} (m/s). */
    static double wheelSpeedAt(FilterState s, double tMidRel) {
        double newest = s.get(Slot.WHEEL_SPEED_MPS);
        double wheel = extended(newest, s.get(Slot.WHEEL_SPEED_T_REL), s.get(Slot.PREVIOUS_WHEEL_SPEED_MPS),
                s.get(Slot.PREVIOUS_WHEEL_SPEED_T_REL), tMidRel);
        if (wheel * newest <= 0.0) {
            // Never extend through zero: a stop or a change of direction shows in the readings first.
            wheel = newest;
        }
        return wheel;
    }

    /** The yaw-rate reading to use over a step whose midpoint is {@code tMidRel} (rad/s). */
    static double yawRateAt(FilterState s, double tMidRel) {
        return extended(s.get(Slot.YAW_RATE_RAD_PER_S), s.get(Slot.YAW_RATE_T_REL),
                s.get(Slot.PREVIOUS_YAW_RATE_RAD_PER_S), s.get(Slot.PREVIOUS_YAW_RATE_T_REL), tMidRel);
    }

    /**
     * The interval between the last two wheel-speed readings (s); before there are two, the nominal
     * interval of the configured rate ({@code filter.wheel_speed_rate_hz}).
     */
    static double wheelIntervalS(FilterState s, double nominalS) {
        return interval(s.get(Slot.WHEEL_SPEED_T_REL), s.get(Slot.PREVIOUS_WHEEL_SPEED_T_REL), nominalS);
    }

    /**
     * The interval between the last two yaw-rate readings (s); before there are two, the nominal
     * interval of the configured rate ({@code filter.gyro_rate_hz}).
     */
    static double yawRateIntervalS(FilterState s, double nominalS) {
        return interval(s.get(Slot.YAW_RATE_T_REL), s.get(Slot.PREVIOUS_YAW_RATE_T_REL), nominalS);
    }

    /** How long the wheel-speed stream has been silent past its usual interval (s), 0 when it is not. */
    static double wheelGapS(FilterState s, double tRel, double nominalS) {
        return gap(tRel, s.get(Slot.WHEEL_SPEED_T_REL), wheelIntervalS(s, nominalS));
    }

    /** How long the yaw-rate stream has been silent past its usual interval (s), 0 when it is not. */
    static double yawRateGapS(FilterState s, double tRel, double nominalS) {
        return gap(tRel, s.get(Slot.YAW_RATE_T_REL), yawRateIntervalS(s, nominalS));
    }

    private static double interval(double newestT, double previousT, double nominalS) {
        return OdometryInterruption.usualIntervalS(newestT, previousT, nominalS);
    }

    private static double gap(double tRel, double newestT, double intervalS) {
        double age = tRel - newestT;
        return OdometryInterruption.interrupted(age, intervalS) ? age : 0.0;
    }

    /**
     * An input's value at {@code tMidRel}: the latest reading extended along the line through the last
     * two readings, at most one reading interval (and {@link #MAX_EXTRAPOLATION_S}) ahead.
     */
    private static double extended(double value, double valueT, double previous, double previousT, double tMidRel) {
        double interval = valueT - previousT;
        if (!(interval > 0.0)) {
            return value;
        }
        double ahead = Math.min(tMidRel - valueT, Math.min(interval, MAX_EXTRAPOLATION_S));
        if (ahead <= 0.0) {
            return value;
        }
        return value + (value - previous) / interval * ahead;
    }
}
