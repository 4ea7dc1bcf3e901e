package org.wayhold.settings;

import java.util.HashSet;
import java.util.List;
import java.util.Set;
import java.util.regex.Pattern;

/**
 * The fleet mode on Apache Kafka ({@code wayhold worker}, and {@code serve --from-kafka} reading its
 * poses). YAML section {@code worker}.
 *
 * @param applicationId      the Kafka Streams application id: the consumer group every worker of one
 *                           fleet shares, and the prefix of its changelog topic
 * @param samplesTopic       NDJSON samples in, keyed by vehicle id
 * @param posesTopic         poses out (the pose JSON of {@code GET /pose}), keyed by vehicle id
 * @param eventsTopic        outage events out (entry, the switch to unreliable, exit), keyed by vehicle id
 * @param deadLetterTopic    refused samples with their reason code, keyed by vehicle id
 * @param partitions         partitions of each topic the worker creates (count, >= 1): the most workers
 *                           (times threads) that can share the fleet
 * @param replicationFactor  copies of each topic the worker creates, the changelog included (count, >= 1)
 * @param createTopics       create missing topics at start (true), or refuse to start without them
 * @param retentionS         how long the samples, poses, events and dead-letter topics the worker creates
 *                           keep records (s of wall time)
 * @param threads            stream threads per worker (count, >= 1)
 * @param standbyReplicas    warm copies of each vehicle's state on other workers (count, >= 0): a takeover
 *                           then needs no restore from the changelog
 * @param commitIntervalS    spacing of transaction commits (s, > 0): poses become visible to
 *                           {@code read_committed} readers at each commit
 * @param sessionTimeoutS    how long a silent worker keeps its vehicles before the others take them over
 *                           (s, > 0)
 */
public record WorkerSettings(String applicationId, String samplesTopic, String posesTopic, String eventsTopic,
                             String deadLetterTopic, int partitions, int replicationFactor, boolean createTopics,
                             double retentionS, int threads, int standbyReplicas, double commitIntervalS,
                             double sessionTimeoutS) {

    /** Kafka's legal topic and group names: ASCII letters, digits, '.', '_' and '-', at most 249 characters. */
    private static final Pattern KAFKA_NAME = Pattern.compile("[A-Za-z0-9._-]{1,249}");

    public WorkerSettings {
        name("worker.application_id", applicationId);
        name("worker.samples_topic", samplesTopic);
        name("worker.poses_topic", posesTopic);
        name("worker.events_topic", eventsTopic);
        name("worker.dead_letter_topic", deadLetterTopic);
        Set<String> seen = new HashSet<>();
        for (String topic : List.of(samplesTopic, posesTopic, eventsTopic, deadLetterTopic)) {
            if (!seen.add(topic)) {
                throw new SettingsException("worker.poses_topic", "the samples, poses, events and dead-letter"
                        + " topics must be four different topics, '" + topic + "' is named twice");
            }
        }
        Check.atLeast("worker.partitions", partitions, 1);
        Check.atLeast("worker.replication_factor", replicationFactor, 1);
        if (replicationFactor > Short.MAX_VALUE) {
            throw new SettingsException("worker.replication_factor", "must be at most " + Short.MAX_VALUE
                    + ", was " + replicationFactor);
        }
        Check.positive("worker.retention_s", retentionS);
        Check.atLeast("worker.threads", threads, 1);
        Check.atLeast("worker.standby_replicas", standbyReplicas, 0);
        Check.positive("worker.commit_interval_s", commitIntervalS);
        Check.positive("worker.session_timeout_s", sessionTimeoutS);
    }

    private static void name(String key, String value) {
        if (value == null || !KAFKA_NAME.matcher(value).matches()) {
            throw new SettingsException(key, "must be 1 to 249 letters, digits, '.', '_' or '-' (a Kafka name),"
                    + " was " + (value == null ? "missing" : "'" + value + "'"));
        }
    }

    /**
     * Topics named after the project; 12 partitions let up to 12 workers share a fleet and divide evenly
     * among 1, 2, 3, 4 and 6 of them; three copies of every topic survive the loss of a broker (Kafka's
     * usual production setting, no single source); a week of retention is Kafka's own default. A commit
     * every 0.1 s is Kafka Streams' own default under exactly-once; a 10 s session timeout hands a dead
     * worker's vehicles over in seconds rather than the client default of 45 s, while riding out a
     * garbage-collection pause.
     */
    public static WorkerSettings defaults() {
        return new WorkerSettings("wayhold-worker", "wayhold.samples", "wayhold.poses", "wayhold.events",
                "wayhold.rejected", 12, 3, true, 7 * 24 * 3600.0, 1, 0, 0.1, 10.0);
    }
}
