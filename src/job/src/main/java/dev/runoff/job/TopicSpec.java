package dev.runoff.job;

import dev.runoff.topology.TopologySettings;
import java.util.List;
import java.util.Map;
import org.apache.kafka.common.config.TopicConfig;

/**
 * A topic of the job with the settings {@code topics create} promises for it.
 *
 * @param name    topic name
 * @param role    what it holds, for messages
 * @param configs topic-level settings
 */
public record TopicSpec(String name, String role, Map<String, String> configs) {

    /** Retention of the outcomes topic: 7 days. */
    public static final String OUTCOMES_RETENTION_MS = "604800000";
    /** Retention of the rejected topic: 14 days. */
    public static final String REJECTED_RETENTION_MS = "1209600000";
    /** Retention of the decisions topic: forever, so the audit trail outlives the job. */
    public static final String DECISIONS_RETENTION_MS = "-1";

    /** Copies the settings. */
    public TopicSpec {
        configs = Map.copyOf(configs);
    }

    /**
     * The job's topics under {@code settings}: outcomes (delete, 7 days), definitions, accepted definitions
     * and control (compacted), decisions (kept forever: {@code retention.ms=-1}, {@code retention.bytes=-1}),
     * rejected (delete, 14 days). Kafka Streams creates its internal topics (repartition, changelog) itself.
     */
    public static List<TopicSpec> of(TopologySettings settings) {
        Map<String, String> compact = Map.of(TopicConfig.CLEANUP_POLICY_CONFIG, TopicConfig.CLEANUP_POLICY_COMPACT);
        return List.of(
                new TopicSpec(settings.outcomesTopic(), "outcome events (input)", delete(OUTCOMES_RETENTION_MS)),
                new TopicSpec(settings.definitionsTopic(), "experiment definitions (input)", compact),
                new TopicSpec(settings.acceptedDefinitionsTopic(), "accepted, versioned definitions", compact),
                new TopicSpec(settings.allocationsTopic(), "control records: current weights", compact),
                new TopicSpec(settings.decisionsTopic(), "decision (audit) records",
                        Map.of(TopicConfig.CLEANUP_POLICY_CONFIG, TopicConfig.CLEANUP_POLICY_DELETE,
                                TopicConfig.RETENTION_MS_CONFIG, DECISIONS_RETENTION_MS,
                                TopicConfig.RETENTION_BYTES_CONFIG, "-1")),
                new TopicSpec(settings.rejectedTopic(), "rejected input and dead letters",
                        delete(REJECTED_RETENTION_MS)));
    }

    private static Map<String, String> delete(String retentionMs) {
        return Map.of(TopicConfig.CLEANUP_POLICY_CONFIG, TopicConfig.CLEANUP_POLICY_DELETE,
                TopicConfig.RETENTION_MS_CONFIG, retentionMs);
    }
}
