package org.wayhold.simulate;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Set;
import org.apache.commons.math3.distribution.ChiSquaredDistribution;
import org.apache.commons.math3.distribution.PoissonDistribution;
import org.junit.jupiter.api.Test;
import org.wayhold.geo.Enu;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;

/**
 * The sensor errors of seeded drives against the configured error models.
 *
 * <p>Every variance check compares a sum of squared errors with the two-sided 99.9% interval of a
 * chi-square distribution from Commons Math's {@link ChiSquaredDistribution}, so a correct simulator
 * fails one check in a thousand seeds at most and these fixed seeds pass for good. For time-correlated
 * errors the chi-square degrees of freedom are the effective sample count of the process (see
 * {@link #effectiveDof}).
 */
class SensorStatisticsTest {

    /** Two-sided 99.9%: 0.05% in each tail. */
    private static final double TAIL = 0.0005;

    @Test
    void loggedWheelSpeedIntegratesToTheTrueDistanceTimesOnePlusTheScaleError() {
        SimulationSettings s = SimulationSettings.defaults().withMinutes(10);
        SimulatedDrive d = DriveSimulator.simulate(s, 31L);
        List<WheelSpeed> wheel = d.samplesOf(WheelSpeed.class);
        double dtS = 0.02;
        double odometerM = signedTrapezoidM(d, wheel, dtS);
        double distanceM = d.truthAt(wheel.get(wheel.size() - 1).t()).distanceM();
        // Exact physics: the trapezoid sum of (1 + s) v over a grid on which v is piecewise linear (route
        // knots lie on 0.1 s) equals (1 + s) * distance. What remains is noise and rounding: each reading
        // adds independent white noise (sigma 0.05 m/s) and a rounding error uniform on +-0.005 m/s
        // (variance q^2 / 12), weighted by dt; by the central limit theorem the sum is normal with
        // standard deviation dt * sqrt(n * (sigma^2 + q^2 / 12)). Five of those: a 1-in-1.7-million miss.
        WheelSpeedSettings w = s.wheelSpeed();
        double sdM = dtS * Math.sqrt(wheel.size() * (w.noiseMps() * w.noiseMps() + w.quantumMps() * w.quantumMps() / 12));
        assertThat(odometerM).isCloseTo((1.0 + w.scaleError()) * distanceM, within(5.0 * sdM));
        // And the +1% is really there: about 90 m over 9 km, against a 5-sigma band of under 1 m.
        assertThat(Math.abs(odometerM - distanceM)).isGreaterThan(0.5 * w.scaleError() * distanceM);
        assertThat(distanceM).isGreaterThan(5000.0);
        for (WheelSpeed x : wheel) {
            // Readings are whole multiples of the 0.01 m/s quantum.
            assertThat(x.speedMps() * 100.0).isCloseTo(Math.rint(x.speedMps() * 100.0), within(1e-9));
        }
    }

    @Test
    void perfectWheelSpeedIntegratesToTheTrueDistanceExactly() {
        SimulatedDrive d = DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(10).perfectSensors(), 31L);
        List<WheelSpeed> wheel = d.samplesOf(WheelSpeed.class);
        double distanceM = d.truthAt(wheel.get(wheel.size() - 1).t()).distanceM();
        // The trapezoid rule is exact for piecewise-linear speed; only summation rounding remains.
        assertThat(signedTrapezoidM(d, wheel, 0.02)).isCloseTo(distanceM, within(1e-9 * distanceM));
    }

    @Test
    void whiteGnssNoiseHasTheConfiguredVarianceInEachAxisAndVertically() {
        SimulationSettings s = SimulationSettings.defaults().withMinutes(10);
        s = s.withGnss(s.gnss().withMarkov(0.0, 40.0).withOutliers(0.0, 20.0, 40.0));
        SimulatedDrive d = DriveSimulator.simulate(s, 41L);
        List<double[]> e = errors(d);
        int n = e.size();
        assertThat(n).isEqualTo(3000);
        double sigmaM = s.gnss().whiteNoiseM();
        double sigmaUpM = s.gnss().verticalNoiseM();
        double sumH = 0;
        double sumU = 0;
        double meanE = 0;
        for (double[] x : e) {
            sumH += (x[0] * x[0] + x[1] * x[1]) / (sigmaM * sigmaM);
            sumU += x[2] * x[2] / (sigmaUpM * sigmaUpM);
            meanE += x[0] / n;
        }
        // Independent normal errors: the normalised sum of squares is chi-square with one degree of freedom
        // per value (2n horizontally, n vertically).
        assertInChiSquareInterval(sumH, 2.0 * n);
        assertInChiSquareInterval(sumU, n);
        // Zero mean: the mean of n independent N(0, sigma^2) has standard deviation sigma / sqrt(n).
        assertThat(Math.abs(meanE)).isLessThan(4.0 * sigmaM / Math.sqrt(n));
        assertThat(d.samplesOf(GnssFix.class)).allSatisfy(f -> {
            assertThat(f.sigmaHM()).isEqualTo(0.6, within(1e-12));
            assertThat(f.sigmaVM()).isEqualTo(1.5);
        });
    }

    @Test
    void gaussMarkovErrorHasTheConfiguredVarianceAndLagOneCorrelation() {
        // Three independent hour-long drives, white noise off so the correlated error shows alone.
        double sumSq = 0;
        double sumLag = 0;
        double dof = 0;
        int values = 0;
        int seriesLength = 0;
        GnssSettings g = null;
        for (long seed = 51; seed <= 53; seed++) {
            SimulationSettings s = SimulationSettings.defaults().withMinutes(60);
            g = s.gnss().withWhiteNoiseM(0.0).withOutliers(0.0, 20.0, 40.0);
            SimulatedDrive d = DriveSimulator.simulate(s.withGnss(g), seed);
            List<double[]> e = errors(d);
            seriesLength = e.size();
            for (int axis = 0; axis < 2; axis++) {
                for (int k = 0; k < e.size(); k++) {
                    double x = e.get(k)[axis];
                    sumSq += x * x;
                    if (k + 1 < e.size()) {
                        sumLag += x * e.get(k + 1)[axis];
                    }
                }
                values += e.size();
            }
        }
        double sigma2 = g.markovSigmaM() * g.markovSigmaM();
        double rho = Math.exp(-0.2 / g.markovTimeS());
        // 6 series (3 drives x 2 axes) of 18000 fixes, each with about 90 effective samples.
        int series = 6;
        double nu = series * effectiveDof(seriesLength, 0.0, sigma2, rho);
        assertThat(nu).isBetween(500.0, 600.0);
        assertInChiSquareInterval(nu / values * sumSq / sigma2, nu);

        // Lag-1 autocorrelation of a first-order Gauss-Markov process sampled every dt: exp(-dt / tau) =
        // 0.99501 for dt 0.2 s and tau 40 s. The least-squares estimate sum x_k x_k+1 / sum x_k^2 of an AR(1)
        // coefficient has standard deviation sqrt((1 - rho^2) / N) and a bias of about -(1 + 3 rho) / n per
        // series of length n (Box, Jenkins and Reinsel, Time Series Analysis, ch. 7; Marriott and Pope,
        // Biometrika 41, 1954; both from memory). Four standard deviations plus the bias: 0.0015, which
        // still tells tau = 40 s from 30 s (0.99336).
        double rhoHat = sumLag / sumSq;
        double tolerance = 4.0 * Math.sqrt((1.0 - rho * rho) / values) + (1.0 + 3.0 * rho) / seriesLength;
        assertThat(rhoHat).isCloseTo(rho, within(tolerance));
        assertThat(Math.abs(Math.exp(-0.2 / 30.0) - rho)).isGreaterThan(tolerance);
    }

    @Test
    void totalOpenSkyGnssErrorMatchesTheReportedSigmaH() {
        SimulationSettings s = SimulationSettings.defaults().withMinutes(60);
        SimulatedDrive d = DriveSimulator.simulate(s, 61L);
        GnssSettings g = s.gnss();
        // sigma_h reported = sqrt(0.6^2 + 0.8^2) = 1.0 m exactly.
        assertThat(d.samplesOf(GnssFix.class)).allSatisfy(f -> assertThat(f.sigmaHM()).isEqualTo(1.0, within(1e-12)));
        List<double[]> e = errors(d);
        double sumSq = 0;
        for (double[] x : e) {
            sumSq += x[0] * x[0] + x[1] * x[1];
        }
        double white2 = g.whiteNoiseM() * g.whiteNoiseM();
        double gm2 = g.markovSigmaM() * g.markovSigmaM();
        double rho = Math.exp(-0.2 / g.markovTimeS());
        // Outliers are left out of the errors; the few gaps they leave (about 30 of 18000 fixes) change the
        // correlation structure negligibly.
        double nu = 2.0 * effectiveDof(e.size(), white2, gm2, rho);
        assertInChiSquareInterval(nu / (2.0 * e.size()) * sumSq / (white2 + gm2), nu);
        // Open-sky receiver figures stay plausible.
        Set<Double> faulty = faultTimes(d);
        assertThat(d.samplesOf(GnssFix.class)).filteredOn(f -> !faulty.contains(f.t())).allSatisfy(f -> {
            assertThat(f.hdop()).isBetween(0.8, 1.2);
            assertThat(f.sats()).isBetween(8, 12);
        });
    }

    @Test
    void outliersArriveAtTheConfiguredRateWithTheConfiguredSize() {
        SimulatedDrive d = DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(60), 71L);
        List<GnssFault> outliers = d.faults().stream().filter(f -> f.kind() == GnssFault.Kind.OUTLIER).toList();
        // 30 per hour by default (one every 2 minutes): the count is Poisson(30); its central 99.9% from
        // Commons Math.
        PoissonDistribution p = new PoissonDistribution(30.0);
        assertThat(outliers.size()).isBetween(p.inverseCumulativeProbability(TAIL),
                p.inverseCumulativeProbability(1.0 - TAIL));
        assertThat(outliers).allSatisfy(f -> assertThat(f.offsetM()).isBetween(20.0, 40.0));
    }

    @Test
    void gyroWhiteNoiseHasTheConfiguredVariance() {
        SimulationSettings s = SimulationSettings.defaults().withMinutes(10).perfectSensors();
        s = s.withYawRate(s.yawRate().withNoiseDegPerS(0.1));
        SimulatedDrive d = DriveSimulator.simulate(s, 81L);
        double sigma = Math.toRadians(0.1);
        double sum = 0;
        List<YawRate> y = d.samplesOf(YawRate.class);
        for (YawRate r : y) {
            double e = r.yawRateRadPerS() - d.truthAt(r.t()).yawRateRadPerS();
            sum += e * e / (sigma * sigma);
        }
        assertInChiSquareInterval(sum, y.size());
    }

    @Test
    void gyroBiasWalksWithTheConfiguredRandomWalkCoefficient() {
        SimulationSettings s = SimulationSettings.defaults().withMinutes(10).perfectSensors();
        s = s.withYawRate(s.yawRate().withBiasDegPerS(0.2).withBiasRandomWalkDegPerSPerSqrtS(0.002));
        SimulatedDrive d = DriveSimulator.simulate(s, 91L);
        List<YawRate> y = d.samplesOf(YawRate.class);
        // A random walk with coefficient q (deg/s per sqrt(s)) has independent increments of variance
        // q^2 dt over dt = 0.01 s.
        double incrementSigma = Math.toRadians(0.002) * Math.sqrt(0.01);
        double sum = 0;
        double previous = Double.NaN;
        for (YawRate r : y) {
            double bias = r.yawRateRadPerS() - d.truthAt(r.t()).yawRateRadPerS();
            // The drive reports the bias each reading carried (one rounding of the addition apart).
            assertThat(d.gyroBiasRadPerSAt(r.t())).isCloseTo(bias, within(1e-15));
            if (!Double.isNaN(previous)) {
                double step = bias - previous;
                sum += step * step / (incrementSigma * incrementSigma);
            }
            previous = bias;
        }
        assertThat(d.gyroBiasRadPerSAt(d.startT())).isEqualTo(Math.toRadians(0.2));
        // Differences of doubles near 3.5e-3 rad/s carry rounding of about 4e-19, far below the 3.5e-6
        // step size, so the chi-square check sees the walk itself.
        assertInChiSquareInterval(sum, y.size() - 1);
    }

    /**
     * Degrees of freedom of the chi-square distribution that matches the first two moments of the sum
     * of squares of n consecutive values of a stationary Gaussian process with autocovariance
     * gamma(0) = white + gm, gamma(h) = gm * rho^|h| (white noise plus a Gauss-Markov process).
     *
     * <p>Mean of the sum: n gamma(0). Variance: 2 sum_i sum_j gamma(i - j)^2 (Isserlis' theorem for
     * Gaussian fourth moments; L. Isserlis, Biometrika 12, 1918). A scaled chi-square c * chi2(nu) has
     * mean c nu and variance 2 c^2 nu; matching both gives nu = 2 mean^2 / variance (F. E. Satterthwaite,
     * Biometrics Bulletin 2(6), 1946). For white noise alone nu = n; for a slow Gauss-Markov process
     * alone nu is about n (1 - rho^2) / (1 + rho^2), roughly duration / tau.
     */
    static double effectiveDof(int n, double white, double gm, double rho) {
        double gamma0 = white + gm;
        double mean = n * gamma0;
        double sumGamma2 = n * gamma0 * gamma0;
        double rhoH = 1.0;
        for (int h = 1; h < n; h++) {
            rhoH *= rho;
            double gammaH = gm * rhoH;
            sumGamma2 += 2.0 * (n - h) * gammaH * gammaH;
        }
        return 2.0 * mean * mean / (2.0 * sumGamma2);
    }

    private static void assertInChiSquareInterval(double statistic, double dof) {
        ChiSquaredDistribution chi2 = new ChiSquaredDistribution(dof);
        assertThat(statistic).as("chi-square statistic with %.1f degrees of freedom", dof)
                .isBetween(chi2.inverseCumulativeProbability(TAIL), chi2.inverseCumulativeProbability(1.0 - TAIL));
    }

    /**
     * Trapezoid sum of the wheel readings, each counted along the direction of travel (sign of the true
     * speed) so reversing adds to the path length as the truth's distance does.
     */
    private static double signedTrapezoidM(SimulatedDrive d, List<WheelSpeed> wheel, double dtS) {
        double sum = 0;
        double previous = Double.NaN;
        for (WheelSpeed w : wheel) {
            double along = Math.signum(d.truthAt(w.t()).speedMps()) * w.speedMps();
            if (!Double.isNaN(previous)) {
                sum += 0.5 * (previous + along) * dtS;
            }
            previous = along;
        }
        return sum;
    }

    /** East, north and up error of every unspoiled fix (m): measured antenna minus true antenna. */
    private static List<double[]> errors(SimulatedDrive d) {
        Set<Double> faulty = faultTimes(d);
        List<double[]> out = new ArrayList<>();
        for (GnssFix f : d.samplesOf(GnssFix.class)) {
            if (faulty.contains(f.t())) {
                continue;
            }
            Enu m = d.frame().toEnu(f.latDeg(), f.lonDeg(), f.altM());
            Enu a = d.antennaAt(f.t());
            out.add(new double[] {m.eastM() - a.eastM(), m.northM() - a.northM(), m.upM() - a.upM()});
        }
        return out;
    }

    private static Set<Double> faultTimes(SimulatedDrive d) {
        Set<Double> out = new HashSet<>();
        for (GnssFault f : d.faults()) {
            out.add(f.t());
        }
        return out;
    }
}
