package org.wayhold.scoring;

import java.util.Locale;

/**
 * A window the schedule planned but that was not scored, and why, so that a report can say what it
 * left out instead of silently showing fewer windows.
 *
 * @param startT  planned start (s, vehicle clock); NaN for {@link Reason#TOO_FEW_STARTS}, which stands
 *                for windows that never got a start
 * @param lengthS planned length (s, > 0)
 * @param reason  why it was not scored
 * @param count   windows this entry stands for (1, or more for {@link Reason#TOO_FEW_STARTS})
 */
public record UnscoredWindow(double startT, double lengthS, Reason reason, int count) {

    public UnscoredWindow {
        if (!(lengthS > 0.0) || Double.isInfinite(lengthS)) {
            throw new IllegalArgumentException("length: must be a positive number of s, was " + lengthS);
        }
        if (reason == null) {
            throw new IllegalArgumentException("reason: must be given");
        }
        if (count < 1) {
            throw new IllegalArgumentException("count: must be at least 1, was " + count);
        }
    }

    /** One planned window not scored. */
    public UnscoredWindow(double startT, double lengthS, Reason reason) {
        this(startT, lengthS, reason, 1);
    }

    /** Why a planned window was not scored; each has a stable code for JSON and CSV, and words for people. */
    public enum Reason {
        /** It would end after the log's last fix. */
        BEYOND_LOG_END("it would end after the log's last GNSS fix"),
        /** It would start before the log's first fix. */
        BEFORE_FIRST_FIX("it would start before the log's first GNSS fix"),
        /** It overlaps a real gap in the fixes, whose error could not be told from the simulated one's. */
        OVERLAPS_REAL_GAP("it overlaps a real gap in the log's fixes"),
        /**
         * It overlaps an odometry gap ({@link OdometryGaps}): dead reckoning over it would measure the
         * missing wheel-speed or yaw-rate readings, not the odometry.
         */
        OVERLAPS_ODOMETRY_GAP("it overlaps a stretch where the wheel-speed or yaw-rate readings stopped "
                + "(odometry_interrupted) or had not begun"),
        /** The filter had not been aided for the minimum time at its start (in every configuration). */
        NOT_AIDED_LONG_ENOUGH("the filter had not been aided for the minimum time (--min-aided) at its start"),
        /** The reference trajectory has a hole at its start or end. */
        REFERENCE_DOES_NOT_COVER("the reference trajectory does not cover its start and end"),
        /** No withheld fix lies inside it, so there is nothing to measure the error against. */
        NO_REFERENCE_INSIDE("no withheld GNSS fix lies inside it to measure the error against"),
        /** The log's samples end before the window does. */
        LOG_ENDS_INSIDE("the log's samples end before the window does"),
        /** A random schedule found fewer eligible starts than windows asked for. */
        TOO_FEW_STARTS("fewer eligible starts than random windows asked for");

        private final String words;

        Reason(String words) {
            this.words = words;
        }

        /** The stable code, for example {@code overlaps_real_gap}. */
        public String code() {
            return name().toLowerCase(Locale.ROOT);
        }

        /** The reason in words, for people. */
        public String words() {
            return words;
        }
    }
}
