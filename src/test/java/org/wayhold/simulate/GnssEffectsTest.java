package org.wayhold.simulate;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import java.util.ArrayList;
import java.util.List;
import org.apache.commons.math3.distribution.ChiSquaredDistribution;
import org.apache.commons.math3.distribution.NormalDistribution;
import org.apache.commons.math3.special.Erf;
import org.junit.jupiter.api.Test;
import org.wayhold.geo.Enu;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.ReferencePoint;

/** Fix latency, the canyons' non-line-of-sight bias, 1 Hz fixes and an unconfigured lever arm. */
class GnssEffectsTest {

    /** Two-sided 99.9% for the chi-square checks: a correct simulator fails one seed in a thousand. */
    private static final double TAIL = 0.0005;

    private static final SimulationSettings PERFECT = SimulationSettings.defaults().perfectSensors();

    private static Enu enu(SimulatedDrive d, GnssFix f) {
        return d.frame().toEnu(f.latDeg(), f.lonDeg(), f.altM());
    }

    @Test
    void aLateFixIsTheTruthOfItsStampMinusTheLatencyFoundByMatchingPositions() {
        SimulationSettings s = PERFECT.withMinutes(5);
        s = s.withGnss(s.gnss().withLatency(GnssLatency.off().on()));
        SimulatedDrive d = DriveSimulator.simulate(s, 12L);
        List<GnssFix> fixes = d.samplesOf(GnssFix.class);
        assertThat(fixes).hasSize(1500);
        int moving = 0;
        for (GnssFix f : fixes) {
            Enu p = enu(d, f);
            // Search the truth 0-0.5 s before the stamp on the 10 ms grid for the position nearest the fix.
            double bestS = Double.NaN;
            double bestM = Double.POSITIVE_INFINITY;
            for (int back = 0; back <= 50; back++) {
                double t = f.t() - back / 100.0;
                if (t < d.startT()) {
                    break;
                }
                Truth tr = d.truthAt(t);
                double m = Math.hypot(tr.eastM() - p.eastM(), tr.northM() - p.northM());
                if (m < bestM) {
                    bestM = m;
                    bestS = back / 100.0;
                }
            }
            Truth atStamp = d.truthAt(f.t());
            if (Math.abs(atStamp.speedMps()) > 1.0) {
                // Moving, the match is unique: the fix is the truth 0.15 s (GnssLatency.off()) before its
                // stamp, to the geodesy's round trip, and a whole v * 0.15 s from the truth at the stamp.
                assertThat(bestS).isEqualTo(0.15);
                assertThat(bestM).isLessThan(1e-6);
                double missM = Math.hypot(atStamp.eastM() - p.eastM(), atStamp.northM() - p.northM());
                assertThat(missM).isCloseTo(0.15 * Math.abs(atStamp.speedMps()), within(0.05));
                moving++;
            }
        }
        assertThat(moving).isGreaterThan(1000);
        // Same fixes as without latency, each 0.15 s later; the last stamp still falls inside the drive.
        SimulatedDrive onTime = DriveSimulator.simulate(PERFECT.withMinutes(5), 12L);
        List<GnssFix> reference = onTime.samplesOf(GnssFix.class);
        for (int k = 0; k < fixes.size(); k++) {
            GnssFix late = fixes.get(k);
            GnssFix early = reference.get(k);
            assertThat(late.t()).isEqualTo(d.startT() + Math.rint((early.t() - d.startT()) * 100.0 + 15.0) / 100.0);
            assertThat(late.latDeg()).isEqualTo(early.latDeg());
            assertThat(late.lonDeg()).isEqualTo(early.lonDeg());
            assertThat(late.speedMps()).isEqualTo(early.speedMps());
        }
        // The log stays in time order.
        double previous = Double.NEGATIVE_INFINITY;
        for (var sample : d.samples()) {
            assertThat(sample.t()).isGreaterThanOrEqualTo(previous);
            previous = sample.t();
        }
    }

    @Test
    void withNoiseTheAlongTrackErrorOfLateFixesRegressesOnSpeedToMinusTheLatency() {
        // White noise only (0.6 m per axis), so the fixes are independent: the along-track error of a
        // fix stamped L late is -L v + noise, and the least-squares slope -sum(e v) / sum(v^2) estimates
        // L with standard deviation 0.6 m / sqrt(sum v^2).
        double latencyS = 0.2;
        double sumEv = 0.0;
        double sumVv = 0.0;
        for (long seed = 1; seed <= 3; seed++) {
            SimulationSettings s = SimulationSettings.defaults().withMinutes(10);
            s = s.withGnss(s.gnss().withMarkov(0.0, 40.0).withOutliers(0.0, 20.0, 40.0)
                    .withLatency(GnssLatency.off().withLatencyS(latencyS)));
            SimulatedDrive d = DriveSimulator.simulate(s, seed);
            for (GnssFix f : d.samplesOf(GnssFix.class)) {
                Truth tr = d.truthAt(f.t());
                Enu p = enu(d, f);
                double along = (p.eastM() - tr.eastM()) * Math.cos(tr.yawRad())
                        + (p.northM() - tr.northM()) * Math.sin(tr.yawRad());
                sumEv += along * tr.speedMps();
                sumVv += tr.speedMps() * tr.speedMps();
            }
        }
        double estimateS = -sumEv / sumVv;
        double sd = 0.6 / Math.sqrt(sumVv);
        // The truth's curvature over 0.2 s moves the along-track projection by under a millimetre.
        assertThat(estimateS).isCloseTo(latencyS, within(4.0 * sd + 1e-3));
        assertThat(4.0 * sd).isLessThan(0.01);
    }

    @Test
    void theCanyonBiasPointsAcrossTheStreetWithinItsRangeAndTheReceiverStaysOptimistic() {
        SimulationSettings s = PERFECT.withMinutes(6);
        s = Scenario.CANYON_BIAS.applyTo(s);
        SimulatedDrive d = DriveSimulator.simulate(s, 31L);
        assertThat(d.canyons()).hasSize(2).allSatisfy(w -> assertThat(w.durationS()).isCloseTo(60.0, within(1e-6)));
        int inside = 0;
        double previousSide = 0.0;
        double streetYaw = Double.NaN;
        double openHdopMax = 0.0;
        for (GnssFix f : d.samplesOf(GnssFix.class)) {
            boolean inCanyon = d.canyons().stream().anyMatch(w -> w.contains(f.t()));
            if (!inCanyon) {
                openHdopMax = Math.max(openHdopMax, f.hdop());
                streetYaw = Double.NaN;
                continue;
            }
            inside++;
            Truth tr = d.truthAt(f.t());
            Enu p = enu(d, f);
            double errE = p.eastM() - tr.eastM();
            double errN = p.northM() - tr.northM();
            double along = errE * Math.cos(tr.yawRad()) + errN * Math.sin(tr.yawRad());
            double left = -errE * Math.sin(tr.yawRad()) + errN * Math.cos(tr.yawRad());
            // With the open-sky noise off, the error is the bias alone: across the street (perpendicular to
            // the heading), 5-30 m (CanyonNlos.off()).
            assertThat(along).isCloseTo(0.0, within(1e-6));
            assertThat(Math.abs(left)).isBetween(5.0 - 1e-6, 30.0 + 1e-6);
            // The receiver reports sigma_h 2.5 m, HDOP twice the open-sky 0.8-1.2, and 5-8 satellites that
            // fall as the bias grows: sats = 8 - round(3 (m - 5) / 25).
            assertThat(f.sigmaHM()).isEqualTo(2.5);
            assertThat(f.hdop()).isBetween(1.6, 2.4);
            assertThat(f.sats()).isEqualTo(8 - (int) Math.round(3.0 * (Math.abs(left) - 5.0) / 25.0));
            // The side changes only with the street: at a heading more than 45 degrees from the street's.
            double side = Math.signum(left);
            if (Double.isNaN(streetYaw) || Math.abs(tr.yawRad() - streetYaw) > Math.toRadians(45.0)) {
                streetYaw = tr.yawRad();
            } else if (previousSide != 0.0 && side != previousSide) {
                throw new AssertionError("the bias changed side within one street at " + (f.t() - d.startT()) + " s");
            }
            previousSide = side;
        }
        // 2 x 60 s at 5 Hz; with drops off (perfect receiver) every fix is there.
        assertThat(inside).isEqualTo(600);
        assertThat(openHdopMax).isLessThanOrEqualTo(1.2);
        assertThat(d.faults()).filteredOn(f -> f.kind() == GnssFault.Kind.CANYON_NLOS).hasSize(600);
    }

    @Test
    void theCanyonBiasIsASlowGaussMarkovProcessMappedUniformlyOntoItsRange() {
        // Thirty drives with one 300 s canyon each, open-sky noise off. Recover the underlying unit
        // process x = Phi^-1((m - 5) / 25) from each bias size m (Commons Math's inverse normal) and check
        // its variance and its correlation 30 s apart against a unit Gauss-Markov process with the 30 s
        // time constant of CanyonNlos.off().
        NormalDistribution normal = new NormalDistribution(0.0, 1.0);
        List<double[]> series = new ArrayList<>();
        for (long seed = 1; seed <= 30; seed++) {
            SimulationSettings s = PERFECT.withMinutes(7).withCanyonsS(300.0);
            s = s.withGnss(s.gnss().withCanyonNlos(CanyonNlos.off().on()));
            SimulatedDrive d = DriveSimulator.simulate(s, seed);
            TimeWindow w = d.canyons().get(0);
            List<Double> x = new ArrayList<>();
            for (GnssFix f : d.samplesOf(GnssFix.class)) {
                if (w.contains(f.t())) {
                    Truth tr = d.truthAt(f.t());
                    Enu p = enu(d, f);
                    double m = Math.hypot(p.eastM() - tr.eastM(), p.northM() - tr.northM());
                    x.add(normal.inverseCumulativeProbability((m - 5.0) / 25.0));
                }
            }
            assertThat(x).hasSize(1500);
            series.add(x.stream().mapToDouble(Double::doubleValue).toArray());
        }
        double rho = Math.exp(-0.2 / 30.0);
        double sumSq = 0.0;
        double lagSum = 0.0;
        double lagSq = 0.0;
        int values = 0;
        int lag = 150;
        for (double[] x : series) {
            for (int k = 0; k < x.length; k++) {
                sumSq += x[k] * x[k];
                if (k + lag < x.length) {
                    lagSum += x[k] * x[k + lag];
                    lagSq += x[k] * x[k];
                }
            }
            values += x.length;
        }
        // Variance: a scaled chi-square with the effective degrees of freedom of a Gauss-Markov series
        // (SensorStatisticsTest.effectiveDof, Satterthwaite's moment match), about 150 per the 30 series.
        double nu = series.size() * SensorStatisticsTest.effectiveDof(1500, 0.0, 1.0, rho);
        ChiSquaredDistribution chi2 = new ChiSquaredDistribution(nu);
        assertThat(nu / values * sumSq).isBetween(chi2.inverseCumulativeProbability(TAIL),
                chi2.inverseCumulativeProbability(1.0 - TAIL));
        // Correlation 30 s apart: exp(-1) = 0.368 for tau = 30 s. About 300 independent stretches of 30 s
        // give it a standard deviation near 0.06; 0.2 still tells tau = 30 s from 10 s (0.05) or 100 s (0.74).
        assertThat(lagSum / lagSq).isCloseTo(Math.exp(-1.0), within(0.2));
    }

    @Test
    void theNormalDistributionFunctionBehindTheBiasAgreesWithCommonsMath() {
        for (double x = -6.0; x <= 6.0; x += 0.01) {
            // Numerical Recipes' erfc fit: fractional error below 1.2e-7; Commons Math's Erf is accurate to
            // about 1e-15.
            assertThat(CanyonNlos.erfc(x)).isCloseTo(Erf.erfc(x), within(1.2e-7 * Erf.erfc(x) + 1e-300));
            assertThat(CanyonNlos.normalCdf(x)).isCloseTo(0.5 * Erf.erfc(-x / Math.sqrt(2.0)), within(1.2e-7));
        }
    }

    @Test
    void oneHertzFixesArriveOnWholeSecondsWithTheSameErrorModel() {
        SimulationSettings s = Scenario.ONE_HERTZ.applyTo(SimulationSettings.defaults().withMinutes(60));
        s = s.withGnss(s.gnss().withOutliers(0.0, 20.0, 40.0));
        SimulatedDrive d = DriveSimulator.simulate(s, 61L);
        List<GnssFix> fixes = d.samplesOf(GnssFix.class);
        assertThat(fixes).hasSize(3600);
        double sumSq = 0.0;
        for (int k = 0; k < fixes.size(); k++) {
            GnssFix f = fixes.get(k);
            assertThat(f.t()).isEqualTo(d.startT() + k * 100 / 100.0);
            Enu p = enu(d, f);
            Enu a = d.antennaAt(f.t());
            sumSq += (p.eastM() - a.eastM()) * (p.eastM() - a.eastM()) + (p.northM() - a.northM()) * (p.northM() - a.northM());
        }
        // 0.6 m white plus 0.8 m Gauss-Markov (40 s) per axis, now stepped every second: the exact
        // discretisation keeps the variance at 0.64 m^2 and the lag-1 correlation at exp(-1 / 40).
        GnssSettings g = s.gnss();
        double white2 = g.whiteNoiseM() * g.whiteNoiseM();
        double gm2 = g.markovSigmaM() * g.markovSigmaM();
        double nu = 2.0 * SensorStatisticsTest.effectiveDof(fixes.size(), white2, gm2, Math.exp(-1.0 / 40.0));
        ChiSquaredDistribution chi2 = new ChiSquaredDistribution(nu);
        assertThat(nu / (2.0 * fixes.size()) * sumSq / (white2 + gm2)).isBetween(
                chi2.inverseCumulativeProbability(TAIL), chi2.inverseCumulativeProbability(1.0 - TAIL));
    }

    @Test
    void anUnconfiguredLeverArmPutsFixesBehindTheReferenceLinesPitchedOnGrades() {
        SimulationSettings s = PERFECT.withMinutes(5);
        s = s.withRoute(s.route().withHills(Hills.off().on())).withGnss(s.gnss().withLeverArm(-2.0, 0.5, 1.5));
        SimulatedDrive d = DriveSimulator.simulate(s, 14L);
        List<ReferencePoint> refs = d.samplesOf(ReferencePoint.class);
        int k = 0;
        for (GnssFix f : d.samplesOf(GnssFix.class)) {
            while (refs.get(k).t() < f.t()) {
                k++;
            }
            ReferencePoint r = refs.get(k);
            assertThat(r.t()).isEqualTo(f.t());
            Truth tr = d.truthAt(f.t());
            Enu ref = d.frame().toEnu(r.latDeg(), r.lonDeg(), r.altM());
            Enu fix = enu(d, f);
            // The reference line is the truth at the reference point.
            assertThat(ref.eastM()).isCloseTo(tr.eastM(), within(1e-6));
            assertThat(ref.upM()).isCloseTo(tr.upM(), within(1e-6));
            // The fix is the arm (-2 forward, 0.5 left, 1.5 up) pitched nose up by the grade gamma and
            // yawed: ahead -2 cos(gamma) - 1.5 sin(gamma), left 0.5, up -2 sin(gamma) + 1.5 cos(gamma).
            double gamma = tr.gradeRad();
            double dE = fix.eastM() - ref.eastM();
            double dN = fix.northM() - ref.northM();
            double ahead = dE * Math.cos(tr.yawRad()) + dN * Math.sin(tr.yawRad());
            double left = -dE * Math.sin(tr.yawRad()) + dN * Math.cos(tr.yawRad());
            assertThat(ahead).isCloseTo(-2.0 * Math.cos(gamma) - 1.5 * Math.sin(gamma), within(1e-6));
            assertThat(left).isCloseTo(0.5, within(1e-6));
            assertThat(fix.upM() - ref.upM()).isCloseTo(-2.0 * Math.sin(gamma) + 1.5 * Math.cos(gamma), within(1e-6));
        }
        // GnssSettings.withUnconfiguredLeverArm(): 2 m straight behind.
        GnssSettings unconfigured = GnssSettings.defaults().withUnconfiguredLeverArm();
        assertThat(unconfigured.leverArmForwardM()).isEqualTo(-2.0);
        assertThat(unconfigured.leverArmLeftM()).isZero();
        assertThat(Scenario.LEVER_ARM.applyTo(SimulationSettings.defaults()).gnss()).isEqualTo(unconfigured);
    }
}
