package org.wayhold.filter;

import static org.wayhold.filter.StateIndex.GYRO_BIAS;
import static org.wayhold.filter.StateIndex.SIZE;

import java.util.Arrays;
import org.wayhold.settings.FilterSettings;

/**
 * The zero angular rate update: while the vehicle stands still, a yaw-rate reading is the gyro bias
 * plus white noise, so H picks the bias state and R is the reading's noise variance.
 */
final class ZeroRate {

    private final double varRad2PerS2;

    ZeroRate(FilterSettings settings) {
        double sigma = settings.gyroNoiseRadPerS();
        // A zero-noise configuration still needs a positive R for S to be invertible.
        this.varRad2PerS2 = Math.max(sigma * sigma, 1e-12);
    }

    /**
     * Prepares a reading (rad/s) as a measurement of the bias and returns its normalised innovation
     * squared; {@link JosephUpdate#apply}(s, 1) then applies it.
     */
    double prepare(FilterState s, JosephUpdate u, double rateRadPerS) {
        Arrays.fill(u.h, 0, SIZE, 0.0);
        u.h[GYRO_BIAS] = 1.0;
        u.r[0] = varRad2PerS2;
        u.nu[0] = rateRadPerS - s.x[GYRO_BIAS];
        u.prepare(s.p, 1);
        return u.nis1();
    }
}
