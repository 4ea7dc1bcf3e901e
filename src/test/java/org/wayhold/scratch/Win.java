package org.wayhold.scratch;

import java.util.*;
import org.wayhold.accuracy.RealDrives;
import org.wayhold.sample.*;
import org.wayhold.scoring.*;
import org.wayhold.settings.Settings;

public class Win {
    public static void main(String[] a) throws Exception {
        Settings settings = a.length > 1 ? org.wayhold.config.ConfigLoader.load(java.nio.file.Path.of(a[1])) : Settings.defaults();
        List<Sample> samples = RealDrives.read(a[0]);
        var logs = ScoringRun.run(List.of(new ScoringRun.LogSource() {
            public String name() { return a[0]; }
            public ScoringRun.LoadedLog load() { return new ScoringRun.LoadedLog(a[0], samples, List.of()); }
        }), List.of(new ScoringRun.NamedSettings("d", "d", settings)),
            new ScoringRun.Options(new WindowPlan.Schedule(new double[] {60}, 0, 60, 0, 0), 30, 0.1, "default", true, 2), ScoringRun.Listener.NONE);
        for (var w : logs.get(0).configs().get(0).windows()) {
            var tr = logs.get(0).configs().get(0).traces().stream().filter(t -> t.window().equals(w.window())).findFirst().get();
            var last = tr.points().get(tr.points().size() - 1);
            System.out.printf(Locale.ROOT, "start %.0f dist %.0f final %.2f along %.2f cross %.2f r95 %.2f in95 %.2f nees %.2f%n", w.window().startT() - 1.8e9, w.distanceM(), w.finalErrorM(), w.alongTrackErrorM(), w.crossTrackErrorM(), last.radius95M(), w.inside95(), w.meanNees());
        }
    }
}
