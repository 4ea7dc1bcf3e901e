package org.wayhold.config;

import com.fasterxml.jackson.core.JacksonException;
import com.fasterxml.jackson.core.JsonLocation;
import com.fasterxml.jackson.databind.DeserializationFeature;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.node.MissingNode;
import com.fasterxml.jackson.dataformat.yaml.YAMLMapper;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.EnumMap;
import java.util.Iterator;
import java.util.LinkedHashMap;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.function.Function;
import org.wayhold.sample.FixType;
import org.wayhold.settings.FilterSettings;
import org.wayhold.settings.GatingSettings;
import org.wayhold.settings.HistorySettings;
import org.wayhold.settings.IngestSettings;
import org.wayhold.settings.JournalSettings;
import org.wayhold.settings.OrderingSettings;
import org.wayhold.settings.OutageSettings;
import org.wayhold.settings.ServerSettings;
import org.wayhold.settings.SettingsException;
import org.wayhold.settings.Settings;
import org.wayhold.settings.VehicleProfile;

/**
 * Reads {@code config/wayhold.yaml} into {@link Settings}.
 *
 * <p>The key table below is the one place that maps YAML keys to record fields: each line names a key,
 * takes its default from the record's {@code defaults()}, and sits at the field's position in the
 * record's constructor. The set of known keys is learnt by running the same table on an empty section,
 * so adding a key is one line here (and the field in its record).
 *
 * <p>Rules: a missing key takes its default; an unknown key, a value of the wrong YAML type, a value the
 * settings records refuse, an unknown fix type name or a duplicate key is a {@link ConfigException}
 * whose message starts with the full key path. A section left empty ({@code filter:} with nothing
 * under it) means all defaults. Unknown keys are reported before bad values, since a misspelt key
 * usually explains the rest.
 *
 * <p>Bearer tokens may also come from the environment: {@value #WRITE_TOKENS_ENV} and
 * {@value #READ_TOKENS_ENV}, comma-separated, replace {@code server.write_tokens} and
 * {@code server.read_tokens} when set and not blank, so secrets need not live in the file. A blank
 * variable is ignored rather than read as "no tokens", and one that holds no token ({@code ","}) stops
 * start-up, so neither can switch authentication off.
 */
public final class ConfigLoader {

    public static final String WRITE_TOKENS_ENV = "WAYHOLD_WRITE_TOKENS";
    public static final String READ_TOKENS_ENV = "WAYHOLD_READ_TOKENS";

    /** Keys within this edit distance of an unknown key are offered as "did you mean". */
    private static final int SUGGEST_DISTANCE = 2;

    private static final YAMLMapper YAML = YAMLMapper.builder()
            .enable(DeserializationFeature.FAIL_ON_READING_DUP_TREE_KEY)
            .build();

    private ConfigLoader() {
    }

    // ---------------------------------------------------------------------------------------------
    // The key table.

    private static Settings settings(Section root, Function<String, String> env) {
        return new Settings(
                root.section("server", s -> server(s, env)),
                root.section("filter", ConfigLoader::filter),
                root.section("gating", ConfigLoader::gating),
                root.section("outage", ConfigLoader::outage),
                root.section("ordering", ConfigLoader::ordering),
                root.section("history", ConfigLoader::history),
                root.vehicles("vehicles", ConfigLoader::vehicle),
                root.section("journal", ConfigLoader::journal),
                root.section("ingest", ConfigLoader::ingest));
    }

    private static ServerSettings server(Section s, Function<String, String> env) {
        ServerSettings d = ServerSettings.defaults();
        return new ServerSettings(
                s.integer("port", d.port()),
                s.text("bind", d.bind()),
                s.tokens("write_tokens", env, WRITE_TOKENS_ENV, d.writeTokens()),
                s.tokens("read_tokens", env, READ_TOKENS_ENV, d.readTokens()),
                s.longInteger("max_body_bytes", d.maxBodyBytes()),
                s.integer("max_line_bytes", d.maxLineBytes()),
                s.integer("max_samples_per_request", d.maxSamplesPerRequest()),
                s.integer("max_sessions", d.maxSessions()),
                s.integer("max_vehicle_id_chars", d.maxVehicleIdChars()),
                s.number("max_samples_per_second_per_vehicle", d.maxSamplesPerSecondPerVehicle()),
                s.number("rate_burst_s", d.rateBurstS()),
                s.texts("cors_origins", d.corsOrigins()),
                s.number("sse_keep_alive_s", d.sseKeepAliveS()),
                s.number("idle_timeout_s", d.idleTimeoutS()),
                s.longInteger("min_body_bytes_per_s", d.minBodyBytesPerS()),
                s.number("drain_timeout_s", d.drainTimeoutS()),
                s.integer("max_concurrent_uploads", d.maxConcurrentUploads()),
                s.integer("max_streams", d.maxStreams()));
    }

    private static IngestSettings ingest(Section s) {
        IngestSettings d = IngestSettings.defaults();
        return new IngestSettings(
                s.number("max_t_s", d.maxTS()),
                s.number("max_wheel_speed_mps", d.maxWheelSpeedMps()),
                s.number("max_yaw_rate_rad_per_s", d.maxYawRateRadPerS()),
                s.number("min_alt_m", d.minAltM()),
                s.number("max_alt_m", d.maxAltM()),
                s.number("max_sigma_m", d.maxSigmaM()),
                s.number("max_hdop", d.maxHdop()),
                s.integer("max_sats", d.maxSats()),
                s.number("max_gnss_speed_mps", d.maxGnssSpeedMps()),
                s.integer("max_listed_rejections", d.maxListedRejections()),
                s.integer("idempotency_keys_per_vehicle", d.idempotencyKeysPerVehicle()),
                s.number("idempotency_ttl_s", d.idempotencyTtlS()),
                s.longInteger("idempotency_max_bytes", d.idempotencyMaxBytes()));
    }

    private static FilterSettings filter(Section s) {
        FilterSettings d = FilterSettings.defaults();
        return new FilterSettings(
                s.number("wheel_speed_noise_mps", d.wheelSpeedNoiseMps()),
                s.number("wheel_speed_rate_hz", d.wheelSpeedRateHz()),
                s.number("gyro_noise_rad_per_s", d.gyroNoiseRadPerS()),
                s.number("gyro_rate_hz", d.gyroRateHz()),
                s.number("gyro_bias_random_walk_rad_per_s_per_sqrt_s", d.gyroBiasRandomWalkRadPerSPerSqrtS()),
                s.number("speed_scale_random_walk_per_sqrt_s", d.speedScaleRandomWalkPerSqrtS()),
                s.number("initial_yaw_sigma_rad", d.initialYawSigmaRad()),
                s.number("initial_gyro_bias_sigma_rad_per_s", d.initialGyroBiasSigmaRadPerS()),
                s.number("initial_speed_scale_sigma", d.initialSpeedScaleSigma()),
                s.number("gnss_floor_m", d.gnssFloorM()),
                s.number("gnss_range_error_m", d.gnssRangeErrorM()),
                s.number("gnss_default_sigma_m", d.gnssDefaultSigmaM()),
                s.fixScale("gnss_fix_scale", d.gnssFixScale()),
                s.number("gnss_correlated_share", d.gnssCorrelatedShare()),
                s.number("gnss_correlation_time_s", d.gnssCorrelationTimeS()),
                s.number("gnss_velocity_min_speed_mps", d.gnssVelocityMinSpeedMps()),
                s.number("gnss_speed_sigma_mps", d.gnssSpeedSigmaMps()),
                s.number("gnss_course_sigma_deg", d.gnssCourseSigmaDeg()),
                s.number("standstill_after_s", d.standstillAfterS()),
                s.number("heading_init_min_distance_m", d.headingInitMinDistanceM()));
    }

    private static GatingSettings gating(Section s) {
        GatingSettings d = GatingSettings.defaults();
        return new GatingSettings(
                s.number("chi_square_probability", d.chiSquareProbability()),
                s.integer("reacquire_fixes", d.reacquireFixes()));
    }

    private static OutageSettings outage(Section s) {
        OutageSettings d = OutageSettings.defaults();
        return new OutageSettings(
                s.number("gap_s", d.gapS()),
                s.number("alert_limit_m", d.alertLimitM()));
    }

    private static OrderingSettings ordering(Section s) {
        OrderingSettings d = OrderingSettings.defaults();
        return new OrderingSettings(
                s.number("max_lag_s", d.maxLagS()),
                s.number("max_forward_jump_s", d.maxForwardJumpS()));
    }

    private static HistorySettings history(Section s) {
        HistorySettings d = HistorySettings.defaults();
        return new HistorySettings(
                s.number("interval_s", d.intervalS()),
                s.integer("max_poses", d.maxPoses()));
    }

    private static JournalSettings journal(Section s) {
        JournalSettings d = JournalSettings.defaults();
        return new JournalSettings(
                s.bool("fsync", d.fsync()),
                s.number("group_commit_max_s", d.groupCommitMaxS()),
                s.longInteger("segment_bytes", d.segmentBytes()),
                s.number("retention_age_s", d.retentionAgeS()),
                s.longInteger("retention_bytes", d.retentionBytes()),
                s.number("snapshot_interval_s", d.snapshotIntervalS()));
    }

    private static VehicleProfile vehicle(Section s) {
        VehicleProfile d = VehicleProfile.defaults();
        return new VehicleProfile(
                s.number("lever_arm_forward_m", d.leverArmForwardM()),
                s.number("lever_arm_left_m", d.leverArmLeftM()),
                s.number("lever_arm_up_m", d.leverArmUpM()));
    }

    // ---------------------------------------------------------------------------------------------
    // Entry points.

    /** Reads a YAML file; tokens from the process environment override the file's. */
    public static Settings load(Path yamlFile) {
        return load(yamlFile, System::getenv);
    }

    /** Reads a YAML file; {@code env} looks up environment variables (null when unset). */
    public static Settings load(Path yamlFile, Function<String, String> env) {
        String source = yamlFile.toString();
        String text;
        try {
            text = Files.readString(yamlFile);
        } catch (NoSuchFileException e) {
            throw ConfigException.inSource("no such file", source, e);
        } catch (IOException e) {
            throw ConfigException.inSource("cannot be read: " + e.getMessage(), source, e);
        }
        return parse(text, source, env);
    }

    /** The file when it exists, the built-in defaults otherwise (tokens from the environment either way). */
    public static Settings loadOrDefaults(Path yamlFile) {
        return loadOrDefaults(yamlFile, System::getenv);
    }

    /** As {@link #loadOrDefaults(Path)}, with an injectable environment lookup. */
    public static Settings loadOrDefaults(Path yamlFile, Function<String, String> env) {
        return Files.exists(yamlFile) ? load(yamlFile, env) : parse("", "built-in defaults", env);
    }

    /** Reads YAML text; {@code sourceName} only labels error messages. */
    public static Settings parse(String yaml, String sourceName) {
        return parse(yaml, sourceName, System::getenv);
    }

    /** Reads YAML text with an injectable environment lookup (null when a variable is unset). */
    public static Settings parse(String yaml, String sourceName, Function<String, String> env) {
        JsonNode root;
        try {
            root = YAML.readTree(yaml);
        } catch (JacksonException e) {
            throw ConfigException.inSource("not valid YAML" + where(e.getLocation()) + ": " + e.getOriginalMessage(),
                    sourceName, e);
        }
        if (root == null || root.isMissingNode() || root.isNull()) {
            root = MissingNode.getInstance();
        } else if (!root.isObject()) {
            throw ConfigException.inSource("the top level must be a mapping of sections (server, filter, ...)",
                    sourceName, null);
        }
        return Section.root(root, sourceName, new ArrayList<>()).read(s -> settings(s, env));
    }

    /**
     * Every key the loader knows, as full paths; vehicle profiles appear as {@code vehicles.*.KEY} and
     * fix-type scales as {@code filter.gnss_fix_scale.NAME}. In table order.
     */
    static List<String> knownKeys() {
        List<String> leaves = new ArrayList<>();
        Section.root(MissingNode.getInstance(), "key table", leaves).read(s -> settings(s, name -> null));
        return List.copyOf(new LinkedHashSet<>(leaves));
    }

    private static String where(JsonLocation location) {
        return location == null || location.getLineNr() < 1 ? ""
                : " at line " + location.getLineNr() + ", column " + location.getColumnNr();
    }

    /**
     * One YAML mapping being read into one record. Each reader method registers the key it was asked for,
     * which is how a run over an empty mapping learns the known keys.
     */
    private static final class Section {
        private final String path;
        private final JsonNode node;
        private final String source;
        private final List<String> leaves;
        private final Set<String> asked = new LinkedHashSet<>();

        private Section(String path, JsonNode node, String source, List<String> leaves) {
            this.path = path;
            this.node = node;
            this.source = source;
            this.leaves = leaves;
        }

        static Section root(JsonNode node, String source, List<String> leaves) {
            return new Section("", node, source, leaves);
        }

        /**
         * Builds this section's record: first rejects keys the table does not know, then runs the table;
         * a record's own refusal ({@link SettingsException}, which carries the key) becomes a ConfigException.
         */
        <T> T read(Function<Section, T> build) {
            Section dry = new Section(path, MissingNode.getInstance(), source, new ArrayList<>());
            build.apply(dry);
            Iterator<String> names = node.fieldNames();
            while (names.hasNext()) {
                String name = names.next();
                if (!dry.asked.contains(name)) {
                    throw ConfigException.atKey(pathOf(name), unknown(name, dry.asked), source);
                }
            }
            try {
                return build.apply(this);
            } catch (SettingsException e) {
                throw ConfigException.atKey(keyOf(e), e.problem(), source);
            } catch (IllegalArgumentException e) {
                // A refusal that names no key of its own is put on this section.
                throw ConfigException.atKey(path, e.getMessage(), source);
            }
        }

        /** The full key a record refused; a vehicle profile names its keys vehicles.*.KEY. */
        private String keyOf(SettingsException e) {
            String key = e.key();
            if (key.startsWith("vehicles.*.") && path.startsWith("vehicles.")) {
                return path + key.substring("vehicles.*".length());
            }
            return key;
        }

        <T> T section(String key, Function<Section, T> build) {
            return new Section(pathOf(key), mapping(key), source, leaves).read(build);
        }

        Map<String, VehicleProfile> vehicles(String key, Function<Section, VehicleProfile> build) {
            JsonNode profiles = mapping(key);
            // Learn the profile keys even when no vehicle is configured, for knownKeys().
            new Section(pathOf(key) + ".*", MissingNode.getInstance(), source, leaves).read(build);
            Section byName = new Section(pathOf(key), profiles, source, new ArrayList<>());
            Map<String, VehicleProfile> result = new LinkedHashMap<>();
            for (Map.Entry<String, JsonNode> e : profiles.properties()) {
                result.put(e.getKey(), byName.section(e.getKey(), build));
            }
            return result;
        }

        double number(String key, double fallback) {
            JsonNode v = value(key);
            if (v == null) {
                return fallback;
            }
            if (!v.isNumber()) {
                throw wrongType(key, "must be a number", v);
            }
            return v.doubleValue();
        }

        int integer(String key, int fallback) {
            JsonNode v = value(key);
            if (v == null) {
                return fallback;
            }
            if (!v.isIntegralNumber() || !v.canConvertToInt()) {
                throw wrongType(key, "must be a whole number", v);
            }
            return v.intValue();
        }

        long longInteger(String key, long fallback) {
            JsonNode v = value(key);
            if (v == null) {
                return fallback;
            }
            if (!v.isIntegralNumber() || !v.canConvertToLong()) {
                throw wrongType(key, "must be a whole number", v);
            }
            return v.longValue();
        }

        boolean bool(String key, boolean fallback) {
            JsonNode v = value(key);
            if (v == null) {
                return fallback;
            }
            if (!v.isBoolean()) {
                throw wrongType(key, "must be true or false", v);
            }
            return v.booleanValue();
        }

        String text(String key, String fallback) {
            JsonNode v = value(key);
            if (v == null) {
                return fallback;
            }
            if (!v.isTextual()) {
                throw wrongType(key, "must be text", v);
            }
            return v.textValue();
        }

        List<String> texts(String key, List<String> fallback) {
            JsonNode v = value(key);
            if (v == null) {
                return fallback;
            }
            if (!v.isArray()) {
                throw wrongType(key, "must be a list of text", v);
            }
            List<String> result = new ArrayList<>();
            for (JsonNode item : v) {
                if (!item.isTextual()) {
                    throw wrongType(key, "must be a list of text, has an item that", item);
                }
                result.add(item.textValue());
            }
            return result;
        }

        /**
         * A token list: from the environment variable when it is set and not blank, else the file's list.
         * A variable that is set but holds no token (only commas and spaces, {@code ","}) is refused: it
         * was meant to configure tokens, and reading it as "no tokens" would silently open the service.
         */
        List<String> tokens(String key, Function<String, String> env, String variable, List<String> fallback) {
            List<String> fromFile = texts(key, fallback);
            String value = env.apply(variable);
            if (value == null || value.isBlank()) {
                return fromFile;
            }
            List<String> tokens = new ArrayList<>();
            for (String token : value.split(",")) {
                if (!token.isBlank()) {
                    tokens.add(token.trim());
                }
            }
            if (tokens.isEmpty()) {
                throw ConfigException.atKey(pathOf(key), "the environment variable " + variable
                        + " is set but holds no token (only commas and spaces); start-up is refused rather than"
                        + " run without tokens: set it to the tokens, or unset it", source);
            }
            return tokens;
        }

        /** A mapping from fix-type wire names to numbers; fix types left out keep their default. */
        Map<FixType, Double> fixScale(String key, Map<FixType, Double> fallback) {
            for (FixType f : FixType.values()) {
                leaves.add(pathOf(key) + "." + f.wireName());
            }
            JsonNode v = mapping(key);
            Map<FixType, Double> result = new EnumMap<>(fallback);
            Section scales = new Section(pathOf(key), v, source, new ArrayList<>());
            Iterator<String> names = v.fieldNames();
            while (names.hasNext()) {
                String name = names.next();
                FixType fix;
                try {
                    fix = FixType.fromWireName(name);
                } catch (IllegalArgumentException e) {
                    throw ConfigException.atKey(scales.pathOf(name),
                            "unknown fix type, expected one of none, 2d, 3d, dgnss, rtk_float, rtk_fixed", source);
                }
                result.put(fix, scales.number(name, Double.NaN));
            }
            return result;
        }

        /** The value of a key, or null when the mapping does not have it. */
        private JsonNode value(String key) {
            asked.add(key);
            leaves.add(pathOf(key));
            JsonNode v = node.get(key);
            if (v != null && v.isNull()) {
                throw wrongType(key, "must have a value", v);
            }
            return v;
        }

        /** A nested mapping; absent or empty ({@code key:} with nothing under it) reads as all defaults. */
        private JsonNode mapping(String key) {
            asked.add(key);
            JsonNode v = node.get(key);
            if (v == null || v.isNull()) {
                return MissingNode.getInstance();
            }
            if (!v.isObject()) {
                throw wrongType(key, "must be a mapping", v);
            }
            return v;
        }

        private String pathOf(String key) {
            return path.isEmpty() ? key : path + "." + key;
        }

        private ConfigException wrongType(String key, String expected, JsonNode v) {
            return ConfigException.atKey(pathOf(key), expected + ", was " + describe(v), source);
        }

        private String unknown(String name, Set<String> known) {
            String best = null;
            int bestDistance = SUGGEST_DISTANCE + 1;
            for (String k : known) {
                int d = editDistance(name, k);
                if (d < bestDistance) {
                    best = k;
                    bestDistance = d;
                }
            }
            return best == null ? "unknown key" : "unknown key, did you mean " + pathOf(best) + "?";
        }
    }

    private static String describe(JsonNode v) {
        if (v.isNull()) {
            return "empty";
        }
        if (v.isObject()) {
            return "a mapping";
        }
        if (v.isArray()) {
            return "a list";
        }
        if (v.isTextual()) {
            return "'" + v.textValue() + "'";
        }
        return v.asText();
    }

    /** Levenshtein distance, for suggesting the key a typo meant. */
    private static int editDistance(String a, String b) {
        int[] previous = new int[b.length() + 1];
        int[] current = new int[b.length() + 1];
        for (int j = 0; j <= b.length(); j++) {
            previous[j] = j;
        }
        for (int i = 1; i <= a.length(); i++) {
            current[0] = i;
            for (int j = 1; j <= b.length(); j++) {
                int substitution = previous[j - 1] + (a.charAt(i - 1) == b.charAt(j - 1) ? 0 : 1);
                current[j] = Math.min(substitution, Math.min(previous[j], current[j - 1]) + 1);
            }
            int[] swap = previous;
            previous = current;
            current = swap;
        }
        return previous[b.length()];
    }
}
