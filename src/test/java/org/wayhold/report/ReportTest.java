package org.wayhold.report;

import static org.assertj.core.api.Assertions.assertThat;

import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import net.sf.geographiclib.Geodesic;
import net.sf.geographiclib.GeodesicData;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.dataformat.yaml.YAMLMapper;
import org.wayhold.config.ConfigLoader;
import org.wayhold.sample.Sample;
import org.wayhold.scoring.ScoringRun;
import org.wayhold.scoring.WindowPlan;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;

class ReportTest {

    /** A fixed run record, so that two reports of the same inputs can be compared byte for byte. */
    static final RunInfo RUN = new RunInfo("0.1.0", "0123456789ab", "wayhold score drive0 --out report",
            "2026-12-05T00:00:00Z");

    private static final List<ScoringRun.NamedSettings> ONE =
            List.of(new ScoringRun.NamedSettings("default", "built-in defaults", Settings.defaults()));

    private static ScoringRun.LogSource source(String name, List<Sample> samples) {
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

    private static ReportModel model(List<SimulatedDrive> drives, List<ScoringRun.NamedSettings> configs,
                                     WindowPlan.Schedule schedule, int threads) {
        List<ScoringRun.LogSource> sources = new java.util.ArrayList<>();
        for (int i = 0; i < drives.size(); i++) {
            sources.add(source("drive" + i, drives.get(i).samples()));
        }
        ScoringRun.Options o = new ScoringRun.Options(schedule, 45, 0.1, "default", true, threads);
        return ReportModel.of(ScoringRun.run(sources, configs, o, ScoringRun.Listener.NONE), configs, o, RUN);
    }

    private static SimulatedDrive drive(long seed) {
        return DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(6).withWarmUpS(120)
                .withTunnelsS(40), seed);
    }

    /**
     * The end positions in the report, turned to latitude and longitude, are as far apart on the
     * ellipsoid as the final error measured in the local frame says. Oracle: GeographicLib-Java 2.0
     * {@code Geodesic.WGS84.Inverse} (Karney, "Algorithms for geodesics", J. Geodesy 87, 2013). Both points
     * are converted at the reference's height (about 310 m here), where a metre in the frame is
     * (R + h) / R of a metre on the ellipsoid, a relative 5e-5; the frame's tilt a few km from its origin
     * adds far less. Tolerance: 0.5 mm plus 1e-4 of the error.
     */
    @Test
    void endPositionsAreAsFarFromTheReferenceAsTheFinalErrorSaysByGeodesic() {
        ReportModel m = model(List.of(drive(31L)), ONE, new WindowPlan.Schedule(new double[] {10, 60}, 0, 20, 0, 0), 2);
        assertThat(m.rows()).hasSizeGreaterThan(10);
        for (OutageRow r : m.rows()) {
            GeodesicData g = Geodesic.WGS84.Inverse(r.refLat(), r.refLon(), r.endLat(), r.endLon());
            assertThat(g.s12).as("row %s", r).isCloseTo(r.finalErrorM(),
                    org.assertj.core.data.Offset.offset(5e-4 + 1e-4 * r.finalErrorM()));
        }
        assertThat(m.rows()).anyMatch(r -> r.kind().equals(OutageRow.REAL_GAP));
    }

    @Test
    void theSameSeedGivesAByteIdenticalJsonReportWhateverTheThreads(@TempDir Path dir) throws Exception {
        WindowPlan.Schedule s = new WindowPlan.Schedule(new double[] {10, 30}, 0, 120, 4, 77L);
        List<SimulatedDrive> drives = List.of(drive(41L), drive(42L));
        JsonReport.write(model(drives, ONE, s, 1), dir.resolve("a.json"));
        JsonReport.write(model(drives, ONE, s, 2), dir.resolve("b.json"));
        JsonReport.write(model(drives, ONE, new WindowPlan.Schedule(new double[] {10, 30}, 0, 120, 4, 78L), 2),
                dir.resolve("c.json"));
        byte[] a = Files.readAllBytes(dir.resolve("a.json"));
        assertThat(a).isEqualTo(Files.readAllBytes(dir.resolve("b.json")));
        assertThat(a).isNotEqualTo(Files.readAllBytes(dir.resolve("c.json")));
    }

    @Test
    void theFilesCarryTheContractFieldsUnitsAndCautionWithNothingFetched(@TempDir Path dir) throws Exception {
        List<ScoringRun.NamedSettings> two = List.of(ONE.get(0), new ScoringRun.NamedSettings("strict", "test",
                new Settings(Settings.defaults().server(), Settings.defaults().filter(),
                        new org.wayhold.settings.GatingSettings(0.99, 4), Settings.defaults().outage(),
                        Settings.defaults().ordering(), Settings.defaults().history(), java.util.Map.of())));
        ReportModel m = model(List.of(drive(51L)), two, new WindowPlan.Schedule(new double[] {10, 30}, 0, 30, 0, 0), 2);
        ReportFiles.write(m, dir);
        String json = Files.readString(dir.resolve(ReportFiles.JSON));
        // The v2 interface contract's names, units in the keys.
        for (String field : List.of("\"outages\"", "\"log\"", "\"start_t\"", "\"length_s\"", "\"distance_m\"",
                "\"final_error_m\"", "\"max_error_m\"", "\"error_pct\"", "\"inside95\"", "\"mean_nees\"",
                "\"end_lat\"", "\"end_lon\"", "\"time_to_limit_s\"", "\"time_to_unreliable_s\"", "\"warned_late\"",
                "\"summary\"", "\"count\"", "\"median_final_error_m\"", "\"p95_final_error_m\"",
                "\"median_error_pct\"", "\"config\"", "\"comparison\"", "\"difference\"")) {
            assertThat(json).contains(field);
        }
        for (String old : List.of("\"start\"", "\"seconds\"", "\"meters\"", "\"final_error\"", "\"time_to_alert\"",
                "\"time_to_unreliable\"", "\"missed_alert\"", "\"missed_alerts\"")) {
            assertThat(json).doesNotContain(old);
        }
        assertThat(json).contains("\"reference\" : \"reference\"");
        List<String> csv = Files.readAllLines(dir.resolve(ReportFiles.CSV), StandardCharsets.UTF_8);
        assertThat(csv.get(0)).isEqualTo(CsvReport.HEADER).contains("final_error_m");
        assertThat(csv).hasSize(m.rows().size() + 1);
        // Both configurations scored every window: each simulated window appears once per configuration.
        assertThat(m.rows().stream().filter(r -> r.config().equals("strict")).count())
                .isEqualTo(m.rows().stream().filter(r -> r.config().equals("default")).count());
        String html = Files.readString(dir.resolve(ReportFiles.HTML));
        assertThat(html).contains(HtmlReport.CAUTION).contains("<svg").contains("Comparison (same windows)");
        assertThat(html).doesNotContain("<script").doesNotContain("src=\"http").doesNotContain("href=\"http")
                .doesNotContain("@import");
    }

    /**
     * Each configuration in report.json is a configuration file: saved as YAML and loaded with the
     * loader, it gives the settings that were scored. Expected values are those settings themselves; the
     * second configuration sets every key away from its default (checked in ConfigRoundTripTest) and
     * carries bearer tokens, which must not reach the report.
     */
    @Test
    void theReportsConfigurationsLoadBackAsTheSettingsThatWereScored(@TempDir Path dir) throws Exception {
        Settings everyKey = ConfigLoader.parse(new String(ReportTest.class
                .getResourceAsStream("/org/wayhold/config/every-key.yaml").readAllBytes(), StandardCharsets.UTF_8),
                "every-key.yaml", name -> null);
        List<ScoringRun.NamedSettings> two = List.of(ONE.get(0), new ScoringRun.NamedSettings("every-key", "test",
                everyKey));
        ReportModel m = model(List.of(drive(61L)), two, new WindowPlan.Schedule(new double[] {10}, 0, 60, 0, 0), 2);
        ReportFiles.write(m, dir);
        String text = Files.readString(dir.resolve(ReportFiles.JSON));
        assertThat(text).doesNotContain("token-0123456789").doesNotContain("_tokens");
        JsonNode configs = new ObjectMapper().readTree(text).get("configs");
        List<Settings> scored = List.of(Settings.defaults(), new Settings(
                everyKey.server().withTokens(List.of(), List.of()), everyKey.filter(), everyKey.gating(),
                everyKey.outage(), everyKey.ordering(), everyKey.history(), everyKey.vehicles(), everyKey.journal(),
                everyKey.ingest(), everyKey.worker()));
        assertThat(configs).hasSize(2);
        for (int i = 0; i < 2; i++) {
            Path yaml = dir.resolve("config-" + i + ".yaml");
            Files.writeString(yaml, new YAMLMapper().writeValueAsString(configs.get(i).get("settings")));
            assertThat(ConfigLoader.load(yaml, name -> null)).as(configs.get(i).get("name").asText())
                    .isEqualTo(scored.get(i));
        }
    }
}
