package org.wayhold.filter;

import org.wayhold.sample.GnssFix;
import org.wayhold.settings.FilterSettings;

/**
 * How much the filter believes a fix: its horizontal 1-sigma, and the split of that error into a
 * white part and a time-correlated part (a first-order Gauss-Markov process per axis, held in the
 * state; Groves, <i>Principles of GNSS, Inertial, and Multisensor Integrated Navigation Systems</i>,
 * 2nd ed., sec. 9.4 and 14.2.7).
 *
 * <p>A receiver's own {@code sigma_h} is believed only down to floors the fix's geometry sets: HDOP
 * times {@code filter.gnss_hdop_floor_m}, and more with few satellites, where one reflected signal
 * weighs more in the solution. Receivers in urban canyons report sigmas of a few metres while their
 * error is tens; the geometry they report is harder to hide.
 */
final class GnssNoise {

    /**
     * Multiplier on the sigma of a fix by the number of satellites it used, index = satellites (0 to 6;
     * seven and more take 1): four is the least that gives a 3D solution and leaves no redundancy to
     * catch a reflected signal; five or six leave little (common practice, not a published table).
     */
    private static final double[] SATELLITE_FACTOR = {2.0, 2.0, 2.0, 2.0, 2.0, 1.3, 1.3};

    private final FilterSettings settings;

    GnssNoise(FilterSettings settings) {
        this.settings = settings;
    }

    /**
     * The 1-sigma horizontal error per axis the filter assumes for a fix (m): {@code sigma_h} when
     * given, else HDOP times the configured range error, else the configured default; scaled by the
     * fix type; raised to the geometry floor (HDOP times {@code gnss_hdop_floor_m}) and for few
     * satellites; never below {@code gnss_floor_m}.
     */
    double horizontalSigmaM(GnssFix fix) {
        double sigma;
        if (fix.hasSigmaH()) {
            sigma = fix.sigmaHM();
        } else if (fix.hasHdop()) {
            sigma = fix.hdop() * settings.gnssRangeErrorM();
        } else {
            sigma = settings.gnssDefaultSigmaM();
        }
        sigma *= settings.fixScale(fix.fix());
        if (fix.hasHdop()) {
            sigma = Math.max(sigma, fix.hdop() * settings.gnssHdopFloorM());
        }
        if (fix.hasSats() && fix.sats() < SATELLITE_FACTOR.length) {
            sigma *= SATELLITE_FACTOR[Math.max(fix.sats(), 0)];
        }
        return Math.max(sigma, settings.gnssFloorM());
    }

    /** Variance of the correlated part of an error of variance {@code varM2} (m^2). */
    double correlatedVarM2(double varM2) {
        return settings.gnssCorrelatedShare() * varM2;
    }

    /** Variance of the white part of an error of variance {@code varM2} (m^2). */
    double whiteVarM2(double varM2) {
        return (1.0 - settings.gnssCorrelatedShare()) * varM2;
    }

    /** Variance of the correlated part before any fix, from the configured default sigma (m^2). */
    double defaultCorrelatedVarM2() {
        double sigma = settings.gnssDefaultSigmaM();
        return settings.gnssCorrelatedShare() * sigma * sigma;
    }

    /** Correlation time of the Gauss-Markov error (s). */
    double correlationTimeS() {
        return settings.gnssCorrelationTimeS();
    }
}
