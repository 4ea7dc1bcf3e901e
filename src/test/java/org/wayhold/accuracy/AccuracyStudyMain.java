package org.wayhold.accuracy;

import java.util.Locale;
import org.wayhold.settings.Settings;

/** Prints the accuracy figures, for tuning by hand: {@code AccuracyStudyMain [drives] [minutes] [seed]}. */
public final class AccuracyStudyMain {
    private AccuracyStudyMain() {
    }

    public static void main(String[] args) {
        int drives = args.length > 0 ? Integer.parseInt(args[0]) : 15;
        double minutes = args.length > 1 ? Double.parseDouble(args[1]) : 20;
        long seed = args.length > 2 ? Long.parseLong(args[2]) : 1000;
        long t0 = System.nanoTime();
        AccuracyStudy.Figures f = AccuracyStudy.run(args.length > 3 ? org.wayhold.config.ConfigLoader.load(java.nio.file.Path.of(args[3])) : Settings.defaults(), drives, minutes, seed);
        System.out.printf(Locale.ROOT, "open-sky RMS %.3f m, raw fixes RMS %.3f m, ratio %.2f%n", f.openSkyRmsM(),
                f.rawFixRmsM(), f.openSkyRmsM() / f.rawFixRmsM());
        System.out.printf(Locale.ROOT, "open-sky NEES %.2f%n", f.openSkyNees());
        System.out.printf(Locale.ROOT, "max bias error %.4f deg/s, max scale error %.4f%n", f.maxBiasErrDegPerS(),
                f.maxScaleErr());
        for (AccuracyStudy.LengthFigures l : f.lengths()) {
            System.out.printf(Locale.ROOT,
                    "%5.0f s: n=%d median %.2f m p95 %.2f m median%% %.3f inside95 %.3f NEES %.2f past limit %d warned late %d%n",
                    l.lengthS(), l.count(), l.medianFinalM(), l.p95FinalM(), l.medianPct(), l.inside95(),
                    l.meanNees(), l.pastLimit(), l.warnedLate());
        }
        System.out.printf(Locale.ROOT, "open-sky NEES per drive mean %.2f%n",
                java.util.Arrays.stream(f.openSkyNeesPerDrive()).average().orElse(Double.NaN));
        for (double len : AccuracyStudy.LENGTHS_S) {
            System.out.printf(Locale.ROOT, "final NEES %.0f s: %.2f%n", len, f.firstWindows().stream()
                    .filter(w -> w.window().lengthS() == len).mapToDouble(w -> w.finalNees()).average().orElse(Double.NaN));
        }
        System.out.printf(Locale.ROOT, "%.1f s%n", (System.nanoTime() - t0) / 1e9);
    }
}
