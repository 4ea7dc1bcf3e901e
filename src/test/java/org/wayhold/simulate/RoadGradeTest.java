package org.wayhold.simulate;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import java.util.List;
import org.junit.jupiter.api.Test;
import org.wayhold.geo.Enu;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.ReferencePoint;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;

/** Road grade: wheels roll along the slope, the pitched gyro, the height in the reference, the garage. */
class RoadGradeTest {

    private static final SimulationSettings PERFECT = SimulationSettings.defaults().perfectSensors();

    /** Trapezoid sum of a wheel's readings on their nominal 20 ms spacing (m): exact for piecewise-linear speed. */
    private static double wheelDistanceM(List<WheelSpeed> wheel) {
        double sum = 0.0;
        for (int k = 1; k < wheel.size(); k++) {
            sum += 0.5 * (wheel.get(k - 1).speedMps() + wheel.get(k).speedMps()) * 0.02;
        }
        return sum;
    }

    @Test
    void onAConstantGradeTheGroundCoveredIsTheWheelDistanceTimesTheCosineOfTheGrade() {
        // A 5% grade (rise over run): gamma = atan(0.05). The grade is set while standing, then the car
        // accelerates, cruises and brakes straight up the slope.
        double gamma = Math.atan(0.05);
        Route r = Route.start(0.7, 0.0, 0.0).rampTo(0.0, 0.0, gamma, 1.0).rampTo(15.0, 0.0, 5.0).hold(60.0)
                .rampTo(0.0, 0.0, 5.0).hold(1.0).build();
        SimulatedDrive d = DriveSimulator.simulate(PERFECT, r, 1L);
        double wheelM = wheelDistanceM(d.samplesOf(WheelSpeed.class));
        // 15 m/s for 65 s (the two 5 s ramps count half): 975 m along the road.
        assertThat(wheelM).isCloseTo(975.0, within(1e-9));
        Truth end = d.truthAt(d.endT());
        double groundM = Math.hypot(end.eastM(), end.northM());
        // Exact geometry: horizontal = along-road * cos(gamma), height = along-road * sin(gamma). The
        // truth integrates these by Gauss-Legendre quadrature, good to far below a micrometre.
        assertThat(groundM / wheelM).isCloseTo(Math.cos(gamma), within(1e-12));
        assertThat(end.upM()).isCloseTo(wheelM * Math.sin(gamma), within(1e-9));
        assertThat(end.distanceM()).isCloseTo(wheelM, within(1e-9));
        // The reference lines carry the height: their ENU up is the truth's.
        List<ReferencePoint> refs = d.samplesOf(ReferencePoint.class);
        ReferencePoint last = refs.get(refs.size() - 1);
        Enu p = d.frame().toEnu(last.latDeg(), last.lonDeg(), last.altM());
        assertThat(p.upM()).isCloseTo(d.truthAt(last.t()).upM(), within(1e-6));
        assertThat(p.upM()).isGreaterThan(48.0);
    }

    @Test
    void aGyroOnAPitchedBodyReadsTheYawRateTimesTheCosineOfTheGrade() {
        // A helix: 8% grade, 4 m/s, yaw rate 0.3 rad/s for one turn of 2 pi / 0.3 s; the grade comes in
        // over the first 10 ms.
        double gamma = Math.atan(0.08);
        double omega = 0.3;
        double turnS = 2.0 * Math.PI / omega;
        Route r = Route.start(0.0, 4.0, omega).rampTo(4.0, omega, gamma, 0.01).hold(Math.rint(turnS * 100) / 100.0)
                .build();
        SimulatedDrive d = DriveSimulator.simulate(PERFECT, r, 1L);
        for (YawRate y : d.samplesOf(YawRate.class)) {
            Truth tr = d.truthAt(y.t());
            // The angular velocity is the yaw rate about the vertical plus the pitch rate about the body's
            // lateral axis; the body z axis makes the grade angle with the vertical and is perpendicular
            // to the lateral axis, so it senses omega cos(gamma) (rotation kinematics by hand).
            assertThat(y.yawRateRadPerS()).isCloseTo(tr.yawRateRadPerS() * Math.cos(tr.gradeRad()), within(1e-15));
        }
        // On the helix the horizontal circle has radius v cos(gamma) / omega and the car climbs v sin(gamma)
        // per second; the 10 ms of steepening moves the circle by about 0.1 mm.
        double radius = 4.0 * Math.cos(gamma) / omega;
        double climb = 4.0 * Math.sin(gamma);
        for (double s = 1.0; s < turnS; s += 0.73) {
            Truth tr = d.truthAt(d.startT() + s);
            assertThat(Math.hypot(tr.eastM(), tr.northM() - radius)).isCloseTo(radius, within(1e-3));
            assertThat(tr.upM()).isCloseTo(climb * (s - 0.005), within(1e-3));
        }
    }

    @Test
    void hillsLiftTheRouteWithoutChangingItsSpeedsOrTurns() {
        SimulationSettings flat = PERFECT.withMinutes(10);
        SimulationSettings hilly = flat.withRoute(flat.route().withHills(Hills.off().on()));
        SimulatedDrive f = DriveSimulator.simulate(flat, 17L);
        SimulatedDrive h = DriveSimulator.simulate(hilly, 17L);
        // The grades come from their own random stream: the wheels see the same speeds.
        assertThat(h.samplesOf(WheelSpeed.class)).isEqualTo(f.samplesOf(WheelSpeed.class));
        double maxTan = 0.0;
        double maxUp = 0.0;
        for (ReferencePoint r : h.samplesOf(ReferencePoint.class)) {
            Truth tr = h.truthAt(r.t());
            maxTan = Math.max(maxTan, Math.abs(Math.tan(tr.gradeRad())));
            Enu p = h.frame().toEnu(r.latDeg(), r.lonDeg(), r.altM());
            assertThat(p.upM()).isCloseTo(tr.upM(), within(1e-6));
            assertThat(p.eastM()).isCloseTo(tr.eastM(), within(1e-6));
            maxUp = Math.max(maxUp, Math.abs(tr.upM()));
        }
        // Hills.off(): grades up to 6% rise over run, drawn uniformly; some come near it on a 10 minute drive.
        assertThat(maxTan).isLessThanOrEqualTo(0.06 + 1e-12).isGreaterThan(0.03);
        assertThat(maxUp).isGreaterThan(5.0);
        // The same road length covers less ground: the mean cosine of grades up to 6% lies between
        // cos(atan 0.06) = 0.99820 and 1.
        double ground = 0.0;
        Truth previous = h.truthAt(h.startT());
        for (int tick = 1; tick <= 60_000; tick++) {
            Truth tr = h.truthAt(h.startT() + tick / 100.0);
            ground += Math.hypot(tr.eastM() - previous.eastM(), tr.northM() - previous.northM());
            previous = tr;
        }
        double road = h.truthAt(h.endT()).distanceM();
        assertThat(ground / road).isBetween(Math.cos(Math.atan(0.06)), 1.0 - 1e-5);
        for (YawRate y : h.samplesOf(YawRate.class)) {
            Truth tr = h.truthAt(y.t());
            assertThat(y.yawRateRadPerS()).isCloseTo(tr.yawRateRadPerS() * Math.cos(tr.gradeRad()), within(1e-15));
        }
    }

    @Test
    void theGarageClimbsFiveStoreysOnAHelixWithoutGnssAndParksAtTheTop() {
        SimulationSettings s = Scenario.GARAGE.applyTo(PERFECT.withMinutes(8));
        SimulatedDrive d = DriveSimulator.simulate(s, 23L);
        assertThat(d.garages()).hasSize(1);
        TimeWindow g = d.garages().get(0);
        assertThat(d.gnssDenied()).containsExactly(g);
        List<GnssFix> fixes = d.samplesOf(GnssFix.class);
        assertThat(fixes).noneMatch(f -> g.contains(f.t()));
        // By hand: grade atan(3 / (2 pi 12)) = 2.2785 deg; each 2 s ramp into and out of the helix climbs
        // 3.5 * (2 / gamma) * (1 - cos gamma) = 0.139 m, so the constant part lasts
        // (15 - 0.278) / (3.5 sin gamma) = 105.8 s. Inside: 3 s in, 109.8 s up, 3 s on the deck, 1.8 s to
        // stop, 90 s parked, 1 + 4 + 1 s backing out, 2 s pause, 1.8 s to 3.5 m/s, the turn round at 6 m
        // (2 + 3.4 + 2 s: pi / (3.5 / 6) - 2 = 3.39 s on the 0.1 s grid), 3 s back, 109.8 s down, 3 s out:
        // 340.6 s.
        assertThat(Math.toDegrees(s.route().garage().helixGradeRad())).isCloseTo(2.2785, within(1e-4));
        assertThat(g.durationS()).isCloseTo(340.6, within(1e-6));

        double topUp = Double.NEGATIVE_INFINITY;
        double parkedS = 0.0;
        double parkedUp = Double.NaN;
        for (ReferencePoint r : d.samplesOf(ReferencePoint.class)) {
            Truth tr = d.truthAt(r.t());
            Enu p = d.frame().toEnu(r.latDeg(), r.lonDeg(), r.altM());
            assertThat(p.upM()).isCloseTo(tr.upM(), within(1e-6));
            if (g.contains(r.t())) {
                topUp = Math.max(topUp, p.upM());
                if (tr.speedMps() == 0.0 && tr.upM() > 1.0) {
                    parkedS += 0.1;
                    parkedUp = tr.upM();
                }
            } else {
                // Outside the garage the road is level (no hills in this preset).
                assertThat(p.upM()).isCloseTo(0.0, within(1e-6));
            }
        }
        // Five storeys of 3 m; the helix's 0.1 s grid leaves 3.5 m/s * sin(gamma) * 0.05 s = 7 mm at most.
        assertThat(topUp).isCloseTo(15.0, within(0.01));
        assertThat(parkedUp).isCloseTo(15.0, within(0.01));
        // Parked 90 s at the top (plus the pause after backing out of the bay).
        assertThat(parkedS).isBetween(90.0, 94.0);

        // The climb turns about five full circles, one per storey: the helix's constant part turns
        // H / (R tan gamma) = 2 pi * 5 less the ramps' half-rates, and the gyro, pitched, reads cos(gamma)
        // of each turn.
        List<YawRate> gyro = d.samplesOf(YawRate.class);
        double climbTurnRad = 0.0;
        double gyroRad = 0.0;
        for (int k = 1; k < gyro.size(); k++) {
            double t = gyro.get(k).t();
            Truth tr = d.truthAt(t);
            if (g.contains(t) && tr.gradeRad() > 0.0) {
                climbTurnRad += Math.abs(tr.yawRateRadPerS()) * 0.01;
                gyroRad += Math.abs(gyro.get(k).yawRateRadPerS()) * 0.01;
            }
        }
        assertThat(Math.toDegrees(climbTurnRad)).isCloseTo(5 * 360.0, within(10.0));
        assertThat(gyroRad / climbTurnRad).isCloseTo(Math.cos(s.route().garage().helixGradeRad()), within(1e-4));
        // With the default receiver, the first fixes after the exit carry multipath, as after a tunnel.
        SimulatedDrive real = DriveSimulator.simulate(s.withGnss(GnssSettings.defaults()), 23L);
        assertThat(real.faults()).filteredOn(f -> f.t() >= g.endT() && f.t() < g.endT() + 2.0)
                .hasSize(10).allSatisfy(f -> assertThat(f.kind()).isEqualTo(GnssFault.Kind.EXIT_MULTIPATH));
    }
}
