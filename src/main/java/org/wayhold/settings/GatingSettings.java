package org.wayhold.settings;

/**
 * Fix gating and reacquisition. YAML section {@code gating}.
 *
 * @param chiSquareProbability probability of the chi-square (2 degrees of freedom) gate on the normalised
 *                             innovation squared of a fix (unitless, 0..1, default 0.999)
 * @param reacquireFixes       after an outage or a gated fix, this many consecutive fixes must agree with
 *                             each other before a correction is applied (count, >= 1)
 * @param reacquireSpanS       ... and the agreeing fixes must span at least this long (s, >= 0): fixes
 *                             just out of a tunnel or garage are often offset alike by reflections for a
 *                             second or two, and only a span over which the vehicle moves on shows it
 */
public record GatingSettings(double chiSquareProbability, int reacquireFixes, double reacquireSpanS) {

    /** The default span of agreeing fixes (s). */
    public static final double DEFAULT_REACQUIRE_SPAN_S = 3.0;

    public GatingSettings {
        Check.openUnit("gating.chi_square_probability", chiSquareProbability);
        Check.atLeast("gating.reacquire_fixes", reacquireFixes, 1);
        Check.nonNegative("gating.reacquire_span_s", reacquireSpanS);
    }

    /** Gating with the default span of agreeing fixes. */
    public GatingSettings(double chiSquareProbability, int reacquireFixes) {
        this(chiSquareProbability, reacquireFixes, DEFAULT_REACQUIRE_SPAN_S);
    }

    public static GatingSettings defaults() {
        return new GatingSettings(0.999, 4, DEFAULT_REACQUIRE_SPAN_S);
    }
}
