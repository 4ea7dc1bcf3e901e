package org.wayhold.scoring;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.Sample;
import org.wayhold.settings.Settings;
import org.wayhold.settings.VehicleProfile;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;

/**
 * Against withheld fixes, scoring compares like with like: a fix is where the antenna was, so the
 * estimate compared with it is the filter's antenna position (its reference point moved by the
 * configured lever arm at its estimated yaw), not its reference point. A drive with the antenna 2 m
 * behind the reference point, configured in the filter, must then score like the same drive (same
 * seed, so the same noise) with the antenna at the reference point. Measured against the reference
 * point the 2 m offset would be counted as error and roughly double the 10 s median.
 */
class WithheldFixLeverArmTest {

    private static final double LEVER_FORWARD_M = -2.0;

    @Test
    void aConfiguredLeverArmDoesNotCountAsErrorAgainstTheWithheldFixes() {
        double withArm = median10s(LEVER_FORWARD_M);
        double without = median10s(0.0);
        // Sampling noise: the two drives differ only in the antenna's place, so the filter's errors differ
        // by how the yaw error moves a 2 m arm (0.035 m per degree): a few centimetres.
        assertThat(withArm).isCloseTo(without, within(0.1));
        assertThat(without).isGreaterThan(0.1);
    }

    /** Median final error of the 10 s windows of a 14-minute drive scored against its withheld fixes (m). */
    private static double median10s(double leverForwardM) {
        SimulationSettings sim = SimulationSettings.defaults().withMinutes(14).withWarmUpS(120);
        sim = sim.withGnss(sim.gnss().withLeverArm(leverForwardM, 0.0, 0.0));
        SimulatedDrive drive = DriveSimulator.simulate(sim, 31L);
        List<Sample> samples = SimulatedLogs.withoutReference(drive.samples());
        Settings d = Settings.defaults();
        Settings settings = new Settings(d.server(), d.filter(), d.gating(), d.outage(), d.ordering(), d.history(),
                Map.of(Settings.DEFAULT_PROFILE, new VehicleProfile(leverForwardM, 0.0, 0.0)));
        ScoringRun.LogScores log = ScoringRun.run(List.of(SimulatedLogs.source("arm", samples)),
                List.of(new ScoringRun.NamedSettings("arm", "test", settings)),
                SimulatedLogs.options(new WindowPlan.Schedule(new double[] {10}, 0, 20, 0, 0), 60, false),
                ScoringRun.Listener.NONE).get(0);
        assertThat(log.reference()).isEqualTo(ScoringRun.ReferenceKind.WITHHELD_FIXES);
        double[] finals = log.configs().get(0).windows().stream().mapToDouble(WindowScore::finalErrorM).toArray();
        assertThat(finals.length).isGreaterThan(10);
        return Quantiles.of(finals, 0.5);
    }
}
