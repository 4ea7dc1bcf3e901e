package org.wayhold.simulate;

import java.util.SplittableRandom;

/**
 * Standard normal draws from a seeded {@link SplittableRandom} by Marsaglia's polar method
 * (G. Marsaglia and T. A. Bray, "A convenient method for generating normal variables", SIAM Review
 * 6(3), 1964). Written out here rather than taken from {@code RandomGenerator.nextGaussian()} so the
 * sequence for a seed cannot change with the JDK's choice of algorithm.
 */
final class Gaussian {
    private final SplittableRandom rng;
    private double spare;
    private boolean hasSpare;

    Gaussian(SplittableRandom rng) {
        this.rng = rng;
    }

    /** The next draw from N(0, 1). */
    double next() {
        if (hasSpare) {
            hasSpare = false;
            return spare;
        }
        double u;
        double v;
        double s;
        do {
            u = 2.0 * rng.nextDouble() - 1.0;
            v = 2.0 * rng.nextDouble() - 1.0;
            s = u * u + v * v;
        } while (s >= 1.0 || s == 0.0);
        double m = StrictMath.sqrt(-2.0 * StrictMath.log(s) / s);
        spare = v * m;
        hasSpare = true;
        return u * m;
    }

    /** A uniform draw from {@code [lo, hi)}. */
    double uniform(double lo, double hi) {
        return lo + (hi - lo) * rng.nextDouble();
    }

    /** A uniform integer from {@code [lo, hi]}. */
    int uniformInt(int lo, int hi) {
        return rng.nextInt(lo, hi + 1);
    }
}
