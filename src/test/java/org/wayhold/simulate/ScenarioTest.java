package org.wayhold.simulate;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

import java.util.Arrays;
import java.util.EnumSet;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;

/** The named presets: what each switches on, that each fits its stated length, and that the defaults stay classic. */
class ScenarioTest {

    @Test
    void theDefaultsSwitchNoRealisticEffectOn() {
        SimulationSettings s = SimulationSettings.defaults();
        assertThat(s.effects()).isEmpty();
        assertThat(s.yawRate().scale().enabled()).isFalse();
        assertThat(s.yawRate().warmUp().enabled()).isFalse();
        assertThat(s.wheelSpeed().teeth().enabled()).isFalse();
        assertThat(s.wheelSpeed().slip().enabled()).isFalse();
        assertThat(s.wheelSpeed().tyreGrowth().enabled()).isFalse();
        assertThat(s.gnss().latency().enabled()).isFalse();
        assertThat(s.gnss().canyonNlos().enabled()).isFalse();
        RouteSettings r = s.route();
        assertThat(List.of(r.hills().enabled(), r.garage().enabled(), r.queues().enabled(), r.launches().enabled(),
                r.longStops().enabled(), r.motorway().enabled())).containsOnly(false);
        // The classic constructors give the same records as the defaults.
        assertThat(new WheelSpeedSettings(50.0, 0.01, 0.05, 0.01)).isEqualTo(s.wheelSpeed());
        assertThat(new YawRateSettings(100.0, 0.2, 0.002, 0.1)).isEqualTo(s.yawRate());
    }

    @Test
    void switchingAnEffectOffAgainGivesTheClassicDriveBitForBit() {
        SimulationSettings classic = SimulationSettings.defaults().withMinutes(4).withCanyonsS(50.0);
        SimulationSettings onThenOff = classic
                .withYawRate(classic.yawRate().withScale(GyroScale.off().on().withEnabled(false))
                        .withWarmUp(GyroWarmUp.off().withOffsetDegPerS(1.0).withEnabled(false)))
                .withGnss(classic.gnss().withLatency(GnssLatency.off().on().withEnabled(false))
                        .withCanyonNlos(CanyonNlos.off().on().withEnabled(false)))
                .withWheelSpeed(classic.wheelSpeed().withTeeth(ToothCounting.off().on().withEnabled(false)));
        assertThat(DriveSimulator.simulate(onThenOff, 3L).samples())
                .isEqualTo(DriveSimulator.simulate(classic, 3L).samples());
    }

    @Test
    void everyPresetSwitchesSomethingOnAndFitsItsStatedLength() {
        for (Scenario sc : Scenario.values()) {
            SimulationSettings s = sc.applyTo(SimulationSettings.defaults().withMinutes(sc.minMinutes()));
            assertThat(s.effects()).as(sc.label()).isNotEmpty();
            for (long seed = 1; seed <= 3; seed++) {
                SimulatedDrive d = DriveSimulator.simulate(s, seed);
                assertThat(d.durationS()).isEqualTo(60.0 * sc.minMinutes());
                // Every knot stays on the planner's 0.1 s grid, so the 50 Hz wheel readings integrate the
                // true speed exactly; every sample is in time order.
                assertThat(Arrays.stream(d.route().knotTicks()).allMatch(k -> k % 10 == 0)).as(sc.label()).isTrue();
                double previous = Double.NEGATIVE_INFINITY;
                for (Sample x : d.samples()) {
                    assertThat(x.t()).isGreaterThanOrEqualTo(previous);
                    previous = x.t();
                }
            }
            if (sc.minMinutes() > 1) {
                // A minute less is refused with the needed length.
                SimulationSettings shorter = sc.applyTo(SimulationSettings.defaults().withMinutes(sc.minMinutes() - 1));
                assertThatThrownBy(() -> DriveSimulator.simulate(shorter, 1L)).as(sc.label())
                        .hasMessageContaining("need at least");
            }
        }
    }

    @Test
    void theCityPresetMixesCanyonBiasQueuesTeethGyroScaleLatencyAndLeverArm() {
        SimulationSettings s = Scenario.CITY.applyTo(SimulationSettings.defaults().withMinutes(12));
        assertThat(s.gnss().canyonNlos().enabled()).isTrue();
        assertThat(s.route().canyonsS()).isEqualTo(Scenario.DEFAULT_CANYONS_S);
        assertThat(s.route().queues().enabled()).isTrue();
        assertThat(s.wheelSpeed().teeth().enabled()).isTrue();
        assertThat(s.yawRate().scale().enabled()).isTrue();
        assertThat(s.gnss().latency().enabled()).isTrue();
        assertThat(s.gnss().leverArmForwardM()).isEqualTo(-2.0);
        assertThat(s.effects()).hasSize(6);
        SimulatedDrive d = DriveSimulator.simulate(s, 7L);
        assertThat(d.queues()).hasSize(3);
        assertThat(d.canyons()).hasSize(2);
        assertThat(d.faults()).anyMatch(f -> f.kind() == GnssFault.Kind.CANYON_NLOS);
        // Canyons the user asked for are kept.
        SimulationSettings own = Scenario.CITY.applyTo(SimulationSettings.defaults().withMinutes(12).withCanyonsS(40.0));
        assertThat(own.route().canyonsS()).containsExactly(40.0);
    }

    @Test
    void presetsOnlyAddTheirEffectsAndLeaveTheRestAlone() {
        SimulationSettings base = SimulationSettings.defaults().withMinutes(10).withTunnelsS(30.0).withWarmUpS(120.0);
        for (Scenario sc : EnumSet.of(Scenario.GYRO_SCALE, Scenario.LATENCY, Scenario.LEVER_ARM, Scenario.ONE_HERTZ)) {
            SimulationSettings s = sc.applyTo(base);
            assertThat(s.route()).isEqualTo(base.route());
            assertThat(s.wheelSpeed()).isEqualTo(base.wheelSpeed());
        }
        // The gyro preset changes the gyro readings only: wheels, fixes and references stay.
        SimulatedDrive plain = DriveSimulator.simulate(base, 5L);
        SimulatedDrive scaled = DriveSimulator.simulate(Scenario.GYRO_SCALE.applyTo(base), 5L);
        assertThat(scaled.samplesOf(GnssFix.class)).isEqualTo(plain.samplesOf(GnssFix.class));
        assertThat(scaled.samples()).isNotEqualTo(plain.samples());
    }

    @Test
    void presetsAreFoundByTheirLabelsAndAnUnknownOneNamesTheKnownOnes() {
        for (Scenario sc : Scenario.values()) {
            assertThat(Scenario.byLabel(sc.label())).isEqualTo(sc);
            assertThat(sc.summary()).isNotBlank();
        }
        assertThat(Scenario.byLabel("CITY")).isEqualTo(Scenario.CITY);
        assertThatThrownBy(() -> Scenario.byLabel("downtown"))
                .hasMessageContaining("downtown").hasMessageContaining("canyon-bias").hasMessageContaining("city");
    }

    @Test
    void effectSettingsNameTheBadFieldAndItsUnit() {
        assertThatThrownBy(() -> GnssLatency.off().withLatencyS(0.155))
                .hasMessageContaining("gnss.latency.latencyS").hasMessageContaining("0.01 s ticks");
        assertThatThrownBy(() -> WheelSlip.off().withSlipStiffness(2.0))
                .hasMessageContaining("wheelSpeed.slip.slipStiffness");
        assertThatThrownBy(() -> Garage.off().withRadiusM(3.0)).hasMessageContaining("route.garage.radiusM");
        assertThatThrownBy(() -> Queues.off().withCreepMps(0.3, 0.1)).hasMessageContaining("route.queues.maxCreepMps");
        assertThatThrownBy(() -> Motorway.off().withStretchesS(List.of(30.0)))
                .hasMessageContaining("route.motorway.stretchesS[]");
        assertThatThrownBy(() -> CanyonNlos.off().withBiasM(30.0, 5.0)).hasMessageContaining("gnss.canyonNlos.maxBiasM");
        assertThatThrownBy(() -> Hills.off().withMaxGradePct(40.0)).hasMessageContaining("route.hills.maxGradePct");
        assertThatThrownBy(() -> ToothCounting.off().withTeeth(0)).hasMessageContaining("wheelSpeed.teeth.teeth");
        assertThatThrownBy(() -> GyroScale.off().withError(0.7)).hasMessageContaining("yawRate.scale.error");
        assertThatThrownBy(() -> GyroWarmUp.off().withTimeConstantS(0.0)).hasMessageContaining("yawRate.warmUp.timeConstantS");
        assertThatThrownBy(() -> TyreGrowth.off().withGrowth(0.5, 33.0))
                .hasMessageContaining("wheelSpeed.tyreGrowth.growthAtReference");
        assertThatThrownBy(() -> HardLaunches.off().withAccelMps2(12.0)).hasMessageContaining("route.launches.accelMps2");
        assertThatThrownBy(() -> LongStops.off().with(0, 60.0)).hasMessageContaining("route.longStops.count");
    }
}
