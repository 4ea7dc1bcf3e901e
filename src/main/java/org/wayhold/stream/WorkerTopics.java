package org.wayhold.stream;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.TimeoutException;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.admin.NewTopic;
import org.apache.kafka.common.config.TopicConfig;
import org.apache.kafka.common.errors.TopicExistsException;
import org.wayhold.settings.WorkerSettings;

/**
 * Makes sure the worker's four topics exist before it starts: missing ones are created with the
 * configured partitions, replication and retention when {@code worker.create_topics} allows it, and
 * otherwise the start is refused with the list of what is missing. Two workers starting at once may
 * both try to create a topic; the one that loses the race finds it made.
 */
public final class WorkerTopics {

    /** How long an admin request may take before the start is given up (s). */
    static final long ADMIN_TIMEOUT_S = 60;

    private WorkerTopics() {
    }

    /** Refused start: the message says what is wrong and what to do. */
    public static final class Refused extends Exception {
        Refused(String message, Throwable cause) {
            super(message, cause);
        }
    }

    /**
     * The worker's topics and the partition count each is made with.
     *
     * @return topic names, in the order samples, poses, events, dead letters
     */
    static List<String> names(WorkerSettings w) {
        return List.of(w.samplesTopic(), w.posesTopic(), w.eventsTopic(), w.deadLetterTopic());
    }

    /**
     * Checks, and creates when allowed, the worker's topics.
     *
     * @return the topics created (empty when all existed)
     */
    public static List<String> prepare(Admin admin, WorkerSettings w) throws Refused, InterruptedException {
        Set<String> existing;
        try {
            existing = admin.listTopics().names().get(ADMIN_TIMEOUT_S, TimeUnit.SECONDS);
        } catch (ExecutionException | TimeoutException e) {
            throw new Refused("worker: cannot list the topics of the cluster: " + cause(e), e);
        }
        Map<String, NewTopic> missing = new LinkedHashMap<>();
        for (String topic : names(w)) {
            if (!existing.contains(topic)) {
                missing.put(topic, new NewTopic(topic, w.partitions(), (short) w.replicationFactor())
                        .configs(Map.of(TopicConfig.RETENTION_MS_CONFIG,
                                Long.toString(Math.round(w.retentionS() * 1000.0)))));
            }
        }
        if (missing.isEmpty()) {
            return List.of();
        }
        if (!w.createTopics()) {
            throw new Refused("worker: topics missing: " + String.join(", ", missing.keySet()) + "; create them (for"
                    + " example " + w.partitions() + " partitions, replication factor " + w.replicationFactor()
                    + ") or set worker.create_topics: true", null);
        }
        List<String> created = new ArrayList<>();
        var result = admin.createTopics(missing.values()).values();
        for (Map.Entry<String, org.apache.kafka.common.KafkaFuture<Void>> e : result.entrySet()) {
            try {
                e.getValue().get(ADMIN_TIMEOUT_S, TimeUnit.SECONDS);
                created.add(e.getKey());
            } catch (ExecutionException ex) {
                if (!(ex.getCause() instanceof TopicExistsException)) {
                    throw new Refused("worker: cannot create topic " + e.getKey() + " (" + w.partitions()
                            + " partitions, replication factor " + w.replicationFactor() + ", see worker.partitions"
                            + " and worker.replication_factor): " + cause(ex), ex);
                }
            } catch (TimeoutException ex) {
                throw new Refused("worker: creating topic " + e.getKey() + " took longer than " + ADMIN_TIMEOUT_S
                        + " s", ex);
            }
        }
        return created;
    }

    private static String cause(Exception e) {
        Throwable c = e instanceof ExecutionException && e.getCause() != null ? e.getCause() : e;
        return c.getClass().getSimpleName() + ": " + c.getMessage();
    }
}
