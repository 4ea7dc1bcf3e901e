package org.wayhold.simulate;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import java.util.List;
import org.apache.commons.math3.analysis.solvers.BrentSolver;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;

/** Counted teeth and creeping queues, launch slip, and tyre growth on the motorway. */
class WheelEffectsTest {

    private static final SimulationSettings PERFECT = SimulationSettings.defaults().perfectSensors();

    @Test
    void countedTeethReadWholeStepsOfCircumferenceOverTeethTimesRate() {
        SimulationSettings s = Scenario.CREEP.applyTo(PERFECT.withMinutes(9));
        SimulatedDrive d = DriveSimulator.simulate(s, 5L);
        // Hand computation: 2.0 m / 48 teeth * 50 Hz = 2.08333 m/s per counted tooth.
        double step = 2.0 / 48.0 * 50.0;
        assertThat(s.wheelSpeed().teeth().stepMps(50.0)).isCloseTo(2.0833333333, within(1e-9));
        List<WheelSpeed> wheel = d.samplesOf(WheelSpeed.class);
        double countedM = 0.0;
        for (WheelSpeed w : wheel) {
            double teeth = w.speedMps() / step;
            assertThat(teeth).isCloseTo(Math.rint(teeth), within(1e-9));
            countedM += w.speedMps() / 50.0;
        }
        // The count keeps the fraction of a tooth for the next interval, so it follows the true signed
        // distance to within a tooth, except for the teeth that pass unseen below 0.3 m/s. Sum those
        // from the truth on the 10 ms grid (trapezoid rule, exact for the piecewise-linear speed).
        double signedM = 0.0;
        double blindM = 0.0;
        int blindStretches = 0;
        boolean wasBlind = false;
        Truth previous = d.truthAt(d.startT());
        // Up to the last reading: teeth counted after it are never reported.
        long lastTick = Math.round((wheel.get(wheel.size() - 1).t() - d.startT()) * 100.0);
        for (long tick = 1; tick <= lastTick; tick++) {
            Truth tr = d.truthAt(d.startT() + tick / 100.0);
            double stepM = 0.5 * (previous.speedMps() + tr.speedMps()) * 0.01;
            signedM += stepM;
            double middle = Math.abs(d.truthAt(d.startT() + (tick - 0.5) / 100.0).speedMps());
            boolean blind = middle < 0.3;
            if (blind) {
                blindM += stepM;
                if (!wasBlind && stepM != 0.0) {
                    blindStretches++;
                }
            }
            wasBlind = blind && stepM != 0.0;
            previous = tr;
        }
        double arcM = 2.0 / 48.0;
        assertThat(signedM).isGreaterThan(4000.0);
        assertThat(blindM).isGreaterThan(3.0);
        // Each stretch of unseen motion can lose or keep one partial tooth at either end.
        assertThat(countedM).isCloseTo(signedM - blindM, within((2 * blindStretches + 2) * arcM));
    }

    @Test
    void creepingInAQueueReadsZeroOnTheWheelsWhileTheGyroShowsTheTurn() {
        SimulationSettings s = Scenario.CREEP.applyTo(PERFECT.withMinutes(9));
        SimulatedDrive d = DriveSimulator.simulate(s, 6L);
        assertThat(d.queues()).hasSize(3);
        List<WheelSpeed> wheel = d.samplesOf(WheelSpeed.class);
        List<YawRate> gyro = d.samplesOf(YawRate.class);
        for (TimeWindow q : d.queues()) {
            double maxSpeed = 0.0;
            for (WheelSpeed w : wheel) {
                if (q.contains(w.t())) {
                    maxSpeed = Math.max(maxSpeed, d.truthAt(w.t()).speedMps());
                    // Queues.off(): creeps of 0.1-0.3 m/s, under the 0.3 m/s a passive sensor needs.
                    assertThat(w.speedMps()).isZero();
                }
            }
            assertThat(maxSpeed).isBetween(0.1, 0.3);
            double movedM = d.truthAt(q.endT()).distanceM() - d.truthAt(q.startT()).distanceM();
            double turnedRad = d.truthAt(q.endT()).yawRad() - d.truthAt(q.startT()).yawRad();
            // Queues.off(): 10-20 degrees per queue, on a radius of at least 5 m.
            assertThat(Math.toDegrees(Math.abs(turnedRad))).isBetween(10.0, 20.0);
            assertThat(movedM).isGreaterThanOrEqualTo(5.0 * Math.abs(turnedRad) - 1e-9);
            // A perfect gyro's readings integrate (trapezoid, exact for the piecewise-linear rate) to the turn.
            double gyroRad = 0.0;
            for (int k = 1; k < gyro.size(); k++) {
                if (q.contains(gyro.get(k - 1).t()) && q.contains(gyro.get(k).t())) {
                    gyroRad += 0.5 * (gyro.get(k - 1).yawRateRadPerS() + gyro.get(k).yawRateRadPerS()) * 0.01;
                }
            }
            assertThat(gyroRad).isCloseTo(turnedRad, within(1e-9));
        }
    }

    /**
     * The brush model's utilisation for a slip theta * sigma = x: u = 3x - 3x^2 + x^3 (Pacejka, Tire and
     * Vehicle Dynamics, 3rd ed., ch. 3, from memory), solved here for x numerically by Commons Math's
     * Brent solver, independently of the simulator's closed-form cube root.
     */
    private static double brushSigma(double accelMps2, double loadFraction) {
        double mu = WheelSlip.DEFAULT_FRICTION;
        double c = WheelSlip.DEFAULT_SLIP_STIFFNESS;
        double u = Math.abs(accelMps2) / (mu * 9.80665 * loadFraction);
        double x = new BrentSolver(1e-15).solve(100, z -> 3 * z - 3 * z * z + z * z * z - u, 0.0, 1.0);
        return Math.signum(accelMps2) * x * 3.0 * mu / c;
    }

    @Test
    void aHardLaunchOverReadsTheDrivenWheelAsTheBrushModelSays() {
        // Rest, a 4.5 m/s^2 launch for 1 s, 2 m/s^2 to 14.5 m/s, cruise, brake at 2 m/s^2.
        Route r = Route.start(0.0, 0.0, 0.0).hold(1.0).rampTo(4.5, 0.0, 1.0).rampTo(14.5, 0.0, 5.0).hold(5.0)
                .rampTo(0.0, 0.0, 7.25).hold(1.0).build();
        WheelSpeedSettings wheel = WheelSpeedSettings.defaults().perfect().withSlip(WheelSlip.off().on());
        SimulatedDrive d = DriveSimulator.simulate(PERFECT.withWheelSpeed(wheel), r, 1L);
        double launch = 1.0 / (1.0 - brushSigma(4.5, 0.6)) - 1.0;
        double start = 1.0 / (1.0 - brushSigma(2.0, 0.6)) - 1.0;
        double braking = 1.0 / (1.0 - brushSigma(-2.0, 1.0)) - 1.0;
        // The values the WheelSlip documentation quotes: +6.7%, +2.0%, -1.1%.
        assertThat(launch).isCloseTo(0.0675, within(5e-4));
        assertThat(start).isCloseTo(0.0201, within(5e-4));
        assertThat(braking).isCloseTo(-0.0110, within(5e-4));
        int launchSamples = 0;
        for (WheelSpeed w : d.samplesOf(WheelSpeed.class)) {
            double s = w.t() - d.startT();
            double v = d.truthAt(w.t()).speedMps();
            double overRead = v == 0.0 ? 0.0 : w.speedMps() / v - 1.0;
            // Acceleration is constant inside each ramp; the ramp boundaries (1, 2, 7, 12, 19.25 s) are left
            // out because a reading at a knot takes the next ramp's.
            if (s > 1.001 && s < 1.999) {
                assertThat(overRead).isCloseTo(launch, within(1e-12));
                launchSamples++;
            } else if (s > 2.001 && s < 6.999) {
                assertThat(overRead).isCloseTo(start, within(1e-12));
            } else if (s > 7.001 && s < 11.999) {
                assertThat(w.speedMps()).isEqualTo(v);
            } else if (s > 12.001 && s < 19.249) {
                assertThat(overRead).isCloseTo(braking, within(1e-12));
            }
        }
        // About a second of over-reading: 50 readings at 50 Hz less the knot at each end.
        assertThat(launchSamples).isEqualTo(49);
    }

    @Test
    void everyStartFromRestOfTheLaunchSlipPresetOverReadsForASecond() {
        SimulationSettings s = Scenario.LAUNCH_SLIP.applyTo(PERFECT.withMinutes(9));
        SimulatedDrive d = DriveSimulator.simulate(s, 8L);
        double launch = 1.0 / (1.0 - brushSigma(4.5, 0.6)) - 1.0;
        int launches = 0;
        int run = 0;
        for (WheelSpeed w : d.samplesOf(WheelSpeed.class)) {
            double v = d.truthAt(w.t()).speedMps();
            boolean overReading = v > 0.0 && Math.abs(w.speedMps() / v - 1.0 - launch) < 1e-12;
            if (overReading) {
                run++;
            } else {
                if (run > 0) {
                    launches++;
                    // Each launch is 4.5 m/s^2 for HardLaunches.off()'s 1 s: 49 readings between its knots.
                    assertThat(run).isEqualTo(49);
                }
                run = 0;
            }
        }
        // The first start, the drive-on after reversing, and a launch on green after each of 3 queues.
        assertThat(launches).isEqualTo(5);
    }

    @Test
    void tyreGrowthMakesTheMotorwayOdometerScaleDifferFromTheTownOne() {
        SimulationSettings s = Scenario.MOTORWAY.applyTo(PERFECT.withMinutes(6));
        SimulatedDrive d = DriveSimulator.simulate(s, 9L);
        assertThat(d.motorways()).hasSize(1);
        TimeWindow m = d.motorways().get(0);
        assertThat(m.durationS()).isCloseTo(180.0, within(1e-6));
        double fastRead = 0.0;
        double fastTrue = 0.0;
        double slowRead = 0.0;
        double slowTrue = 0.0;
        double maxSpeed = 0.0;
        for (WheelSpeed w : d.samplesOf(WheelSpeed.class)) {
            double v = d.truthAt(w.t()).speedMps();
            // TyreGrowth.off(): the radius grows by 0.75% * (v / 33 m/s)^2, so the wheel reads v / (1 + that).
            double expected = v / (1.0 + 0.0075 * (v / 33.0) * (v / 33.0));
            assertThat(w.speedMps()).isCloseTo(expected, within(1e-12));
            if (v >= 30.0) {
                fastRead += w.speedMps();
                fastTrue += v;
            } else if (v >= 10.0 && v <= 20.0) {
                slowRead += w.speedMps();
                slowTrue += v;
            }
            if (m.contains(w.t())) {
                maxSpeed = Math.max(maxSpeed, v);
            }
        }
        // Motorway.off(): 30-36 m/s.
        assertThat(maxSpeed).isBetween(30.0, 36.0);
        double townScale = slowRead / slowTrue;
        double motorwayScale = fastRead / fastTrue;
        // At 33 m/s against 15 m/s: (1 + 0.0075) / (1 + 0.0075 * (15 / 33)^2) - 1 = 0.59%; the
        // common-practice band for motorway against town is 0.5-1%.
        assertThat(townScale / motorwayScale - 1.0).isBetween(0.004, 0.01);
    }
}
