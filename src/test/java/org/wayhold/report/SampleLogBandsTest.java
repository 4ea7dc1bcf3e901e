package org.wayhold.report;

import static org.assertj.core.api.Assertions.assertThat;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.wayhold.ingest.NdjsonReader;
import org.wayhold.ingest.ReadResult;
import org.wayhold.sample.Sample;
import org.wayhold.scoring.LengthSummary;
import org.wayhold.scoring.ScoringRun;
import org.wayhold.scoring.WindowPlan;
import org.wayhold.scoring.WindowScore;
import org.wayhold.settings.Settings;

/**
 * The demo drives' scores stay inside the bands written in sample-logs/README.md ("Drift scores"),
 * measured with {@code score LOG --outage 10,30,60 --every 10 --min-aided 30} and the default
 * configuration. A band is half to twice the measured median final error, at least half the measured
 * window count, no window warned late (error past the alert limit before the state turned
 * unreliable) and the reference inside the 95% ellipse at least 90% of the time:
 * wide enough for filter tuning, narrow enough to catch a broken replay or a lost calibration.
 */
class SampleLogBandsTest {

    /** Each log is scored once for all its rows. */
    private static final java.util.Map<String, ScoringRun.LogScores> SCORED = new java.util.HashMap<>();

    private static synchronized ScoringRun.LogScores score(String file) {
        return SCORED.computeIfAbsent(file, SampleLogBandsTest::scoreOnce);
    }

    private static ScoringRun.LogScores scoreOnce(String file) {
        Path p = Path.of("sample-logs", file);
        List<Sample> samples = new ArrayList<>();
        ScoringRun.LogSource src = new ScoringRun.LogSource() {
            @Override
            public String name() {
                return file;
            }

            @Override
            public ScoringRun.LoadedLog load() throws java.io.IOException {
                ReadResult r = NdjsonReader.readFileAll(p);
                if (!r.rejected().isEmpty()) {
                    throw new AssertionError("demo log line rejected: " + r.rejected().get(0));
                }
                samples.addAll(r.samples());
                return new ScoringRun.LoadedLog(file, samples, List.of());
            }
        };
        ScoringRun.Options o = new ScoringRun.Options(new WindowPlan.Schedule(new double[] {10, 30, 60}, 0, 10, 0, 0),
                30, 0.1, "default", false, 2);
        return ScoringRun.run(List.of(src), List.of(new ScoringRun.NamedSettings("default", "defaults",
                Settings.defaults())), o, ScoringRun.Listener.NONE).get(0);
    }

    @ParameterizedTest(name = "{0} {1} s")
    @CsvSource({
        // file, length s, measured windows, measured median final error m
        "open-sky.ndjson.gz, 10, 13, 0.68",
        "open-sky.ndjson.gz, 30, 11, 0.81",
        "open-sky.ndjson.gz, 60, 8, 2.48",
        "two-tunnels.ndjson.gz, 10, 6, 0.51",
        "two-tunnels.ndjson.gz, 30, 4, 1.50",
        "two-tunnels.ndjson.gz, 60, 3, 4.23",
        "urban-canyon.ndjson.gz, 10, 7, 0.37",
        "urban-canyon.ndjson.gz, 30, 7, 0.94",
        "urban-canyon.ndjson.gz, 60, 7, 2.29",
    })
    void simulatedWindowsStayInsideTheirBands(String file, double lengthS, int windows, double medianM) {
        ScoringRun.LogScores log = score(file);
        LengthSummary s = LengthSummary.of(lengthS, log.configs().get(0).windows().stream()
                .filter(w -> w.window().lengthS() == lengthS).toList());
        assertThat(s.count()).isGreaterThanOrEqualTo((windows + 1) / 2);
        assertThat(s.medianFinalErrorM()).isBetween(medianM / 2, medianM * 2);
        assertThat(s.warnedLate()).isZero();
        assertThat(s.inside95()).isGreaterThanOrEqualTo(0.9);
    }

    @ParameterizedTest(name = "two-tunnels gap {0}")
    @CsvSource({
        // gap index, measured length s, measured final error m
        "0, 30.2, 1.09",
        "1, 90.2, 32.60",
    })
    void theTunnelsAreScoredAsRealGapsInsideTheirBands(int index, double lengthS, double finalM) {
        List<WindowScore> gaps = score("two-tunnels.ndjson.gz").configs().get(0).realGaps();
        assertThat(gaps).hasSize(2);
        WindowScore g = gaps.get(index);
        assertThat(g.window().lengthS()).isCloseTo(lengthS, org.assertj.core.data.Offset.offset(0.05));
        assertThat(g.finalErrorM()).isBetween(finalM / 2, finalM * 2);
        assertThat(g.warnedLate()).isFalse();
    }
}
