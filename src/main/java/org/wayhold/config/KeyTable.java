package org.wayhold.config;

import java.util.List;
import java.util.Map;
import java.util.function.Function;
import java.util.function.Predicate;
import java.util.function.ToDoubleFunction;
import java.util.function.ToIntFunction;
import java.util.function.ToLongFunction;
import org.wayhold.sample.FixType;
import org.wayhold.settings.FilterSettings;
import org.wayhold.settings.GatingSettings;
import org.wayhold.settings.HistorySettings;
import org.wayhold.settings.IngestSettings;
import org.wayhold.settings.JournalSettings;
import org.wayhold.settings.OrderingSettings;
import org.wayhold.settings.OutageSettings;
import org.wayhold.settings.ServerSettings;
import org.wayhold.settings.Settings;
import org.wayhold.settings.VehicleProfile;
import org.wayhold.settings.WorkerSettings;

/**
 * The one table of configuration keys. Each line names a YAML key (with its unit in the name), its YAML
 * type, and the record component it fills; the lines sit at the components' positions in the record's
 * constructor. Defaults are the records' own {@code defaults()}.
 *
 * <p>The same table runs in three ways: {@link KeyReader} reads a YAML tree into settings (a missing
 * key takes the default), {@link KeyReader#knownKeys} learns every key by reading an empty tree, and
 * {@link KeyWriter} writes settings back as a tree that the reader loads into equal settings. Adding a
 * key is one line here (and the component in its record); the shipped {@code config/wayhold.yaml}
 * must then list it too, which a test checks.
 */
final class KeyTable {

    private KeyTable() {
    }

    /**
     * One record's keys, as the table sees them: each call names a key and the component it fills and
     * returns the value for the constructor (read from YAML, or the default, or the record being written).
     *
     * @param <R> the settings record this mapping builds
     */
    interface Keys<R> {
        double number(String key, ToDoubleFunction<R> component);

        int integer(String key, ToIntFunction<R> component);

        long longInteger(String key, ToLongFunction<R> component);

        boolean bool(String key, Predicate<R> component);

        String text(String key, Function<R, String> component);

        List<String> texts(String key, Function<R, List<String>> component);

        /**
         * A list of secrets: an environment variable, when set and not blank, replaces the file's list
         * (comma-separated); they are never written back.
         */
        List<String> secrets(String key, String environmentVariable, Function<R, List<String>> component);

        /** Numbers by fix-type wire name; fix types left out keep their default. */
        Map<FixType, Double> fixScale(String key, Function<R, Map<FixType, Double>> component);

        /** A nested mapping read into its own record by {@code table}. */
        <T> T section(String key, Function<R, T> component, Function<Keys<T>, T> table);

        /** A mapping of names to records of one kind, each read by {@code table} from {@code defaults}. */
        <T> Map<String, T> named(String key, Function<R, Map<String, T>> component, T defaults,
                                 Function<Keys<T>, T> table);
    }

    static Settings settings(Keys<Settings> s) {
        return new Settings(
                s.section("server", Settings::server, KeyTable::server),
                s.section("filter", Settings::filter, KeyTable::filter),
                s.section("gating", Settings::gating, KeyTable::gating),
                s.section("outage", Settings::outage, KeyTable::outage),
                s.section("ordering", Settings::ordering, KeyTable::ordering),
                s.section("history", Settings::history, KeyTable::history),
                s.named("vehicles", Settings::vehicles, VehicleProfile.defaults(), KeyTable::vehicle),
                s.section("journal", Settings::journal, KeyTable::journal),
                s.section("ingest", Settings::ingest, KeyTable::ingest),
                s.section("worker", Settings::worker, KeyTable::worker));
    }

    static ServerSettings server(Keys<ServerSettings> s) {
        return new ServerSettings(
                s.integer("port", ServerSettings::port),
                s.text("bind", ServerSettings::bind),
                s.secrets("write_tokens", ConfigLoader.WRITE_TOKENS_ENV, ServerSettings::writeTokens),
                s.secrets("read_tokens", ConfigLoader.READ_TOKENS_ENV, ServerSettings::readTokens),
                s.longInteger("max_body_bytes", ServerSettings::maxBodyBytes),
                s.integer("max_line_bytes", ServerSettings::maxLineBytes),
                s.integer("max_samples_per_request", ServerSettings::maxSamplesPerRequest),
                s.integer("max_sessions", ServerSettings::maxSessions),
                s.integer("max_vehicle_id_chars", ServerSettings::maxVehicleIdChars),
                s.number("max_samples_per_second_per_vehicle", ServerSettings::maxSamplesPerSecondPerVehicle),
                s.number("rate_burst_s", ServerSettings::rateBurstS),
                s.texts("cors_origins", ServerSettings::corsOrigins),
                s.number("sse_keep_alive_s", ServerSettings::sseKeepAliveS),
                s.number("idle_timeout_s", ServerSettings::idleTimeoutS),
                s.longInteger("min_body_bytes_per_s", ServerSettings::minBodyBytesPerS),
                s.number("drain_timeout_s", ServerSettings::drainTimeoutS),
                s.integer("max_concurrent_uploads", ServerSettings::maxConcurrentUploads),
                s.integer("max_streams", ServerSettings::maxStreams));
    }

    static IngestSettings ingest(Keys<IngestSettings> s) {
        return new IngestSettings(
                s.number("max_t_s", IngestSettings::maxTS),
                s.number("max_wheel_speed_mps", IngestSettings::maxWheelSpeedMps),
                s.number("max_yaw_rate_rad_per_s", IngestSettings::maxYawRateRadPerS),
                s.number("min_alt_m", IngestSettings::minAltM),
                s.number("max_alt_m", IngestSettings::maxAltM),
                s.number("max_sigma_m", IngestSettings::maxSigmaM),
                s.number("max_hdop", IngestSettings::maxHdop),
                s.integer("max_sats", IngestSettings::maxSats),
                s.number("max_gnss_speed_mps", IngestSettings::maxGnssSpeedMps),
                s.integer("max_listed_rejections", IngestSettings::maxListedRejections),
                s.integer("idempotency_keys_per_vehicle", IngestSettings::idempotencyKeysPerVehicle),
                s.number("idempotency_ttl_s", IngestSettings::idempotencyTtlS),
                s.longInteger("idempotency_max_bytes", IngestSettings::idempotencyMaxBytes));
    }

    static FilterSettings filter(Keys<FilterSettings> s) {
        return new FilterSettings(
                s.number("wheel_speed_noise_mps", FilterSettings::wheelSpeedNoiseMps),
                s.number("wheel_speed_rate_hz", FilterSettings::wheelSpeedRateHz),
                s.number("gyro_noise_rad_per_s", FilterSettings::gyroNoiseRadPerS),
                s.number("gyro_rate_hz", FilterSettings::gyroRateHz),
                s.number("gyro_bias_random_walk_rad_per_s_per_sqrt_s",
                        FilterSettings::gyroBiasRandomWalkRadPerSPerSqrtS),
                s.number("speed_scale_random_walk_per_sqrt_s", FilterSettings::speedScaleRandomWalkPerSqrtS),
                s.number("initial_yaw_sigma_rad", FilterSettings::initialYawSigmaRad),
                s.number("initial_gyro_bias_sigma_rad_per_s", FilterSettings::initialGyroBiasSigmaRadPerS),
                s.number("initial_speed_scale_sigma", FilterSettings::initialSpeedScaleSigma),
                s.number("gnss_floor_m", FilterSettings::gnssFloorM),
                s.number("gnss_range_error_m", FilterSettings::gnssRangeErrorM),
                s.number("gnss_default_sigma_m", FilterSettings::gnssDefaultSigmaM),
                s.fixScale("gnss_fix_scale", FilterSettings::gnssFixScale),
                s.number("gnss_correlated_share", FilterSettings::gnssCorrelatedShare),
                s.number("gnss_correlation_time_s", FilterSettings::gnssCorrelationTimeS),
                s.number("gnss_velocity_min_speed_mps", FilterSettings::gnssVelocityMinSpeedMps),
                s.number("gnss_speed_sigma_mps", FilterSettings::gnssSpeedSigmaMps),
                s.number("gnss_course_sigma_deg", FilterSettings::gnssCourseSigmaDeg),
                s.number("standstill_after_s", FilterSettings::standstillAfterS),
                s.number("heading_init_min_distance_m", FilterSettings::headingInitMinDistanceM),
                s.number("initial_gyro_scale_sigma", FilterSettings::initialGyroScaleSigma),
                s.number("gyro_scale_random_walk_per_sqrt_s", FilterSettings::gyroScaleRandomWalkPerSqrtS),
                s.number("gyro_rate_proportional_noise", FilterSettings::gyroRateProportionalNoise),
                s.number("sideslip_rad_per_mps2", FilterSettings::sideslipRadPerMps2),
                s.number("wheel_speed_zero_below_mps", FilterSettings::wheelSpeedZeroBelowMps),
                s.number("min_turn_radius_m", FilterSettings::minTurnRadiusM),
                s.number("gnss_hdop_floor_m", FilterSettings::gnssHdopFloorM),
                s.number("rolling_radius_growth_at_30_mps", FilterSettings::rollingRadiusGrowthAt30Mps));
    }

    static GatingSettings gating(Keys<GatingSettings> s) {
        return new GatingSettings(
                s.number("chi_square_probability", GatingSettings::chiSquareProbability),
                s.integer("reacquire_fixes", GatingSettings::reacquireFixes),
                s.number("reacquire_span_s", GatingSettings::reacquireSpanS));
    }

    static OutageSettings outage(Keys<OutageSettings> s) {
        return new OutageSettings(
                s.number("gap_s", OutageSettings::gapS),
                s.number("alert_limit_m", OutageSettings::alertLimitM),
                s.number("stale_after_s", OutageSettings::staleAfterS));
    }

    static OrderingSettings ordering(Keys<OrderingSettings> s) {
        return new OrderingSettings(
                s.number("max_lag_s", OrderingSettings::maxLagS),
                s.number("max_forward_jump_s", OrderingSettings::maxForwardJumpS));
    }

    static HistorySettings history(Keys<HistorySettings> s) {
        return new HistorySettings(
                s.number("interval_s", HistorySettings::intervalS),
                s.integer("max_poses", HistorySettings::maxPoses));
    }

    static JournalSettings journal(Keys<JournalSettings> s) {
        return new JournalSettings(
                s.bool("fsync", JournalSettings::fsync),
                s.number("group_commit_max_s", JournalSettings::groupCommitMaxS),
                s.longInteger("segment_bytes", JournalSettings::segmentBytes),
                s.number("retention_age_s", JournalSettings::retentionAgeS),
                s.longInteger("retention_bytes", JournalSettings::retentionBytes),
                s.number("snapshot_interval_s", JournalSettings::snapshotIntervalS));
    }

    static WorkerSettings worker(Keys<WorkerSettings> s) {
        return new WorkerSettings(
                s.text("application_id", WorkerSettings::applicationId),
                s.text("samples_topic", WorkerSettings::samplesTopic),
                s.text("poses_topic", WorkerSettings::posesTopic),
                s.text("events_topic", WorkerSettings::eventsTopic),
                s.text("dead_letter_topic", WorkerSettings::deadLetterTopic),
                s.integer("partitions", WorkerSettings::partitions),
                s.integer("replication_factor", WorkerSettings::replicationFactor),
                s.bool("create_topics", WorkerSettings::createTopics),
                s.number("retention_s", WorkerSettings::retentionS),
                s.integer("threads", WorkerSettings::threads),
                s.integer("standby_replicas", WorkerSettings::standbyReplicas),
                s.number("commit_interval_s", WorkerSettings::commitIntervalS),
                s.number("session_timeout_s", WorkerSettings::sessionTimeoutS));
    }

    static VehicleProfile vehicle(Keys<VehicleProfile> s) {
        return new VehicleProfile(
                s.number("lever_arm_forward_m", VehicleProfile::leverArmForwardM),
                s.number("lever_arm_left_m", VehicleProfile::leverArmLeftM),
                s.number("lever_arm_up_m", VehicleProfile::leverArmUpM),
                s.number("lever_arm_sigma_m", VehicleProfile::leverArmSigmaM),
                s.number("gnss_latency_s", VehicleProfile::gnssLatencyS),
                s.number("gnss_latency_sigma_s", VehicleProfile::gnssLatencySigmaS),
                s.number("speed_scale", VehicleProfile::speedScale),
                s.number("gyro_scale", VehicleProfile::gyroScale));
    }
}
