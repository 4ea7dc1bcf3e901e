package org.wayhold.scoring;

import java.util.List;
import org.wayhold.sample.ReferencePoint;
import org.wayhold.sample.Sample;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;

/** Seeded simulated drives as scoring inputs. */
public final class SimulatedLogs {

    private SimulatedLogs() {
    }

    /** A drive of the given minutes, 120 s of open-sky warm-up, then tunnels of the given seconds. */
    public static SimulatedDrive drive(double minutes, long seed, double... tunnelsS) {
        return DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(minutes).withWarmUpS(120)
                .withTunnelsS(tunnelsS), seed);
    }

    public static ScoringRun.LogSource source(String name, List<Sample> samples) {
        return new ScoringRun.LogSource() {
            @Override
            public String name() {
                return name;
            }

            @Override
            public ScoringRun.LoadedLog load() {
                return new ScoringRun.LoadedLog(name, samples, List.of());
            }
        };
    }

    public static List<Sample> withoutReference(List<Sample> samples) {
        return samples.stream().filter(s -> !(s instanceof ReferencePoint)).toList();
    }

    public static ScoringRun.Options options(WindowPlan.Schedule schedule, double minAidedS, boolean traces) {
        return new ScoringRun.Options(schedule, minAidedS, 0.1, "default", traces, 2);
    }

    public static List<ScoringRun.NamedSettings> defaults() {
        return List.of(new ScoringRun.NamedSettings("default", "built-in defaults", Settings.defaults()));
    }
}
