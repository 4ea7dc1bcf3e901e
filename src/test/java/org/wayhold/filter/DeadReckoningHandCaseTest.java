package org.wayhold.filter;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.wayhold.geo.Angles;
import org.wayhold.settings.FilterSettings;
import org.wayhold.settings.GatingSettings;
import org.wayhold.settings.VehicleProfile;

/**
 * Exact hand cases of the motion model inside the whole filter, with every noise set to zero so the
 * estimate is pure dead reckoning. Expected values are the closed-form kinematics of the planar
 * constant-speed, constant-turn-rate motion (a straight line, a circular arc of radius v / omega).
 *
 * <p>Tolerance: the filter adds about 10^4 increments; each rounds with relative error 2^-53 of a
 * coordinate of at most 1 km, so the accumulated rounding is below 1e-9 m. That is the tolerance for
 * positions (relative to the radius for circles); yaw is compared to 1e-12 rad because its wrapped sum
 * of 10^4 increments of at most 0.02 rad rounds to about 1e-13.
 */
class DeadReckoningHandCaseTest {

    private static final double YAW_RATE_HZ = 100.0;
    private static final double WHEEL_RATE_HZ = 50.0;

    private static NavigationFilter start(double east, double north, double yaw, double bias, double scale) {
        NavigationFilter f = FilterFixtures.filter(FilterFixtures.noiseless(), GatingSettings.defaults(),
                VehicleProfile.defaults());
        f.initialize(0.0, FilterFixtures.state(east, north, yaw, bias, scale, 0.0, 0.0),
                new double[StateIndex.SIZE * StateIndex.SIZE]);
        return f;
    }

    /**
     * Drives from the filter's time to {@code toS}: yaw rate at 100 Hz, wheel speed at 50 Hz, both
     * starting with a sample at the filter's time, and calls
     * {@code each} after every yaw-rate sample.
     */
    private static void drive(NavigationFilter f, double toS, double wheelMps, double rateRadPerS,
                              java.util.function.Consumer<NavigationFilter> each) {
        long first = Math.round(f.tRel() * YAW_RATE_HZ);
        long last = Math.round(toS * YAW_RATE_HZ);
        // Both sensors report the new values at the segment's start.
        f.predictTo(first / YAW_RATE_HZ);
        f.setWheelSpeed(wheelMps);
        f.setYawRate(rateRadPerS);
        for (long k = first + 1; k <= last; k++) {
            double t = k / YAW_RATE_HZ;
            f.predictTo(t);
            if (k % Math.round(YAW_RATE_HZ / WHEEL_RATE_HZ) == 0) {
                f.setWheelSpeed(wheelMps);
            }
            f.setYawRate(rateRadPerS);
            each.accept(f);
        }
    }

    @ParameterizedTest
    @CsvSource({
            // east0, north0, yaw0 (rad), wheel speed (m/s), gyro bias = reading (rad/s), speed scale
            "0, 0, 0.0, 15, 0.0, 1.0",
            "10, -20, 0.7, 22.5, 0.0, 1.0",
            "-5, 3, -2.5, 8, 0.004, 1.0",
            // a scale of 1.02 turns 10 m/s of wheel speed into 10.2 m/s over the ground
            "1, 2, 3.0, 10, -0.002, 1.02"})
    void zeroNoiseStraightLineDeadReckonsExactlyAlongTheYaw(double e0, double n0, double yaw0, double v,
                                                            double bias, double scale) {
        // The gyro reads exactly its bias, so the true turn rate is zero: position = p0 + s v t (cos, sin).
        NavigationFilter f = start(e0, n0, yaw0, bias, scale);
        double[] maxErr = {0.0};
        drive(f, 60.0, v, bias, g -> {
            double[] x = g.state();
            double t = g.tRel();
            maxErr[0] = Math.max(maxErr[0], Math.hypot(x[StateIndex.EAST] - (e0 + scale * v * t * Math.cos(yaw0)),
                    x[StateIndex.NORTH] - (n0 + scale * v * t * Math.sin(yaw0))));
        });
        assertThat(maxErr[0]).isLessThan(1e-9);
        assertThat(f.state()[StateIndex.YAW]).isEqualTo(yaw0);
        assertThat(f.snapshot().speedMps()).isCloseTo(scale * v, within(1e-12));
    }

    @ParameterizedTest
    @CsvSource({
            // east0, north0, yaw0, wheel speed (m/s), yaw rate (rad/s): left and right turns, forwards and back
            "0, 0, 0.0, 10, 0.2",
            "100, 50, 1.3, 15, -0.05",
            "-30, 12, -2.9, 4, 0.5",
            "5, 5, 0.4, -3, 0.3",
            "0, 0, 2.2, -6, -0.15"})
    void constantYawRateTracesACircleOfRadiusSpeedOverRate(double e0, double n0, double yaw0, double v,
                                                           double omega) {
        // Centre of the circle: p0 + (v / omega) (-sin yaw0, cos yaw0); every point lies at |v / omega|
        // from it, and the yaw grows linearly: yaw0 + omega t.
        double radius = v / omega;
        double ce = e0 - radius * Math.sin(yaw0);
        double cn = n0 + radius * Math.cos(yaw0);
        NavigationFilter f = start(e0, n0, yaw0, 0.0, 1.0);
        double[] worst = {0.0, 0.0, 0.0};
        int[] points = {0};
        drive(f, 90.0, v, omega, g -> {
            double[] x = g.state();
            double t = g.tRel();
            double r = Math.hypot(x[StateIndex.EAST] - ce, x[StateIndex.NORTH] - cn);
            worst[0] = Math.max(worst[0], Math.abs(r - Math.abs(radius)) / Math.abs(radius));
            double yaw = yaw0 + omega * t;
            worst[1] = Math.max(worst[1], Math.abs(Angles.wrapPi(x[StateIndex.YAW] - yaw)));
            // Where on the circle: p(t) = c + R (sin(yaw), -cos(yaw)).
            worst[2] = Math.max(worst[2], Math.hypot(x[StateIndex.EAST] - (ce + radius * Math.sin(yaw)),
                    x[StateIndex.NORTH] - (cn - radius * Math.cos(yaw))) / Math.abs(radius));
            points[0]++;
        });
        assertThat(points[0]).isEqualTo(9000);
        assertThat(worst[0]).as("radius, relative").isLessThan(1e-9);
        assertThat(worst[1]).as("yaw, rad").isLessThan(1e-12);
        assertThat(worst[2]).as("position on the circle, relative to the radius").isLessThan(1e-9);
    }

    @Test
    void reversingMovesBackwardsAlongTheYaw() {
        // Wheel speed -2 m/s facing north-east (yaw pi/4): after 10 s the car is 20 m south-west.
        NavigationFilter f = start(0.0, 0.0, Math.PI / 4, 0.0, 1.0);
        drive(f, 10.0, -2.0, 0.0, g -> { });
        double[] x = f.state();
        assertThat(x[StateIndex.EAST]).isCloseTo(-20.0 * Math.cos(Math.PI / 4), within(1e-9));
        assertThat(x[StateIndex.NORTH]).isCloseTo(-20.0 * Math.sin(Math.PI / 4), within(1e-9));
        assertThat(x[StateIndex.YAW]).isEqualTo(Math.PI / 4);
        // Odometer counts distance, whatever the direction.
        assertThat(f.snapshot().odometerM()).isCloseTo(20.0, within(1e-9));
    }

    @Test
    void aGyroReadingTheBiasCannotExplainAtRestIsACreepAlongAnArc() {
        // Drive 10 s east at 10 m/s, then the wheels read zero while the gyro reads 0.05 rad/s with its
        // bias known exactly (variance 0). No bias explains the reading, so the vehicle turns, and a
        // vehicle that turns moves: it creeps at the middle of what the wheels cannot see, between
        // omega * min_turn_radius_m (0.05 * 4.5 = 0.225 m/s) and wheel_speed_zero_below_mps (0.3 m/s):
        // 0.2625 m/s, on a circle of radius 0.2625 / 0.05 = 5.25 m.
        NavigationFilter f = start(0.0, 0.0, 0.0, 0.0, 1.0);
        drive(f, 10.0, 10.0, 0.0, g -> { });
        double omega = 0.05;
        double[] creepStart = {Double.NaN, 0.0, 0.0, 0.0};
        double[] worst = {0.0};
        drive(f, 30.0, 0.0, omega, g -> {
            double[] x = g.state();
            boolean creeping = (g.snapshot().reasons() & Reason.CREEPING.bit()) != 0;
            if (creeping && Double.isNaN(creepStart[0])) {
                creepStart[0] = g.tRel();
                creepStart[1] = x[StateIndex.EAST];
                creepStart[2] = x[StateIndex.NORTH];
                creepStart[3] = x[StateIndex.YAW];
            } else if (creeping) {
                // p(t) = p_c + R (sin(yaw) - sin(yaw_c), cos(yaw_c) - cos(yaw)), yaw = yaw_c + omega dt.
                double radius = 0.2625 / omega;
                double yaw = creepStart[3] + omega * (g.tRel() - creepStart[0]);
                worst[0] = Math.max(worst[0], Math.hypot(
                        x[StateIndex.EAST] - (creepStart[1] + radius * (Math.sin(yaw) - Math.sin(creepStart[3]))),
                        x[StateIndex.NORTH] - (creepStart[2] + radius * (Math.cos(creepStart[3]) - Math.cos(yaw)))));
            }
        });
        assertThat(f.snapshot().standstill()).isFalse();
        // Creeping is decided once the wheels have read zero for standstill_after_s (0.5 s).
        assertThat(creepStart[0]).isBetween(10.5 - 1e-9, 10.52);
        // Until then the reading turned the stopped car on the spot: 100 m east, 0.05 rad/s for 0.5 s.
        assertThat(creepStart[1]).isCloseTo(100.0, within(1e-9));
        assertThat(creepStart[2]).isEqualTo(0.0);
        assertThat(creepStart[3]).isBetween(omega * 0.5 - 1e-12, omega * 0.52 + 1e-12);
        assertThat(worst[0]).as("distance from the arc (m)").isLessThan(1e-9);
        assertThat(f.state()[StateIndex.YAW]).isCloseTo(omega * 20.0, within(1e-9));
    }

    @Test
    void aStandstillTheBiasExplainsHoldsThePositionAndUndoesTheTurnTakenBeforeItWasConfirmed() {
        // From rest, the wheels read zero while the gyro reads 0.01 rad/s; the bias is unknown with
        // 1-sigma 0.01 rad/s, so the reading is explained (NIS = 1 against 10.83) once the wheels have
        // read zero for standstill_after_s (0.5 s). Before that the reading turns the car on the spot by
        // 0.01 * 0.5 rad - less the bias, so yaw and bias become correlated; the zero-rate updates then
        // learn the bias (reading noise 0.001 rad/s, prior 0.01) and through that correlation take the
        // turn back. The position never moves: at zero speed nothing couples it to yaw or bias.
        FilterSettings settings = FilterFixtures.settings(0.0, 50.0, 0.001, 100.0, 0.0, 0.0, 1.0, 0.0, 30.0);
        NavigationFilter f = FilterFixtures.filter(settings, GatingSettings.defaults(), VehicleProfile.defaults());
        double[] p0 = FilterFixtures.diagonal(0.0, 0.0, 0.0, 1e-4, 0.0, 0.0, 0.0);
        f.initialize(0.0, FilterFixtures.state(20.0, -5.0, 0.3, 0.0, 1.0, 0.0, 0.0), p0);
        double[] yawBeforeRest = {Double.NaN};
        double[] maxMove = {0.0};
        drive(f, 20.0, 0.0, 0.01, g -> {
            double[] x = g.state();
            maxMove[0] = Math.max(maxMove[0], Math.hypot(x[StateIndex.EAST] - 20.0, x[StateIndex.NORTH] + 5.0));
            if (Double.isNaN(yawBeforeRest[0]) && g.snapshot().standstill()) {
                yawBeforeRest[0] = x[StateIndex.YAW];
            }
        });
        assertThat(f.snapshot().standstill()).isTrue();
        assertThat(maxMove[0]).isEqualTo(0.0);
        // The first confirming reading already learns most of the bias and takes back most of the turn
        // 0.01 * 0.5 = 0.005 rad; after 20 s of readings (about 1950 updates) the bias is 0.01 to within
        // about 1e-6 / 1950 / 1e-4 of it, and the remaining turn is 0.5 s times that.
        assertThat(yawBeforeRest[0] - 0.3).isLessThan(0.005);
        assertThat(f.state()[StateIndex.GYRO_BIAS]).isCloseTo(0.01, within(1e-6));
        assertThat(f.state()[StateIndex.YAW]).isCloseTo(0.3, within(1e-5));
    }
}
