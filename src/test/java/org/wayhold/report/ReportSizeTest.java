package org.wayhold.report;

import static org.assertj.core.api.Assertions.assertThat;

import java.nio.charset.StandardCharsets;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.Sample;
import org.wayhold.scoring.ScoringRun;
import org.wayhold.scoring.WindowPlan;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulationSettings;

/**
 * The report of two one-hour drives with the command's default schedule (10, 30 and 60 s windows every
 * 120 s) stays under 3 MB of HTML, so that it opens quickly and can be mailed: plotted lines are
 * simplified to what the pixels can show. The bound is the project's own requirement; before lines
 * were simplified the same report was 3.3 MB.
 */
class ReportSizeTest {

    private static final int LIMIT_BYTES = 3 * 1024 * 1024;

    @Test
    void twoOneHourLogsGiveAnHtmlReportUnderThreeMegabytes() {
        List<ScoringRun.LogSource> sources = new java.util.ArrayList<>();
        for (long seed : new long[] {7L, 8L}) {
            List<Sample> samples = DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(60)
                    .withTunnelsS(40, 90), seed).samples();
            String name = "hour-" + seed;
            sources.add(new ScoringRun.LogSource() {
                @Override
                public String name() {
                    return name;
                }

                @Override
                public ScoringRun.LoadedLog load() {
                    return new ScoringRun.LoadedLog(name, samples, List.of());
                }
            });
        }
        List<ScoringRun.NamedSettings> configs = List.of(new ScoringRun.NamedSettings("default", "built-in defaults",
                Settings.defaults()));
        ScoringRun.Options o = new ScoringRun.Options(new WindowPlan.Schedule(new double[] {10, 30, 60}, 0, 120, 0, 0),
                60, 0.1, "default", true, 2);
        ReportModel m = ReportModel.of(ScoringRun.run(sources, configs, o, ScoringRun.Listener.NONE), configs, o,
                ReportTest.RUN);
        assertThat(m.simulatedRows()).as("windows scored").isGreaterThan(50);
        byte[] html = HtmlReport.html(m).getBytes(StandardCharsets.UTF_8);
        assertThat(html.length).isLessThan(LIMIT_BYTES);
        // Every plot is still there: drift, the forward drift and the smoothed gap fill per length and for
        // the real gaps, one track per log.
        assertThat(new String(html, StandardCharsets.UTF_8).split("<svg", -1).length - 1)
                .isEqualTo(1 + 2 * (3 + 1) + 2);
    }
}
