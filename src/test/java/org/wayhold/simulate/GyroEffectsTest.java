package org.wayhold.simulate;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import java.util.List;
import org.apache.commons.math3.distribution.ChiSquaredDistribution;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;

/** The gyro's scale-factor error, its warm-up bias, and its bias drifting through long standstills. */
class GyroEffectsTest {

    /** Two-sided 99.9% for the chi-square checks: a correct simulator fails one seed in a thousand. */
    private static final double TAIL = 0.0005;

    /**
     * A 90 degree left turn at 10 m/s: yaw rate ramps over 2 s, holds 5 s, ramps back over 2 s, so the
     * turn is omega * 7 s and omega = (pi / 2) / 7 s.
     */
    private static Route ninetyDegreeTurn() {
        double omega = Math.PI / 2.0 / 7.0;
        return Route.start(0.3, 10.0, 0.0).hold(3.0).rampTo(10.0, omega, 2.0).hold(5.0)
                .rampTo(10.0, 0.0, 2.0).hold(3.0).build();
    }

    private static SimulationSettings perfectWithGyro(YawRateSettings gyro) {
        return SimulationSettings.defaults().perfectSensors().withYawRate(gyro);
    }

    /**
     * Trapezoid integral of all readings (rad) on their nominal 10 ms spacing (the epoch times near
     * 1.8e9 s carry 2.4e-7 s of rounding each, which would blur the sum): exact for a rate that is
     * linear between ticks and zero at both ends.
     */
    private static double integratedRad(List<YawRate> readings) {
        double sum = 0.0;
        for (int k = 1; k < readings.size(); k++) {
            sum += 0.5 * (readings.get(k - 1).yawRateRadPerS() + readings.get(k).yawRateRadPerS()) * 0.01;
        }
        return sum;
    }

    @Test
    void aOnePercentScaleErrorIntegratesANinetyDegreeTurnToNinetyPointNineDegrees() {
        YawRateSettings gyro = YawRateSettings.defaults().perfect().withScale(GyroScale.off().withError(0.01));
        SimulatedDrive d = DriveSimulator.simulate(perfectWithGyro(gyro), ninetyDegreeTurn(), 1L);
        double turnedRad = d.truthAt(d.endT()).yawRad() - d.truthAt(d.startT()).yawRad();
        assertThat(Math.toDegrees(turnedRad)).isCloseTo(90.0, within(1e-9));
        // Groves, Principles of GNSS, Inertial, and Multisensor Integrated Navigation Systems, 2nd ed.,
        // ch. 6: a 1% gyro scale error over a 90 deg turn gives 0.9 deg of heading. The readings are
        // linear between ticks, so the trapezoid sum is exact up to the rounding of 1500 additions.
        double readDeg = Math.toDegrees(integratedRad(d.samplesOf(YawRate.class)));
        assertThat(readDeg - 90.0).isCloseTo(0.9, within(1e-6));
    }

    @Test
    void theDefaultScaleErrorMultipliesEveryTrueRateByOnePointZeroOneFive() {
        YawRateSettings gyro = YawRateSettings.defaults().perfect().withScale(GyroScale.off().on());
        SimulatedDrive d = DriveSimulator.simulate(perfectWithGyro(gyro).withMinutes(5), 4L);
        assertThat(GyroScale.DEFAULT_ERROR).isEqualTo(0.015);
        int turning = 0;
        for (YawRate y : d.samplesOf(YawRate.class)) {
            double truth = d.truthAt(y.t()).yawRateRadPerS();
            // One rounding of the product: a relative 2.2e-16.
            assertThat(y.yawRateRadPerS()).isCloseTo(1.015 * truth, within(1e-15));
            turning += Math.abs(truth) > 0.05 ? 1 : 0;
        }
        assertThat(turning).isGreaterThan(1000);
    }

    @Test
    void aWarmingGyroReadsItsOffsetDecayingWithTheTimeConstantExactly() {
        YawRateSettings gyro = YawRateSettings.defaults().perfect().withWarmUp(GyroWarmUp.off().on());
        Route parked = Route.start(1.0, 0.0, 0.0).hold(1200.0).build();
        SimulatedDrive d = DriveSimulator.simulate(perfectWithGyro(gyro), parked, 2L);
        for (YawRate y : d.samplesOf(YawRate.class)) {
            double sinceStartS = Math.rint((y.t() - d.startT()) * 100.0) / 100.0;
            // Exact hand value: 0.3 deg/s * exp(-t / 300 s) on top of a zero bias.
            double expected = Math.toRadians(0.3) * Math.exp(-sinceStartS / 300.0);
            assertThat(y.yawRateRadPerS()).isCloseTo(expected, within(1e-17));
            assertThat(d.gyroBiasRadPerSAt(y.t())).isEqualTo(y.yawRateRadPerS());
        }
    }

    @Test
    void aNoisyWarmingGyroAveragesToTheSettlingCurveMinuteByMinute() {
        YawRateSettings gyro = YawRateSettings.defaults().perfect().withNoiseDegPerS(0.1)
                .withWarmUp(GyroWarmUp.off().on());
        Route parked = Route.start(1.0, 0.0, 0.0).hold(1200.0).build();
        SimulatedDrive d = DriveSimulator.simulate(perfectWithGyro(gyro), parked, 3L);
        List<YawRate> y = d.samplesOf(YawRate.class);
        double tau = 300.0;
        double offset = 0.3;
        double sigmaMean = 0.1 / Math.sqrt(6000.0);
        double chi2 = 0.0;
        for (int minute = 0; minute < 20; minute++) {
            double sum = 0.0;
            for (int j = minute * 6000; j < (minute + 1) * 6000; j++) {
                sum += Math.toDegrees(y.get(j).yawRateRadPerS());
            }
            double mean = sum / 6000.0;
            // The mean of offset * exp(-t / tau) over the 6000 readings at t = 60 m + j / 100 s: a geometric
            // series, offset * (1 - q^6000) / (1 - q) / 6000 * exp(-60 m / tau) with q = exp(-0.01 / tau).
            double q = Math.exp(-0.01 / tau);
            double expected = offset * Math.exp(-60.0 * minute / tau) * (1.0 - Math.pow(q, 6000)) / (1.0 - q) / 6000.0;
            chi2 += (mean - expected) * (mean - expected) / (sigmaMean * sigmaMean);
            if (minute == 0) {
                // By hand, the continuous mean over the first minute: 0.3 * (300 / 60) * (1 - exp(-0.2)) =
                // 0.27190 deg/s; 4.2 standard deviations of the mean of 6000 readings (0.0013 deg/s) apart.
                assertThat(mean).isCloseTo(0.27190, within(5.5e-3));
            }
            if (minute == 9) {
                // Minute ten: 0.3 * 5 * (exp(-1.8) - exp(-2)) = 0.044946 deg/s.
                assertThat(mean).isCloseTo(0.044946, within(5.5e-3));
            }
        }
        // Independent means of white noise around the curve: chi-square with 20 degrees of freedom.
        assertInChiSquareInterval(chi2, 20);
    }

    @Test
    void theBiasKeepsWalkingThroughLongStopsAtTheConfiguredRate() {
        // Long stops with the gyro's own bias walk and noise, no warm-up: during a stop the true rate
        // is exactly zero, so the readings are the bias plus noise.
        double q = 0.002;
        double sigma = 0.1;
        double windowS = 20.0;
        double chi2 = 0.0;
        int stops = 0;
        for (long seed = 1; seed <= 8; seed++) {
            SimulationSettings s = SimulationSettings.defaults().withMinutes(10).perfectSensors();
            s = s.withYawRate(s.yawRate().withBiasRandomWalkDegPerSPerSqrtS(q).withNoiseDegPerS(sigma))
                    .withRoute(s.route().withLongStops(LongStops.off().on()));
            SimulatedDrive d = DriveSimulator.simulate(s, seed);
            assertThat(d.longStops()).hasSize(2);
            List<YawRate> y = d.samplesOf(YawRate.class);
            List<WheelSpeed> wheel = d.samplesOf(WheelSpeed.class);
            for (TimeWindow w : d.longStops()) {
                assertThat(w.durationS()).isCloseTo(180.0, within(1e-6));
                assertThat(wheel).filteredOn(x -> w.contains(x.t())).allSatisfy(x -> assertThat(x.speedMps()).isZero());
                double first = meanDeg(y, w.startT(), w.startT() + windowS);
                double last = meanDeg(y, w.endT() - windowS, w.endT());
                // For a random walk W with coefficient q, the means over [0, w] and [T - w, T] differ by
                // (1/w) * integral over s in [0, w] of the increment over [s, s + T - w]; two such increments
                // overlap by T - w - |s - r|, so the variance is q^2 / w^2 * double integral of that =
                // q^2 (T - w - w / 3) = q^2 (T - 4 w / 3) (derived by hand). The white noise adds
                // sigma^2 / n to each mean of n = 100 w readings.
                double variance = q * q * (w.durationS() - 4.0 * windowS / 3.0) + 2.0 * sigma * sigma / (100.0 * windowS);
                chi2 += (last - first) * (last - first) / variance;
                stops++;
            }
        }
        assertInChiSquareInterval(chi2, stops);
    }

    private static double meanDeg(List<YawRate> y, double fromT, double toT) {
        double sum = 0.0;
        int n = 0;
        for (YawRate r : y) {
            if (r.t() >= fromT && r.t() < toT) {
                sum += Math.toDegrees(r.yawRateRadPerS());
                n++;
            }
        }
        assertThat(n).isEqualTo(2000);
        return sum / n;
    }

    private static void assertInChiSquareInterval(double statistic, double dof) {
        ChiSquaredDistribution chi2 = new ChiSquaredDistribution(dof);
        assertThat(statistic).as("chi-square statistic with %.1f degrees of freedom", dof)
                .isBetween(chi2.inverseCumulativeProbability(TAIL), chi2.inverseCumulativeProbability(1.0 - TAIL));
    }
}
