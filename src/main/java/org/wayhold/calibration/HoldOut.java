package org.wayhold.calibration;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import org.wayhold.sample.FixType;
import org.wayhold.sample.GnssFix;
import org.wayhold.scoring.LengthSummary;
import org.wayhold.scoring.ScoringRun;
import org.wayhold.scoring.WindowPlan;
import org.wayhold.scoring.WindowScore;
import org.wayhold.settings.Settings;

/**
 * Drift and honesty on drives the fit did not see, with the configured settings next to the calibrated
 * ones: {@code score}'s own machinery ({@link ScoringRun}) on the held-out parts, both configurations on
 * the same windows.
 */
public final class HoldOut {

    /** A held-out part needs this many fixes to be scored (count). */
    private static final int MIN_FIXES = 50;

    private HoldOut() {
    }

    /**
     * How to score.
     *
     * @param lengthsS  outage lengths (s)
     * @param everyS    one window of each length every this many seconds (whole s)
     * @param minAidedS aided time before a window may start (s)
     */
    public record Plan(double[] lengthsS, double everyS, double minAidedS) {
    }

    /**
     * One outage length, both configurations.
     *
     * @param lengthS    outage length (s)
     * @param configured the configured settings' summary
     * @param calibrated the calibrated settings' summary
     */
    public record Row(double lengthS, LengthSummary configured, LengthSummary calibrated) {
    }

    /**
     * @param rows   per outage length
     * @param scored held-out parts scored (count)
     * @param notes  parts that could not be scored, and why
     */
    public record Result(List<Row> rows, int scored, List<String> notes) {
    }

    /**
     * Scores the held-out parts.
     *
     * @param held       the parts the fit did not see
     * @param configured the configuration the fit started from
     * @param calibrated the calibrated configuration
     * @param vehicle    the vehicle profile's name
     */
    public static Result score(List<CalibrationDrive> held, Settings configured, Settings calibrated, String vehicle,
                               Plan plan) {
        List<String> notes = new ArrayList<>();
        List<ScoringRun.LogSource> sources = new ArrayList<>();
        for (CalibrationDrive d : held) {
            long fixes = d.samples().stream().filter(s -> s instanceof GnssFix f && f.fix() != FixType.NONE).count();
            if (fixes < MIN_FIXES) {
                notes.add(String.format(Locale.ROOT, "%s: held-out part not scored, %d fixes (at least %d needed)",
                        d.name(), fixes, MIN_FIXES));
                continue;
            }
            sources.add(new ScoringRun.LogSource() {
                @Override
                public String name() {
                    return d.name();
                }

                @Override
                public ScoringRun.LoadedLog load() {
                    return new ScoringRun.LoadedLog(d.name(), d.samples(), List.of());
                }
            });
        }
        List<Row> rows = new ArrayList<>();
        if (sources.isEmpty()) {
            return new Result(rows, 0, notes);
        }
        ScoringRun.Options options = new ScoringRun.Options(new WindowPlan.Schedule(plan.lengthsS(), 0.0,
                plan.everyS(), 0, 1L), plan.minAidedS(), 0.1, vehicle, false, 1);
        List<ScoringRun.LogScores> scores = ScoringRun.run(sources, List.of(
                new ScoringRun.NamedSettings("configured", "the configuration calibrated from", configured),
                new ScoringRun.NamedSettings("calibrated", "the calibrated profile", calibrated)), options,
                ScoringRun.Listener.NONE);
        List<WindowScore> before = new ArrayList<>();
        List<WindowScore> after = new ArrayList<>();
        for (ScoringRun.LogScores log : scores) {
            before.addAll(log.configs().get(0).windows());
            after.addAll(log.configs().get(1).windows());
        }
        for (double len : plan.lengthsS()) {
            rows.add(new Row(len, LengthSummary.of(len, before.stream().filter(w -> w.window().lengthS() == len)
                    .toList()), LengthSummary.of(len, after.stream().filter(w -> w.window().lengthS() == len).toList())));
        }
        return new Result(rows, sources.size(), notes);
    }
}
