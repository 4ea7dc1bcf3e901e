package org.wayhold.accuracy;

import java.util.Locale;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.Scenario;

/**
 * Prints {@link EffectStudy} for every preset: {@code EffectStudyMain [seeds] [minutes] [config.yaml]}.
 */
public final class EffectStudyMain {

    private EffectStudyMain() {
    }

    public static void main(String[] args) {
        int seeds = args.length > 0 ? Integer.parseInt(args[0]) : 5;
        double minutes = args.length > 1 ? Double.parseDouble(args[1]) : 15;
        Settings settings = args.length > 2 ? org.wayhold.config.ConfigLoader.load(java.nio.file.Path.of(args[2]))
                : Settings.defaults();
        System.out.printf(Locale.ROOT, "%-13s %6s %8s %8s %8s %5s %4s %8s %6s %6s%n", "preset", "falseC",
                "aidIn95", "canyFar", "win95", "wins", "late", "med60", "rmsF", "rmsRaw");
        Scenario[] all = Scenario.values();
        for (int i = -1; i < all.length; i++) {
            Scenario sc = i < 0 ? null : all[i];
            if (args.length > 3 && (sc == null || !args[3].contains(sc.label()))) {
                continue;
            }
            EffectStudy.Row r = EffectStudy.run(sc, settings, 1, seeds, minutes);
            System.out.printf(Locale.ROOT, "%-13s %6.1f %8.3f %8.3f %8.3f %5d %4d %8.2f %6.2f %6.2f%n", r.label(),
                    r.falseConfidenceS(), r.aidedInside95(), r.canyonAidedFar(), r.windowInside95(), r.windows(),
                    r.warnedLate(), r.median60M(), r.fusedRmsM(), r.rawRmsM());
        }
    }
}
