package org.wayhold.calibration;

import java.util.ArrayList;
import java.util.List;
import org.wayhold.filter.FilterSnapshot;
import org.wayhold.filter.GnssOutcome;
import org.wayhold.pipeline.TrackOutput;
import org.wayhold.pipeline.VehicleTrack;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.settings.Settings;
import org.wayhold.settings.VehicleProfile;

/**
 * The log-likelihood of a configuration given recorded drives, by the prediction-error decomposition
 * (Schweppe, IEEE Trans. Information Theory 11(1), 1965; Harvey, <i>Forecasting, structural time series
 * models and the Kalman filter</i>, 1989, sec. 3.4): for Gaussian innovations nu_k with covariances S_k,
 * <pre>
 *   ln L = sum over k of -(m ln 2 pi + ln det S_k + nu_k' S_k^-1 nu_k) / 2
 * </pre>
 * Each evaluation replays every drive through a fresh {@link VehicleTrack}, the class the service and
 * {@code score} run, so the likelihood is that of the filter as it runs live, decisions included; the
 * terms are the position innovations of GNSS fixes (m = 2), read from the track after each fix.
 *
 * <p>The filter's decisions (gating, probation after gaps, widening) make the likelihood a non-smooth
 * function of the parameters: a fix gated under one setting and used under the next changes the sum by
 * a step. Two things keep that harmless. The set of fixes that count is chosen once
 * ({@link #choose}): the fixes the filter accepted under the starting configuration, after a warm-up
 * (the filter's start is diffuse, and Harvey's treatment drops those first terms); every evaluation sums
 * the same fixes, whether the filter then used them or not, so a setting cannot gain by gating
 * awkward fixes away. And the optimiser ({@link Calibration}) is derivative-free.
 *
 * <p>Other measurements (GNSS speed and course, zero-rate updates at rest) still correct the state in
 * every replay; the sum leaves their own terms out, which makes it the position part of the
 * decomposition, a partial likelihood in Cox's sense (Biometrika 62(2), 1975).
 */
public final class InnovationLikelihood {

    /** ln(2 pi). */
    private static final double LN_2PI = Math.log(2.0 * Math.PI);
    /** Fixes in the first this many seconds after the filter's first used fix do not count (s). */
    public static final double WARM_UP_S = 30.0;

    private final List<CalibrationDrive> drives;
    private final String vehicle;
    /** Per drive, per sample: whether the sample is a fix that counts. */
    private boolean[][] counted;
    private int countedFixes;

    /**
     * @param drives  the drives, in processing order
     * @param vehicle the name of the vehicle profile the settings carry
     */
    public InnovationLikelihood(List<CalibrationDrive> drives, String vehicle) {
        this.drives = List.copyOf(drives);
        this.vehicle = vehicle;
    }

    /**
     * One position innovation's term of the log-likelihood (nats).
     *
     * @param nis     normalised innovation squared nu' S^-1 nu (unitless)
     * @param logDetS ln det S (ln m^4)
     */
    public static double positionTerm(double nis, double logDetS) {
        return -0.5 * (2.0 * LN_2PI + logDetS + nis);
    }

    /** The drives. */
    public List<CalibrationDrive> drives() {
        return drives;
    }

    /** Fixes that count (count), 0 before {@link #choose}. */
    public int countedFixes() {
        return countedFixes;
    }

    /**
     * Chooses the fixes that count: those the filter accepts under these settings, from
     * {@link #WARM_UP_S} after its first used fix on.
     *
     * @return the number chosen
     */
    public int choose(Settings settings) {
        VehicleProfile profile = settings.profileFor(vehicle);
        counted = new boolean[drives.size()][];
        countedFixes = 0;
        for (int d = 0; d < drives.size(); d++) {
            List<Sample> samples = drives.get(d).samples();
            boolean[] c = new boolean[samples.size()];
            VehicleTrack track = new VehicleTrack(settings, profile, null, TrackOutput.NONE);
            double firstUsedT = Double.NaN;
            for (int i = 0; i < samples.size(); i++) {
                Sample s = samples.get(i);
                GnssOutcome.Kind kind = track.apply(s);
                if (kind == null) {
                    continue;
                }
                if (Double.isNaN(firstUsedT) && (kind == GnssOutcome.Kind.ACCEPTED
                        || kind == GnssOutcome.Kind.REACQUIRED)) {
                    firstUsedT = s.t();
                }
                if (kind == GnssOutcome.Kind.ACCEPTED && s.t() - firstUsedT >= WARM_UP_S) {
                    c[i] = true;
                    countedFixes++;
                }
            }
            counted[d] = c;
        }
        return countedFixes;
    }

    /**
     * What one replay gave.
     *
     * @param logLikelihood  sum of the terms of the fixes that count (nats); NaN when a fix that counts got
     *                       no innovation (the filter was not initialised at its time)
     * @param fixesUsed      fixes the filter used in this replay (count)
     * @param fixesGated     counted fixes the filter did not use in this replay (count)
     * @param meanNis        mean NIS of the counted fixes (unitless; 2 for a consistent filter)
     * @param finals         the filter's estimate at the end of each drive
     * @param finalCovariances the filter's state covariance at the end of each drive (row-major)
     * @param meanGyroBiasRadPerS mean of the filter's gyro-bias estimate at the fixes of the second half
     *                       of each drive (rad/s), NaN unless observed
     */
    public record Replay(double logLikelihood, int fixesUsed, int fixesGated, double meanNis,
                         List<FilterSnapshot> finals, List<double[]> finalCovariances,
                         double meanGyroBiasRadPerS) {
    }

    /** ln L of a configuration (nats). */
    public double logLikelihood(Settings settings) {
        return replay(settings, false).logLikelihood();
    }

    /**
     * Replays the drives under a configuration.
     *
     * @param observe also keep the final estimates and the mean gyro bias (allocates a snapshot per fix)
     */
    public Replay replay(Settings settings, boolean observe) {
        if (counted == null) {
            throw new IllegalStateException("choose the fixes that count first");
        }
        VehicleProfile profile = settings.profileFor(vehicle);
        double sum = 0.0;
        double nisSum = 0.0;
        int used = 0;
        int gated = 0;
        boolean missing = false;
        double biasSum = 0.0;
        int biasCount = 0;
        List<FilterSnapshot> finals = new ArrayList<>();
        List<double[]> covariances = new ArrayList<>();
        for (int d = 0; d < drives.size(); d++) {
            CalibrationDrive drive = drives.get(d);
            List<Sample> samples = drive.samples();
            boolean[] c = counted[d];
            double half = 0.5 * (drive.startT() + drive.endT());
            VehicleTrack track = new VehicleTrack(settings, profile, null, TrackOutput.NONE);
            for (int i = 0; i < samples.size(); i++) {
                Sample s = samples.get(i);
                GnssOutcome.Kind kind = track.apply(s);
                if (kind == null) {
                    continue;
                }
                boolean usedNow = kind == GnssOutcome.Kind.ACCEPTED || kind == GnssOutcome.Kind.REACQUIRED;
                if (usedNow) {
                    used++;
                }
                if (c[i]) {
                    double nis = track.lastFixNis();
                    double logDet = track.lastFixLogDetS();
                    if (Double.isNaN(nis) || Double.isNaN(logDet)) {
                        missing = true;
                    } else {
                        sum += positionTerm(nis, logDet);
                        nisSum += nis;
                    }
                    if (!usedNow) {
                        gated++;
                    }
                }
                if (observe && usedNow && s instanceof GnssFix && s.t() >= half) {
                    biasSum += track.snapshot().gyroBiasRadPerS();
                    biasCount++;
                }
            }
            if (observe) {
                finals.add(track.snapshot());
                covariances.add(track.stateCovariance());
            }
        }
        return new Replay(missing ? Double.NaN : sum, used, gated, countedFixes == 0 ? Double.NaN
                : nisSum / countedFixes, List.copyOf(finals), List.copyOf(covariances), biasCount == 0 ? Double.NaN : biasSum / biasCount);
    }
}
