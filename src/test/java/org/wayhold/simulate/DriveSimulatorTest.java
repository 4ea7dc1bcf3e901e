package org.wayhold.simulate;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;
import static org.assertj.core.api.Assertions.within;

import java.util.List;
import org.apache.commons.math3.distribution.BinomialDistribution;
import org.junit.jupiter.api.Test;
import org.wayhold.geo.Enu;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.ReferencePoint;
import org.wayhold.sample.Sample;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;

/** Exact properties of simulated drives: determinism, timing, tunnels, perfect sensors, the circle. */
class DriveSimulatorTest {

    private static final SimulationSettings TEN_MINUTES_TWO_TUNNELS =
            SimulationSettings.defaults().withMinutes(10).withWarmUpS(120).withTunnelsS(40, 100);

    @Test
    void sameSeedGivesBitIdenticalSamplesAndADifferentSeedDoesNot() {
        SimulatedDrive a = DriveSimulator.simulate(TEN_MINUTES_TWO_TUNNELS, 11L);
        SimulatedDrive b = DriveSimulator.simulate(TEN_MINUTES_TWO_TUNNELS, 11L);
        SimulatedDrive c = DriveSimulator.simulate(TEN_MINUTES_TWO_TUNNELS, 12L);
        // Record equality compares doubles with Double.compare, i.e. bit for bit.
        assertThat(a.samples()).isEqualTo(b.samples());
        assertThat(a.faults()).isEqualTo(b.faults());
        assertThat(a.tunnels()).isEqualTo(b.tunnels());
        assertThat(a.samples()).isNotEqualTo(c.samples());
        assertThat(a.truthAt(a.startT() + 300.0)).isNotEqualTo(c.truthAt(c.startT() + 300.0));
    }

    @Test
    void switchingOffGnssErrorsLeavesTheOtherSensorsUnchanged() {
        SimulationSettings s = TEN_MINUTES_TWO_TUNNELS;
        SimulatedDrive noisy = DriveSimulator.simulate(s, 5L);
        SimulatedDrive clean = DriveSimulator.simulate(s.withGnss(s.gnss().perfect()), 5L);
        assertThat(clean.samplesOf(WheelSpeed.class)).isEqualTo(noisy.samplesOf(WheelSpeed.class));
        assertThat(clean.samplesOf(YawRate.class)).isEqualTo(noisy.samplesOf(YawRate.class));
        assertThat(clean.samplesOf(ReferencePoint.class)).isEqualTo(noisy.samplesOf(ReferencePoint.class));
        assertThat(clean.samplesOf(GnssFix.class)).isNotEqualTo(noisy.samplesOf(GnssFix.class));
    }

    @Test
    void everySampleTimeIsAnExactMultipleOfItsPeriodFromTheStart() {
        SimulatedDrive d = DriveSimulator.simulate(TEN_MINUTES_TWO_TUNNELS, 3L);
        double start = d.startT();
        assertThat(start).isGreaterThan(1.8e9);
        double previous = Double.NEGATIVE_INFINITY;
        for (Sample s : d.samples()) {
            assertThat(s.t()).isGreaterThanOrEqualTo(previous);
            previous = s.t();
            // The sample instants are ticks of 10 ms counted from the start: startT + tick / 100.0 exactly,
            // the double nearest to the true instant (one ulp at 1.8e9 s is 2.4e-7 s).
            long tick = Math.round((s.t() - start) * 100.0);
            assertThat(s.t()).isEqualTo(start + tick / 100.0);
            int ticksPerSample = switch (s.type()) {
                case YAW_RATE -> 1;      // 100 Hz
                case WHEEL_SPEED -> 2;   // 50 Hz
                case REFERENCE -> 10;    // 10 Hz
                case GNSS -> 20;         // 5 Hz
            };
            assertThat(tick % ticksPerSample).as("tick of %s", s).isZero();
        }
        // 600 s at 100, 50 and 10 Hz, every sample present (tunnels only remove GNSS fixes).
        assertThat(d.samplesOf(YawRate.class)).hasSize(60_000);
        assertThat(d.samplesOf(WheelSpeed.class)).hasSize(30_000);
        assertThat(d.samplesOf(ReferencePoint.class)).hasSize(6_000);
        assertThat(d.samples().get(0).t()).isEqualTo(start);
    }

    @Test
    void noFixFallsInsideATunnelAndTheTunnelsHaveTheRequestedLengths() {
        SimulatedDrive d = DriveSimulator.simulate(TEN_MINUTES_TWO_TUNNELS, 4L);
        List<TimeWindow> tunnels = d.tunnels();
        assertThat(tunnels).hasSize(2);
        assertThat(tunnels.get(0).durationS()).isCloseTo(40.0, within(1e-6));
        assertThat(tunnels.get(1).durationS()).isCloseTo(100.0, within(1e-6));
        // The warm-up asked for 120 s of open sky before the first tunnel.
        assertThat(tunnels.get(0).startT() - d.startT()).isGreaterThanOrEqualTo(120.0);
        List<GnssFix> fixes = d.samplesOf(GnssFix.class);
        for (TimeWindow w : tunnels) {
            assertThat(fixes).noneMatch(f -> w.contains(f.t()));
            // 5 Hz: 40 s and 100 s without fixes are 200 and 500 missing fixes; references continue.
            long refsInside = d.samplesOf(ReferencePoint.class).stream().filter(r -> w.contains(r.t())).count();
            assertThat(refsInside).isEqualTo(Math.round(w.durationS() * 10));
            // The vehicle drives through the whole tunnel.
            assertThat(d.truthAt(w.startT()).speedMps()).isGreaterThanOrEqualTo(10.0);
            assertThat(d.truthAt(w.endT()).speedMps()).isGreaterThanOrEqualTo(10.0);
            // Fixes resume at the first 5 Hz instant at or after the exit.
            assertThat(fixes).anyMatch(f -> f.t() >= w.endT() && f.t() < w.endT() + 0.2);
        }
        assertThat(fixes).hasSize(3000 - 200 - 500);
    }

    @Test
    void fixesAfterATunnelExitCarryMultipathOffsetsOfTheConfiguredSize() {
        SimulatedDrive d = DriveSimulator.simulate(TEN_MINUTES_TWO_TUNNELS, 4L);
        GnssSettings g = d.settings().gnss();
        for (TimeWindow w : d.tunnels()) {
            List<GnssFault> exit = d.faults().stream()
                    .filter(f -> f.kind() == GnssFault.Kind.EXIT_MULTIPATH && w.endT() <= f.t()
                            && f.t() < w.endT() + g.multipathAfterExitS())
                    .toList();
            // 2 s after the exit at 5 Hz: 10 spoiled fixes, each 5-15 m off (GnssSettings.defaults()).
            assertThat(exit).hasSize(10);
            assertThat(exit).allSatisfy(f -> assertThat(f.offsetM()).isBetween(5.0, 15.0));
        }
        // The spoiled fix really is off by its offset: noise is about 1 m per axis, so 6 m is a wide margin.
        for (GnssFault f : d.faults()) {
            GnssFix fix = d.samplesOf(GnssFix.class).stream().filter(x -> x.t() == f.t()).findFirst().orElseThrow();
            Enu measured = d.frame().toEnu(fix.latDeg(), fix.lonDeg(), fix.altM());
            Enu truth = d.antennaAt(f.t());
            assertThat(measured.eastM() - truth.eastM()).isCloseTo(f.offsetEastM(), within(6.0));
            assertThat(measured.northM() - truth.northM()).isCloseTo(f.offsetNorthM(), within(6.0));
            assertThat(fix.sigmaHM()).isEqualTo(1.0, within(1e-12));
        }
        assertThat(d.faults()).anyMatch(f -> f.kind() == GnssFault.Kind.OUTLIER);
    }

    @Test
    void urbanCanyonsDropAndSpoilFixesAtTheConfiguredRates() {
        SimulationSettings s = SimulationSettings.defaults().withMinutes(10).withCanyonsS(120, 120);
        SimulatedDrive d = DriveSimulator.simulate(s, 14L);
        assertThat(d.canyons()).hasSize(2);
        // 240 s of canyon at 5 Hz: 1200 fix instants.
        int instants = 1200;
        long dropped = d.faults().stream().filter(f -> f.kind() == GnssFault.Kind.CANYON_DROPPED).count();
        long spoiled = d.faults().stream().filter(f -> f.kind() == GnssFault.Kind.CANYON_MULTIPATH).count();
        // Each instant is dropped with probability 0.2, else spoiled with probability 0.3
        // (GnssSettings.defaults()): binomial counts, bounded by their central 99.9% from Commons Math.
        BinomialDistribution drop = new BinomialDistribution(instants, 0.2);
        assertThat(dropped).isBetween((long) drop.inverseCumulativeProbability(0.0005),
                (long) drop.inverseCumulativeProbability(0.9995));
        int kept = instants - (int) dropped;
        BinomialDistribution spoil = new BinomialDistribution(kept, 0.3);
        assertThat(spoiled).isBetween((long) spoil.inverseCumulativeProbability(0.0005),
                (long) spoil.inverseCumulativeProbability(0.9995));
        List<GnssFix> inside = d.samplesOf(GnssFix.class).stream()
                .filter(f -> d.canyons().stream().anyMatch(w -> w.contains(f.t()))).toList();
        assertThat(inside).hasSize(kept);
        assertThat(inside).allSatisfy(f -> {
            assertThat(f.hdop()).isBetween(1.5, 3.0);
            assertThat(f.sats()).isBetween(5, 7);
        });
        // No outliers are mixed into the canyons: every fault in a canyon is a canyon fault.
        assertThat(d.faults()).filteredOn(f -> d.canyons().stream().anyMatch(w -> w.contains(f.t())))
                .allSatisfy(f -> assertThat(f.kind().name()).startsWith("CANYON"));
    }

    @Test
    void perfectSensorsReadTheTruthExactly() {
        SimulationSettings s = TEN_MINUTES_TWO_TUNNELS.perfectSensors();
        s = s.withGnss(s.gnss().withLeverArm(1.2, 0.3, 1.5));
        SimulatedDrive d = DriveSimulator.simulate(s, 8L);
        for (WheelSpeed w : d.samplesOf(WheelSpeed.class)) {
            assertThat(w.speedMps()).isEqualTo(d.truthAt(w.t()).speedMps());
        }
        for (YawRate y : d.samplesOf(YawRate.class)) {
            assertThat(y.yawRateRadPerS()).isEqualTo(d.truthAt(y.t()).yawRateRadPerS());
        }
        int reversingFixes = 0;
        for (GnssFix f : d.samplesOf(GnssFix.class)) {
            // The ENU round trip of the geo package is good to well under 0.1 mm (its own tests), so 1e-6 m
            // here checks the simulator's lever arm and timing, not the geodesy.
            Enu measured = d.frame().toEnu(f.latDeg(), f.lonDeg(), f.altM());
            Enu antenna = d.antennaAt(f.t());
            assertThat(measured.eastM()).isCloseTo(antenna.eastM(), within(1e-6));
            assertThat(measured.northM()).isCloseTo(antenna.northM(), within(1e-6));
            assertThat(measured.upM()).isCloseTo(1.5, within(1e-6));
            Truth tr = d.truthAt(f.t());
            if (tr.speedMps() == 0.0) {
                // Standing still there is no direction of travel: course is left out (below 1 m/s).
                assertThat(f.hasCourse()).isFalse();
                assertThat(f.speedMps()).isZero();
            }
            if (tr.speedMps() < -1.2) {
                // Reversing: the course over ground points backwards, opposite the heading.
                reversingFixes++;
                assertThat(angleDiffDeg(f.courseDeg(), headingDeg(tr.yawRad()) + 180.0)).isLessThan(1.0);
            } else if (tr.speedMps() > 5.0 && tr.yawRateRadPerS() == 0.0) {
                assertThat(f.speedMps()).isCloseTo(tr.speedMps(), within(1e-9));
                assertThat(angleDiffDeg(f.courseDeg(), headingDeg(tr.yawRad()))).isLessThan(1e-9);
            }
        }
        assertThat(reversingFixes).isPositive();
        for (ReferencePoint r : d.samplesOf(ReferencePoint.class)) {
            Truth tr = d.truthAt(r.t());
            Enu p = d.frame().toEnu(r.latDeg(), r.lonDeg(), r.altM());
            assertThat(p.eastM()).isCloseTo(tr.eastM(), within(1e-6));
            assertThat(p.northM()).isCloseTo(tr.northM(), within(1e-6));
            assertThat(angleDiffDeg(r.headingDeg(), headingDeg(tr.yawRad()))).isLessThan(1e-9);
        }
    }

    @Test
    void aGyroWithOnlyAConstantBiasReadsTrueRatePlusExactlyThatBias() {
        SimulationSettings s = TEN_MINUTES_TWO_TUNNELS.perfectSensors();
        s = s.withYawRate(s.yawRate().withBiasDegPerS(0.2));
        SimulatedDrive d = DriveSimulator.simulate(s, 9L);
        double biasRadPerS = Math.toRadians(0.2);
        for (YawRate y : d.samplesOf(YawRate.class)) {
            // One rounding of the addition: within an ulp of the largest term (rates stay below 1 rad/s).
            assertThat(y.yawRateRadPerS() - d.truthAt(y.t()).yawRateRadPerS()).isCloseTo(biasRadPerS, within(1e-15));
            assertThat(d.gyroBiasRadPerSAt(y.t())).isEqualTo(biasRadPerS);
        }
    }

    @Test
    void constantSpeedAndYawRateTraceACircleOfRadiusSpeedOverRate() {
        // Exact hand case: v = 15 m/s, yaw rate 0.3 rad/s gives radius v / omega = 50 m; starting east-bound
        // at the origin and turning left (counter-clockwise), the centre is 50 m north.
        double v = 15.0;
        double omega = 0.3;
        Route circle = Route.start(0.0, v, omega).hold(120.0).build();
        SimulatedDrive d = DriveSimulator.simulate(SimulationSettings.defaults().perfectSensors(), circle, 1L);
        double radius = v / omega;
        // Instants between the 10 ms ticks, so truthAt interpolates rather than snapping to a tick.
        for (double s = 0.0037; s <= 120.0; s += 0.137) {
            Truth tr = d.truthAt(d.startT() + s);
            // The instant the epoch time really denotes: near 1.8e9 s it is s rounded to 2.4e-7 s.
            double sinceStartS = tr.t() - d.startT();
            assertThat(Math.hypot(tr.eastM(), tr.northM() - radius)).isCloseTo(radius, within(1e-6));
            assertThat(tr.yawRad()).isCloseTo(omega * sinceStartS, within(1e-12));
            assertThat(tr.distanceM()).isCloseTo(v * sinceStartS, within(1e-9));
        }
        // One lap takes 2 pi / omega = 20.944 s; after it the vehicle is back at the origin, up to the
        // rounding of the epoch time (half an ulp at 1.8e9 s is 1.2e-7 s, 1.8e-6 m at 15 m/s).
        Truth lap = d.truthAt(d.startT() + 2.0 * Math.PI / omega);
        assertThat(Math.hypot(lap.eastM(), lap.northM())).isLessThan(v * 1.2e-7 + 1e-6);
        // Perfect GNSS fixes lie on the same circle.
        for (GnssFix f : d.samplesOf(GnssFix.class)) {
            Enu p = d.frame().toEnu(f.latDeg(), f.lonDeg(), f.altM());
            assertThat(Math.hypot(p.eastM(), p.northM() - radius)).isCloseTo(radius, within(1e-6));
        }
    }

    @Test
    void theGeneratedRouteHoldsTurnsBothWaysAStandstillAndAShortReverse() {
        SimulatedDrive d = DriveSimulator.simulate(TEN_MINUTES_TWO_TUNNELS.perfectSensors(), 21L);
        double warmUpEnd = d.tunnels().get(0).startT();
        boolean left = false;
        boolean right = false;
        double longestStandstillS = 0.0;
        double standstillS = 0.0;
        double reverseM = 0.0;
        double slowestReverseMps = 0.0;
        double maxLateralMps2 = 0.0;
        double previousStart = d.startT();
        for (WheelSpeed w : d.samplesOf(WheelSpeed.class)) {
            Truth tr = d.truthAt(w.t());
            if (w.t() < warmUpEnd) {
                left |= tr.yawRateRadPerS() > 0.1;
                right |= tr.yawRateRadPerS() < -0.1;
            }
            // Standstill: consecutive exact zeros after the vehicle has first moved.
            if (w.speedMps() == 0.0 && tr.distanceM() > 0.0) {
                standstillS += 0.02;
                longestStandstillS = Math.max(longestStandstillS, standstillS);
            } else {
                standstillS = 0.0;
            }
            if (tr.speedMps() < 0.0) {
                reverseM += -tr.speedMps() * 0.02;
                slowestReverseMps = Math.min(slowestReverseMps, tr.speedMps());
            }
            maxLateralMps2 = Math.max(maxLateralMps2, Math.abs(tr.speedMps() * tr.yawRateRadPerS()));
            if (tr.distanceM() > 50.0 && tr.speedMps() > 0.0 && w.t() > previousStart) {
                assertThat(tr.speedMps()).isLessThanOrEqualTo(20.0 + 1e-9);
            }
        }
        assertThat(left).isTrue();
        assertThat(right).isTrue();
        // RouteSettings.defaults(): a 15 s standstill; the 20 ms wheel grid counts it to within a sample.
        assertThat(longestStandstillS).isCloseTo(15.0, within(0.05));
        // Reversing 5 m at 1.5 m/s; the rectangle sum over 20 ms is good to a few centimetres.
        assertThat(reverseM).isCloseTo(5.0, within(0.1));
        assertThat(slowestReverseMps).isEqualTo(-1.5);
        // Turns no tighter than 3 m/s^2 of lateral acceleration (v * omega).
        assertThat(maxLateralMps2).isLessThanOrEqualTo(3.0 + 1e-9);
    }

    @Test
    void aDriveTooShortForItsTunnelsIsRefusedWithTheNeededLength() {
        SimulationSettings s = SimulationSettings.defaults().withMinutes(2).withTunnelsS(100, 100);
        assertThatThrownBy(() -> DriveSimulator.simulate(s, 1L))
                .isInstanceOf(IllegalArgumentException.class)
                .hasMessageContaining("route.durationS")
                .hasMessageContaining("need at least");
    }

    @Test
    void settingsNameTheBadFieldAndItsUnit() {
        assertThatThrownBy(() -> GnssSettings.defaults().withWhiteNoiseM(-1.0))
                .hasMessage("gnss.whiteNoiseM: must be a finite number of m >= 0, was -1.0");
        assertThatThrownBy(() -> new WheelSpeedSettings(30.0, 0.01, 0.05, 0.01))
                .hasMessageContaining("wheelSpeed.rateHz").hasMessageContaining("30.0 Hz");
        assertThatThrownBy(() -> RouteSettings.defaults().withSpeedRange(20.0, 10.0))
                .hasMessageContaining("route.maxSpeedMps");
    }

    @Test
    void truthAtRejectsTimesOutsideTheDrive() {
        SimulatedDrive d = DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(2), 2L);
        assertThatThrownBy(() -> d.truthAt(d.startT() - 1.0)).hasMessageContaining("t: must lie within the drive");
        assertThatThrownBy(() -> d.truthAt(d.endT() + 1.0)).hasMessageContaining("t: must lie within the drive");
        assertThat(d.truthAt(d.endT()).t()).isEqualTo(d.endT());
    }

    /** Heading in degrees clockwise from north, from yaw counter-clockwise from east (README.md, "Conventions"). */
    private static double headingDeg(double yawRad) {
        return 90.0 - Math.toDegrees(yawRad);
    }

    /** Absolute difference of two directions (deg), in [0, 180]. */
    private static double angleDiffDeg(double aDeg, double bDeg) {
        double d = Math.abs((aDeg - bDeg) % 360.0);
        return Math.min(d, 360.0 - d);
    }
}
