package org.wayhold.filter;

import org.wayhold.sample.GnssFix;
import org.wayhold.settings.FilterSettings;

/**
 * How much the filter believes a fix: its horizontal 1-sigma, and the split of that error into a
 * white part and a time-correlated part (a first-order Gauss-Markov process per axis, held in the
 * state; Groves, <i>Principles of GNSS, Inertial, and Multisensor Integrated Navigation Systems</i>,
 * 2nd ed., sec. 9.4 and 14.2.7).
 */
final class GnssNoise {

    private final FilterSettings settings;

    GnssNoise(FilterSettings settings) {
        this.settings = settings;
    }

    /**
     * The 1-sigma horizontal error per axis the filter assumes for a fix (m): {@code sigma_h} when
     * given, else HDOP times the configured range error, else the configured default; scaled by the
     * fix type and never below the configured floor.
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
