package org.wayhold.config;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.dataformat.yaml.YAMLMapper;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.function.Function;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.wayhold.sample.FixType;
import org.wayhold.settings.FilterSettings;
import org.wayhold.settings.IngestSettings;
import org.wayhold.settings.JournalSettings;
import org.wayhold.settings.WorkerSettings;
import org.wayhold.settings.ServerSettings;
import org.wayhold.settings.Settings;
import org.wayhold.settings.VehicleProfile;

/**
 * The YAML configuration. Expected values are exact: either the built-in defaults of the settings records
 * or values typed into the YAML of the test itself.
 */
class ConfigLoaderTest {

    private static final Path SHIPPED = Path.of("config", "wayhold.yaml");
    private static final Function<String, String> NO_ENV = name -> null;

    @TempDir
    Path dir;

    private static Settings parse(String yaml) {
        return ConfigLoader.parse(yaml, "test.yaml", NO_ENV);
    }

    private static String errorOf(String yaml) {
        try {
            parse(yaml);
        } catch (ConfigException e) {
            return e.getMessage();
        }
        throw new AssertionError("expected a ConfigException for:\n" + yaml);
    }

    @Test
    void theShippedFileEqualsTheBuiltInDefaultsExactly() {
        // Record equality compares doubles with Double.compare: every digit in the file must match.
        assertThat(ConfigLoader.load(SHIPPED, NO_ENV)).isEqualTo(Settings.defaults());
    }

    @Test
    void theShippedFileListsEveryKeyTheLoaderKnowsAndNoOther() throws IOException {
        JsonNode root = new YAMLMapper().readTree(Files.readString(SHIPPED));
        List<String> inFile = new ArrayList<>();
        flatten("", root, inFile);
        List<String> written = inFile.stream()
                .map(k -> k.replace("vehicles.default.", "vehicles.*."))
                .toList();
        assertThat(written).containsExactlyInAnyOrderElementsOf(ConfigLoader.knownKeys());
        assertThat(ConfigLoader.knownKeys()).contains(
                "filter.gyro_bias_random_walk_rad_per_s_per_sqrt_s", "filter.gnss_fix_scale.rtk_fixed",
                "gating.chi_square_probability", "outage.gap_s", "outage.alert_limit_m", "ordering.max_lag_s",
                "history.max_poses", "server.write_tokens", "vehicles.*.lever_arm_up_m");
    }

    private static void flatten(String prefix, JsonNode node, List<String> out) {
        for (Map.Entry<String, JsonNode> e : node.properties()) {
            String path = prefix.isEmpty() ? e.getKey() : prefix + "." + e.getKey();
            if (e.getValue().isObject()) {
                flatten(path, e.getValue(), out);
            } else {
                out.add(path);
            }
        }
    }

    @Test
    void anEmptyFileAndEmptySectionsGiveTheDefaults() {
        assertThat(parse("")).isEqualTo(Settings.defaults());
        assertThat(parse("# nothing set\n")).isEqualTo(Settings.defaults());
        assertThat(parse("filter:\nserver:\n")).isEqualTo(Settings.defaults());
    }

    @Test
    void everyKeyReachesItsOwnField() {
        Settings s = parse("""
                server:
                  port: 9001
                  bind: 0.0.0.0
                  write_tokens: [w1, w2]
                  read_tokens: [r1]
                  max_body_bytes: 5000000000
                  max_line_bytes: 8192
                  max_samples_per_request: 5000
                  max_sessions: 12
                  max_vehicle_id_chars: 40
                  max_samples_per_second_per_vehicle: 250.5
                  rate_burst_s: 3.5
                  cors_origins: ["https://example.org"]
                  sse_keep_alive_s: 7.5
                  idle_timeout_s: 12.5
                  min_body_bytes_per_s: 333
                  drain_timeout_s: 0.75
                  max_concurrent_uploads: 7
                  max_streams: 9
                filter:
                  wheel_speed_noise_mps: 0.011
                  wheel_speed_rate_hz: 12.0
                  gyro_noise_rad_per_s: 0.013
                  gyro_rate_hz: 14.0
                  gyro_bias_random_walk_rad_per_s_per_sqrt_s: 1.5e-6
                  speed_scale_random_walk_per_sqrt_s: 1.6e-6
                  initial_yaw_sigma_rad: 0.017
                  initial_gyro_bias_sigma_rad_per_s: 0.018
                  initial_speed_scale_sigma: 0.019
                  gnss_floor_m: 0.21
                  gnss_range_error_m: 2.2
                  gnss_default_sigma_m: 2.3
                  gnss_fix_scale: {none: 11.0, 2d: 2.5, 3d: 1.25, dgnss: 0.75, rtk_float: 0.35, rtk_fixed: 0.15}
                  gnss_correlated_share: 0.24
                  gnss_correlation_time_s: 25.0
                  gnss_velocity_min_speed_mps: 2.6
                  gnss_speed_sigma_mps: 0.27
                  gnss_course_sigma_deg: 2.8
                  standstill_after_s: 2.9
                  heading_init_min_distance_m: 3.1
                gating:
                  chi_square_probability: 0.99
                  reacquire_fixes: 4
                outage:
                  gap_s: 2.5
                  alert_limit_m: 20.0
                ordering:
                  max_lag_s: 0.5
                  max_forward_jump_s: 60.0
                history:
                  interval_s: 0.1
                  max_poses: 500
                vehicles:
                  van_3:
                    lever_arm_forward_m: 1.25
                    lever_arm_left_m: -0.5
                    lever_arm_up_m: 1.75
                """);
        assertThat(s.server()).isEqualTo(new ServerSettings(9001, "0.0.0.0", List.of("w1", "w2"), List.of("r1"),
                5_000_000_000L, 8192, 5000, 12, 40, 250.5, 3.5, List.of("https://example.org"), 7.5, 12.5, 333, 0.75,
                7, 9));
        assertThat(s.filter()).isEqualTo(new FilterSettings(0.011, 12.0, 0.013, 14.0, 1.5e-6, 1.6e-6, 0.017, 0.018,
                0.019, 0.21, 2.2, 2.3,
                Map.of(FixType.NONE, 11.0, FixType.TWO_D, 2.5, FixType.THREE_D, 1.25, FixType.DGNSS, 0.75,
                        FixType.RTK_FLOAT, 0.35, FixType.RTK_FIXED, 0.15),
                0.24, 25.0, 2.6, 0.27, 2.8, 2.9, 3.1, 0.02, 1.0e-5, 0.01, 0.005, 0.3, 4.5, 0.5, 0.006));
        assertThat(s.gating().chiSquareProbability()).isEqualTo(0.99);
        assertThat(s.gating().reacquireFixes()).isEqualTo(4);
        assertThat(s.outage().gapS()).isEqualTo(2.5);
        assertThat(s.outage().alertLimitM()).isEqualTo(20.0);
        assertThat(s.ordering().maxLagS()).isEqualTo(0.5);
        assertThat(s.ordering().maxForwardJumpS()).isEqualTo(60.0);
        assertThat(s.history().intervalS()).isEqualTo(0.1);
        assertThat(s.history().maxPoses()).isEqualTo(500);
        assertThat(s.profileFor("van_3")).isEqualTo(new VehicleProfile(1.25, -0.5, 1.75));
        assertThat(s.profileFor("car_9")).isEqualTo(VehicleProfile.defaults());
    }

    @Test
    void everyIngestKeyReachesItsOwnField() {
        Settings s = parse("""
                ingest:
                  max_t_s: 2.5e9
                  max_wheel_speed_mps: 90.5
                  max_yaw_rate_rad_per_s: 3.25
                  min_alt_m: -50.0
                  max_alt_m: 9000.0
                  max_sigma_m: 400.0
                  max_hdop: 50.5
                  max_sats: 99
                  max_gnss_speed_mps: 80.25
                  max_listed_rejections: 17
                  idempotency_keys_per_vehicle: 5
                  idempotency_ttl_s: 60.0
                  idempotency_max_bytes: 4096
                """);
        assertThat(s.ingest()).isEqualTo(new IngestSettings(2.5e9, 90.5, 3.25, -50.0, 9000.0, 400.0, 50.5, 99, 80.25,
                17, 5, 60.0, 4096));
    }

    @Test
    void aRefusedValueIsReportedAtTheKeyTheSettingsRecordNames() {
        // The key comes from the exception's own field, not from its text: the section's path is not it.
        assertThat(errorOf("ingest:\n  min_alt_m: 10.0\n  max_alt_m: 5.0\n"))
                .startsWith("ingest.max_alt_m: the upper bound 5.0 m is below the lower bound 10.0 m");
        assertThat(errorOf("vehicles:\n  van_9:\n    lever_arm_up_m: 1e999\n"))
                .startsWith("vehicles.van_9.lever_arm_up_m: must be a finite number");
    }

    @Test
    void everyWorkerKeyReachesItsOwnField() {
        Settings s = parse("""
                worker:
                  application_id: fleet-b
                  samples_topic: b.samples
                  poses_topic: b.poses
                  events_topic: b.events
                  dead_letter_topic: b.rejected
                  partitions: 6
                  replication_factor: 1
                  create_topics: false
                  retention_s: 3600.0
                  threads: 2
                  standby_replicas: 1
                  commit_interval_s: 0.5
                  session_timeout_s: 6.0
                """);
        assertThat(s.worker()).isEqualTo(new WorkerSettings("fleet-b", "b.samples", "b.poses", "b.events",
                "b.rejected", 6, 1, false, 3600.0, 2, 1, 0.5, 6.0));
    }

    @ParameterizedTest
    @CsvSource(delimiter = '|', value = {
        "'worker:\n  poses_topic: wayhold.samples\n' | worker.poses_topic: the samples, poses, events and dead-letter topics must be four different topics, 'wayhold.samples' is named twice",
        "'worker:\n  samples_topic: a b\n'           | worker.samples_topic: must be 1 to 249 letters, digits, '.', '_' or '-' (a Kafka name), was 'a b'",
        "'worker:\n  partitions: 0\n'                | worker.partitions: must be at least 1, was 0",
        "'worker:\n  session_timeout_s: 0\n'         | worker.session_timeout_s: must be a positive finite number, was 0.0"})
    void aBadWorkerValueIsNamedWithItsKey(String yaml, String message) {
        assertThat(errorOf(yaml)).isEqualTo(message + " (in test.yaml)");
    }

    @Test
    void everyJournalKeyReachesItsOwnField() {
        Settings s = parse("""
                journal:
                  fsync: false
                  group_commit_max_s: 0.005
                  segment_bytes: 1048576
                  retention_age_s: 3600.0
                  retention_bytes: 8388608
                  snapshot_interval_s: 30.0
                """);
        assertThat(s.journal()).isEqualTo(new JournalSettings(false, 0.005, 1_048_576, 3600.0, 8_388_608, 30.0));
        assertThat(parse("journal:\n  snapshot_interval_s: 10.0\n").journal().segmentBytes())
                .isEqualTo(JournalSettings.defaults().segmentBytes());
    }

    @ParameterizedTest
    @CsvSource(delimiter = '|', value = {
        "'journal:\n  fsync: 1\n'                     | journal.fsync: must be true or false, was 1",
        "'journal:\n  fsync: sometimes\n'             | journal.fsync: must be true or false, was 'sometimes'",
        "'journal:\n  segment_bytes: 100\n'           | journal.segment_bytes: must be at least 4096 bytes, was 100 bytes",
        "'journal:\n  group_commit_max_s: -0.1\n'     | journal.group_commit_max_s: must be a finite number >= 0, was -0.1",
        "'journal:\n  snapshot_interval_s: 0\n'       | journal.snapshot_interval_s: must be a positive finite number, was 0.0",
        "'journal:\n  retention_bytes: 4096\n'        | journal.retention_bytes: must be at least journal.segment_bytes (67108864 bytes), was 4096 bytes"})
    void aBadJournalValueIsNamedWithItsKey(String yaml, String message) {
        assertThat(errorOf(yaml)).isEqualTo(message + " (in test.yaml)");
    }

    @Test
    void aPartlyGivenSectionKeepsTheDefaultsOfTheRest() {
        Settings s = parse("filter:\n  gnss_floor_m: 0.5\n  gnss_fix_scale:\n    2d: 3.0\n");
        FilterSettings d = FilterSettings.defaults();
        assertThat(s.filter().gnssFloorM()).isEqualTo(0.5);
        assertThat(s.filter().fixScale(FixType.TWO_D)).isEqualTo(3.0);
        assertThat(s.filter().fixScale(FixType.NONE)).isEqualTo(d.fixScale(FixType.NONE));
        assertThat(s.filter().wheelSpeedNoiseMps()).isEqualTo(d.wheelSpeedNoiseMps());
        assertThat(s.server()).isEqualTo(ServerSettings.defaults());
    }

    @Test
    void anUnknownKeyIsNamedWithItsFullPathAndTheLikelyMeaning() {
        assertThat(errorOf("filter:\n  gnss_flor_m: 0.5\n"))
                .isEqualTo("filter.gnss_flor_m: unknown key, did you mean filter.gnss_floor_m? (in test.yaml)");
        assertThat(errorOf("outage:\n  colour: blue\n")).isEqualTo("outage.colour: unknown key (in test.yaml)");
        assertThat(errorOf("filters:\n  gnss_floor_m: 0.5\n")).startsWith("filters: unknown key, did you mean filter?");
        assertThat(errorOf("vehicles:\n  van_3:\n    lever_arm_fwd_m: 1\n"))
                .startsWith("vehicles.van_3.lever_arm_fwd_m: unknown key");
    }

    @Test
    void anUnknownKeyIsReportedBeforeABadValue() {
        assertThat(errorOf("outage:\n  gap_s: -1\n  alert_limt_m: 5\n")).startsWith("outage.alert_limt_m: unknown key");
    }

    @ParameterizedTest
    @CsvSource(delimiter = '|', value = {
        "'filter:\n  gnss_floor_m: abc\n'         | filter.gnss_floor_m: must be a number, was 'abc'",
        "'filter:\n  gnss_floor_m: [1, 2]\n'      | filter.gnss_floor_m: must be a number, was a list",
        "'filter:\n  gnss_floor_m:\n'             | filter.gnss_floor_m: must have a value, was empty",
        "'server:\n  port: 8470.5\n'              | server.port: must be a whole number, was 8470.5",
        "'server:\n  port: 99999999999\n'         | server.port: must be a whole number, was 99999999999",
        "'server:\n  bind: {a: 1}\n'              | server.bind: must be text, was a mapping",
        "'server:\n  write_tokens: secret\n'      | server.write_tokens: must be a list of text, was 'secret'",
        "'server:\n  read_tokens: [a, 5]\n'       | server.read_tokens: must be a list of text, has an item that, was 5",
        "'gating: 0.99\n'                         | gating: must be a mapping, was 0.99",
        "'filter:\n  gnss_fix_scale: 2\n'         | filter.gnss_fix_scale: must be a mapping, was 2",
        "'vehicles:\n  van_3: 1.5\n'              | vehicles.van_3: must be a mapping, was 1.5"})
    void aValueOfTheWrongTypeIsNamedWithItsKey(String yaml, String message) {
        assertThat(errorOf(yaml)).isEqualTo(message + " (in test.yaml)");
    }

    @ParameterizedTest
    @CsvSource(delimiter = '|', value = {
        "'filter:\n  gnss_floor_m: -1\n'                | filter.gnss_floor_m: must be a positive finite number, was -1.0",
        "'server:\n  port: 70000\n'                     | server.port: must be 0..65535, was 70000",
        "'gating:\n  chi_square_probability: 1.5\n'     | gating.chi_square_probability: must lie strictly between 0 and 1, was 1.5",
        "'history:\n  max_poses: 0\n'                   | history.max_poses: must be at least 1, was 0",
        "'server:\n  max_vehicle_id_chars: 256\n'       | server.max_vehicle_id_chars: must be at most 255 characters, was 256",
        "'server:\n  rate_burst_s: 0\n'                 | server.rate_burst_s: must be a positive finite number, was 0.0",
        "'filter:\n  gnss_fix_scale:\n    2d: -1\n'     | filter.gnss_fix_scale.2d: must be a positive finite number, was -1.0"})
    void aValueOutOfRangeIsNamedWithItsKey(String yaml, String message) {
        assertThat(errorOf(yaml)).isEqualTo(message + " (in test.yaml)");
    }

    @Test
    void anUnknownFixTypeNameIsNamedWithItsKey() {
        assertThat(errorOf("filter:\n  gnss_fix_scale:\n    4d: 1.0\n")).isEqualTo(
                "filter.gnss_fix_scale.4d: unknown fix type, expected one of none, 2d, 3d, dgnss, rtk_float, rtk_fixed"
                        + " (in test.yaml)");
    }

    @Test
    void theErrorCarriesTheKeyAndTheSource() {
        assertThatThrownBy(() -> ConfigLoader.parse("outage:\n  gap_s: 0\n", "site.yaml", NO_ENV))
                .isInstanceOfSatisfying(ConfigException.class, e -> {
                    assertThat(e.key()).contains("outage.gap_s");
                    assertThat(e.source()).isEqualTo("site.yaml");
                });
    }

    @Test
    void aDuplicateKeyMalformedYamlAndANonMappingTopLevelAreRejected() {
        assertThat(errorOf("server:\n  port: 1\n  port: 2\n"))
                .isEqualTo("server.port: given twice in the same mapping (lines 2 and 3) (in test.yaml)");
        assertThat(errorOf("filter:\n  gnss_floor_m: 0.3\nfilter:\n  gnss_floor_m: 0.4\n"))
                .isEqualTo("filter: given twice in the same mapping (lines 1 and 3) (in test.yaml)");
        assertThat(errorOf("vehicles:\n  van_3:\n    lever_arm_up_m: 1\n    lever_arm_up_m: 2\n"))
                .startsWith("vehicles.van_3.lever_arm_up_m: given twice");
        // The same name in two different mappings is no duplicate.
        assertThat(parse("vehicles:\n  a:\n    lever_arm_up_m: 1\n  b:\n    lever_arm_up_m: 2\n")
                .profileFor("b").leverArmUpM()).isEqualTo(2.0);
        assertThat(errorOf("server:\n  port: [1\n")).startsWith("test.yaml: not valid YAML at line");
        assertThat(errorOf("- server\n- filter\n")).startsWith("test.yaml: the top level must be a mapping");
    }

    @Test
    void tokensFromTheEnvironmentReplaceTheFilesTokens() {
        Map<String, String> env = Map.of("WAYHOLD_WRITE_TOKENS", " alpha, beta ,,", "WAYHOLD_READ_TOKENS", "gamma");
        Settings s = ConfigLoader.parse("server:\n  write_tokens: [from_file]\n", "test.yaml", env::get);
        assertThat(s.server().writeTokens()).containsExactly("alpha", "beta");
        assertThat(s.server().readTokens()).containsExactly("gamma");
    }

    @Test
    void aTokenThatCouldNotBeSentInAHeaderIsRefusedWithoutBeingShown() {
        String message = errorOf("server:\n  write_tokens: [fine-token, \"two words\"]\n");
        assertThat(message).startsWith("server.write_tokens: item 2 must be a bearer token").doesNotContain("two words");
    }

    @Test
    void theSettingsTextShowsHowManyTokensThereAreButNeverATokenItself() {
        Settings s = ConfigLoader.parse("", "test.yaml",
                Map.of("WAYHOLD_WRITE_TOKENS", "w-secret-1,w-secret-2", "WAYHOLD_READ_TOKENS", "r-secret")::get);
        assertThat(s.toString()).doesNotContain("secret").contains("writeTokens=2 redacted", "readTokens=1 redacted");
    }

    @Test
    void aBlankEnvironmentVariableDoesNotClearTheFilesTokens() {
        Map<String, String> env = Map.of("WAYHOLD_WRITE_TOKENS", "  ");
        Settings s = ConfigLoader.parse("server:\n  write_tokens: [from_file]\n", "test.yaml", env::get);
        assertThat(s.server().writeTokens()).containsExactly("from_file");
    }

    /**
     * Rule: a token variable that is set but holds no token fails closed. {@code WAYHOLD_WRITE_TOKENS=","}
     * once read as "no tokens" and opened writes to anyone; it must stop start-up with a message.
     */
    @ParameterizedTest
    @CsvSource(delimiter = '|', value = {"WAYHOLD_WRITE_TOKENS|,|server.write_tokens",
        "WAYHOLD_WRITE_TOKENS| , ,, |server.write_tokens", "WAYHOLD_READ_TOKENS|,|server.read_tokens"})
    void aTokenVariableThatHoldsNoTokenRefusesStartUp(String variable, String value, String key) {
        Map<String, String> env = Map.of(variable, value);
        assertThatThrownBy(() -> ConfigLoader.parse("server:\n  write_tokens: [from_file_0123456789]\n", "test.yaml",
                env::get))
                .isInstanceOf(ConfigException.class)
                .hasMessageStartingWith(key + ": the environment variable " + variable + " is set but holds no token")
                .satisfies(e -> assertThat(((ConfigException) e).key()).contains(key));
    }

    @Test
    void loadOrDefaultsUsesTheFileWhenPresentAndTheDefaultsOtherwise() throws IOException {
        Path file = dir.resolve("site.yaml");
        assertThat(ConfigLoader.loadOrDefaults(file, NO_ENV)).isEqualTo(Settings.defaults());
        assertThat(ConfigLoader.loadOrDefaults(file, Map.of("WAYHOLD_READ_TOKENS", "r")::get).server().readTokens())
                .containsExactly("r");
        Files.writeString(file, "outage:\n  alert_limit_m: 25.0\n");
        assertThat(ConfigLoader.loadOrDefaults(file, NO_ENV).outage().alertLimitM()).isEqualTo(25.0);
    }

    @Test
    void loadingAMissingFileSaysSo() {
        Path missing = dir.resolve("absent.yaml");
        assertThatThrownBy(() -> ConfigLoader.load(missing, NO_ENV))
                .isInstanceOf(ConfigException.class)
                .hasMessage(missing + ": no such file");
    }
}
