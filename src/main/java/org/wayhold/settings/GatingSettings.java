package org.wayhold.settings;

/**
 * Fix gating and reacquisition. YAML section {@code gating}.
 *
 * @param chiSquareProbability probability of the chi-square (2 degrees of freedom) gate on the normalised
 *                             innovation squared of a fix (unitless, 0..1, default 0.999)
 * @param reacquireFixes       after an outage or a gated fix, this many consecutive fixes must agree with
 *                             each other before a correction is applied (count, >= 1)
 */
public record GatingSettings(double chiSquareProbability, int reacquireFixes) {

    public GatingSettings {
        Check.openUnit("gating.chi_square_probability", chiSquareProbability);
        Check.atLeast("gating.reacquire_fixes", reacquireFixes, 1);
    }

    public static GatingSettings defaults() {
        return new GatingSettings(0.999, 4);
    }
}
