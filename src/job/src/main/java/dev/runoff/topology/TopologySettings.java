package dev.runoff.topology;

import dev.runoff.engine.EngineConfig;

import dev.runoff.records.Format;
import java.util.HashSet;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Set;
import java.util.TreeSet;

/**
 * The job's own settings (Kafka Streams settings are separate, see {@link RunoffTopology#streamsConfig}).
 * Validated once, here; messages name the key and the value. {@link #fromMap} reads them from keys
 * starting with {@code runoff.}; {@link #defaults()} lists the defaults.
 *
 * @param outcomesTopic              input of outcome events ({@value #OUTCOMES_TOPIC})
 * @param definitionsTopic           input of experiment definitions, compacted ({@value #DEFINITIONS_TOPIC})
 * @param acceptedDefinitionsTopic   output of accepted, versioned definitions, compacted; it also feeds the
 *                                   global store that validates events ({@value #ACCEPTED_TOPIC})
 * @param allocationsTopic           output of control records, compacted ({@value #ALLOCATIONS_TOPIC})
 * @param decisionsTopic             output of decision records, append-only ({@value #DECISIONS_TOPIC})
 * @param rejectedTopic              output of rejected input with reasons; also the dead-letter queue
 *                                   ({@value #REJECTED_TOPIC})
 * @param dedupeWindowMs             how long an event id is remembered to drop duplicates
 *                                   ({@value #DEDUPE_WINDOW_MS})
 * @param flushIntervalMs            period of the flush of pre-aggregated deltas ({@value #FLUSH_INTERVAL_MS})
 * @param flushMaxEntries            most deltas forwarded by one flush ({@value #FLUSH_MAX_ENTRIES})
 * @param allocateIntervalMs         period of the allocation pass ({@value #ALLOCATE_INTERVAL_MS})
 * @param allocateMaxEvaluations     most evaluations or heartbeats in one allocation pass
 *                                   ({@value #ALLOCATE_MAX_EVALUATIONS})
 * @param allocateMaxTimeMs          an allocation pass starts no new evaluation after this long
 *                                   ({@value #ALLOCATE_MAX_TIME_MS})
 * @param allocateMaxVisits          most experiments looked at in one allocation pass
 *                                   ({@value #ALLOCATE_MAX_VISITS})
 * @param unitsCleanupIntervalMs     period of the clean-up of unit attribution entries
 *                                   ({@value #UNITS_CLEANUP_INTERVAL_MS})
 * @param unitsCleanupMaxEntries     most unit entries looked at in one clean-up
 *                                   ({@value #UNITS_CLEANUP_MAX_ENTRIES})
 * @param unitsRetentionMarginMs     a unit entry is dropped this long after its attribution window ended
 *                                   ({@value #UNITS_RETENTION_MARGIN_MS})
 * @param unitsCloseIdleMs           a task that has read no event for this long closes conversion windows by
 *                                   the wall clock alone, not waiting for its stream time
 *                                   ({@value #UNITS_CLOSE_IDLE_MS})
 * @param monteCarloDraws            the most joint draws of the Monte Carlo estimator, the default of every
 *                                   definition (the cap of {@code AdaptiveMonteCarlo}; {@value #MONTE_CARLO_DRAWS})
 * @param outputFormat               encoding of the output records: AVRO (single-object) or JSON
 *                                   ({@value #OUTPUT_FORMAT})
 * @param outcomesKeyedByUnit        the producers key outcome events by unit id with the Java client's default
 *                                   partitioner: an event already on its unit's partition skips the repartition,
 *                                   the others are sent there ({@value #OUTCOMES_KEYED_BY_UNIT}; see
 *                                   {@link UnitPlacement})
 */
public record TopologySettings(String outcomesTopic, String definitionsTopic, String acceptedDefinitionsTopic,
                               String allocationsTopic, String decisionsTopic, String rejectedTopic,
                               long dedupeWindowMs, long flushIntervalMs, int flushMaxEntries,
                               long allocateIntervalMs, int allocateMaxEvaluations, long allocateMaxTimeMs,
                               int allocateMaxVisits, long unitsCleanupIntervalMs, int unitsCleanupMaxEntries,
                               long unitsRetentionMarginMs, long unitsCloseIdleMs, int monteCarloDraws,
                               Format outputFormat, boolean outcomesKeyedByUnit) {

    /** Key of {@link #outcomesTopic()}. */
    public static final String OUTCOMES_TOPIC_KEY = "runoff.topic.outcomes";
    /** Key of {@link #definitionsTopic()}. */
    public static final String DEFINITIONS_TOPIC_KEY = "runoff.topic.experiments";
    /** Key of {@link #acceptedDefinitionsTopic()}. */
    public static final String ACCEPTED_TOPIC_KEY = "runoff.topic.experiments.accepted";
    /** Key of {@link #allocationsTopic()}. */
    public static final String ALLOCATIONS_TOPIC_KEY = "runoff.topic.allocations";
    /** Key of {@link #decisionsTopic()}. */
    public static final String DECISIONS_TOPIC_KEY = "runoff.topic.decisions";
    /** Key of {@link #rejectedTopic()}. */
    public static final String REJECTED_TOPIC_KEY = "runoff.topic.rejected";
    /** Key of {@link #dedupeWindowMs()}. */
    public static final String DEDUPE_WINDOW_KEY = "runoff.dedupe.window.ms";
    /** Key of {@link #flushIntervalMs()}. */
    public static final String FLUSH_INTERVAL_KEY = "runoff.flush.interval.ms";
    /** Key of {@link #flushMaxEntries()}. */
    public static final String FLUSH_MAX_ENTRIES_KEY = "runoff.flush.max.entries";
    /** Key of {@link #allocateIntervalMs()}. */
    public static final String ALLOCATE_INTERVAL_KEY = "runoff.allocate.interval.ms";
    /** Key of {@link #allocateMaxEvaluations()}. */
    public static final String ALLOCATE_MAX_EVALUATIONS_KEY = "runoff.allocate.max.evaluations";
    /** Key of {@link #allocateMaxTimeMs()}. */
    public static final String ALLOCATE_MAX_TIME_KEY = "runoff.allocate.max.time.ms";
    /** Key of {@link #allocateMaxVisits()}. */
    public static final String ALLOCATE_MAX_VISITS_KEY = "runoff.allocate.max.visits";
    /** Key of {@link #unitsCleanupIntervalMs()}. */
    public static final String UNITS_CLEANUP_INTERVAL_KEY = "runoff.units.cleanup.interval.ms";
    /** Key of {@link #unitsCleanupMaxEntries()}. */
    public static final String UNITS_CLEANUP_MAX_ENTRIES_KEY = "runoff.units.cleanup.max.entries";
    /** Key of {@link #unitsRetentionMarginMs()}. */
    public static final String UNITS_RETENTION_MARGIN_KEY = "runoff.units.retention.margin.ms";
    /** Key of {@link #unitsCloseIdleMs()}. */
    public static final String UNITS_CLOSE_IDLE_KEY = "runoff.units.close.idle.ms";
    /** Key of {@link #monteCarloDraws()}. */
    public static final String MONTE_CARLO_DRAWS_KEY = "runoff.montecarlo.draws";
    /** Key of {@link #outputFormat()}. */
    public static final String OUTPUT_FORMAT_KEY = "runoff.output.format";
    /** Key of {@link #outcomesKeyedByUnit()}. */
    public static final String OUTCOMES_KEYED_BY_UNIT_KEY = "runoff.outcomes.keyed.by.unit";

    /** Default of {@link #outcomesTopic()}. */
    public static final String OUTCOMES_TOPIC = "runoff.outcomes";
    /** Default of {@link #definitionsTopic()}. */
    public static final String DEFINITIONS_TOPIC = "runoff.experiments";
    /** Default of {@link #acceptedDefinitionsTopic()}. */
    public static final String ACCEPTED_TOPIC = "runoff.experiments.accepted";
    /** Default of {@link #allocationsTopic()}. */
    public static final String ALLOCATIONS_TOPIC = "runoff.allocations";
    /** Default of {@link #decisionsTopic()}. */
    public static final String DECISIONS_TOPIC = "runoff.decisions";
    /** Default of {@link #rejectedTopic()}. */
    public static final String REJECTED_TOPIC = "runoff.rejected";
    /** Default of {@link #dedupeWindowMs()}: 1 day. */
    public static final long DEDUPE_WINDOW_MS = 86_400_000L;
    /** Default of {@link #flushIntervalMs()}. */
    public static final long FLUSH_INTERVAL_MS = 2_000L;
    /** Default of {@link #flushMaxEntries()}. */
    public static final int FLUSH_MAX_ENTRIES = 10_000;
    /** Default of {@link #allocateIntervalMs()}. */
    public static final long ALLOCATE_INTERVAL_MS = 1_000L;
    /** Default of {@link #allocateMaxEvaluations()}. */
    public static final int ALLOCATE_MAX_EVALUATIONS = 200;
    /**
     * Default of {@link #allocateMaxTimeMs()}: half the default allocation interval, so that a backlog of
     * evaluations leaves the stream thread at least about half of its time for events (the earlier 1,000 ms, the
     * whole interval, let passes take it all: src/docs/performance.md, "Many experiments").
     */
    public static final long ALLOCATE_MAX_TIME_MS = 500L;
    /** Default of {@link #allocateMaxVisits()}. */
    public static final int ALLOCATE_MAX_VISITS = 10_000;
    /** Default of {@link #unitsCleanupIntervalMs()}: 1 minute. */
    public static final long UNITS_CLEANUP_INTERVAL_MS = 60_000L;
    /** Default of {@link #unitsCleanupMaxEntries()}. */
    public static final int UNITS_CLEANUP_MAX_ENTRIES = 10_000;
    /** Default of {@link #unitsRetentionMarginMs()}: 1 hour. */
    public static final long UNITS_RETENTION_MARGIN_MS = 3_600_000L;
    /**
     * Default of {@link #unitsCloseIdleMs()}: 5 s, ten times the consumer's default {@code fetch.max.wait.ms}
     * (500 ms, {@code ConsumerConfig.DEFAULT_FETCH_MAX_WAIT_MS} in kafka-clients 4.4.0) so that a fetch in
     * flight never looks like a quiet input, and short beside conversion windows of minutes or more.
     */
    public static final long UNITS_CLOSE_IDLE_MS = 5_000L;
    /** Default of {@link #monteCarloDraws()}. */
    public static final int MONTE_CARLO_DRAWS = EngineConfig.DEFAULT_DRAWS;
    /** Default of {@link #outputFormat()}. */
    public static final String OUTPUT_FORMAT = "AVRO";
    /** Default of {@link #outcomesKeyedByUnit()}. */
    public static final boolean OUTCOMES_KEYED_BY_UNIT = false;

    private static final String PREFIX = "runoff.";

    /** Validates every setting; the message names the key and the value. */
    public TopologySettings {
        List<String> topics = List.of(outcomesTopic, definitionsTopic, acceptedDefinitionsTopic, allocationsTopic,
                decisionsTopic, rejectedTopic);
        List<String> keys = List.of(OUTCOMES_TOPIC_KEY, DEFINITIONS_TOPIC_KEY, ACCEPTED_TOPIC_KEY,
                ALLOCATIONS_TOPIC_KEY, DECISIONS_TOPIC_KEY, REJECTED_TOPIC_KEY);
        Set<String> seen = new HashSet<>();
        for (int i = 0; i < topics.size(); i++) {
            String topic = topics.get(i);
            if (topic == null || topic.isBlank()) {
                throw new IllegalArgumentException(keys.get(i) + " must name a topic, got '" + topic + "'");
            }
            if (!seen.add(topic)) {
                throw new IllegalArgumentException(keys.get(i) + " = '" + topic + "' is already used by another "
                        + "runoff.topic.* setting; every topic must differ");
            }
        }
        positive(DEDUPE_WINDOW_KEY, dedupeWindowMs);
        positive(FLUSH_INTERVAL_KEY, flushIntervalMs);
        positive(FLUSH_MAX_ENTRIES_KEY, flushMaxEntries);
        positive(ALLOCATE_INTERVAL_KEY, allocateIntervalMs);
        positive(ALLOCATE_MAX_EVALUATIONS_KEY, allocateMaxEvaluations);
        positive(ALLOCATE_MAX_TIME_KEY, allocateMaxTimeMs);
        positive(ALLOCATE_MAX_VISITS_KEY, allocateMaxVisits);
        positive(UNITS_CLEANUP_INTERVAL_KEY, unitsCleanupIntervalMs);
        positive(UNITS_CLEANUP_MAX_ENTRIES_KEY, unitsCleanupMaxEntries);
        if (unitsRetentionMarginMs < 0) {
            throw new IllegalArgumentException(UNITS_RETENTION_MARGIN_KEY + " must be >= 0, got "
                    + unitsRetentionMarginMs);
        }
        positive(UNITS_CLOSE_IDLE_KEY, unitsCloseIdleMs);
        positive(MONTE_CARLO_DRAWS_KEY, monteCarloDraws);
        if (outputFormat == null) {
            throw new IllegalArgumentException(OUTPUT_FORMAT_KEY + " must be AVRO or JSON, got null");
        }
    }

    /** Every setting at its default. */
    public static TopologySettings defaults() {
        return fromMap(Map.of());
    }

    /**
     * Settings from {@code config}: every key starting with {@code runoff.} must be one of the keys above
     * (a misspelt key is an error, not a silent default); other keys are ignored. Values may be strings or
     * numbers.
     *
     * @throws IllegalArgumentException naming the key and the value
     */
    public static TopologySettings fromMap(Map<String, ?> config) {
        Map<String, String> values = new LinkedHashMap<>();
        config.forEach((key, value) -> {
            if (key.startsWith(PREFIX)) {
                values.put(key, value == null ? null : value.toString().trim());
            }
        });
        Reader r = new Reader(values);
        TopologySettings settings = new TopologySettings(
                r.text(OUTCOMES_TOPIC_KEY, OUTCOMES_TOPIC), r.text(DEFINITIONS_TOPIC_KEY, DEFINITIONS_TOPIC),
                r.text(ACCEPTED_TOPIC_KEY, ACCEPTED_TOPIC), r.text(ALLOCATIONS_TOPIC_KEY, ALLOCATIONS_TOPIC),
                r.text(DECISIONS_TOPIC_KEY, DECISIONS_TOPIC), r.text(REJECTED_TOPIC_KEY, REJECTED_TOPIC),
                r.number(DEDUPE_WINDOW_KEY, DEDUPE_WINDOW_MS), r.number(FLUSH_INTERVAL_KEY, FLUSH_INTERVAL_MS),
                r.count(FLUSH_MAX_ENTRIES_KEY, FLUSH_MAX_ENTRIES),
                r.number(ALLOCATE_INTERVAL_KEY, ALLOCATE_INTERVAL_MS),
                r.count(ALLOCATE_MAX_EVALUATIONS_KEY, ALLOCATE_MAX_EVALUATIONS),
                r.number(ALLOCATE_MAX_TIME_KEY, ALLOCATE_MAX_TIME_MS),
                r.count(ALLOCATE_MAX_VISITS_KEY, ALLOCATE_MAX_VISITS),
                r.number(UNITS_CLEANUP_INTERVAL_KEY, UNITS_CLEANUP_INTERVAL_MS),
                r.count(UNITS_CLEANUP_MAX_ENTRIES_KEY, UNITS_CLEANUP_MAX_ENTRIES),
                r.number(UNITS_RETENTION_MARGIN_KEY, UNITS_RETENTION_MARGIN_MS),
                r.number(UNITS_CLOSE_IDLE_KEY, UNITS_CLOSE_IDLE_MS),
                r.count(MONTE_CARLO_DRAWS_KEY, MONTE_CARLO_DRAWS), r.format(OUTPUT_FORMAT_KEY),
                r.flag(OUTCOMES_KEYED_BY_UNIT_KEY, OUTCOMES_KEYED_BY_UNIT));
        r.rejectUnknown();
        return settings;
    }

    private static void positive(String key, long value) {
        if (value < 1) {
            throw new IllegalArgumentException(key + " must be >= 1, got " + value);
        }
    }

    /** Reads keys from the map and remembers which it used. */
    private static final class Reader {
        private final Map<String, String> values;
        private final Set<String> used = new HashSet<>();

        Reader(Map<String, String> values) {
            this.values = values;
        }

        String text(String key, String fallback) {
            used.add(key);
            return values.getOrDefault(key, fallback);
        }

        long number(String key, long fallback) {
            String text = text(key, null);
            if (text == null) {
                return fallback;
            }
            try {
                return Long.parseLong(text);
            } catch (NumberFormatException e) {
                throw new IllegalArgumentException(key + " must be a whole number, got '" + text + "'", e);
            }
        }

        int count(String key, int fallback) {
            long value = number(key, fallback);
            if (value > Integer.MAX_VALUE) {
                throw new IllegalArgumentException(key + " must be at most " + Integer.MAX_VALUE + ", got " + value);
            }
            return (int) value;
        }

        boolean flag(String key, boolean fallback) {
            String text = text(key, null);
            if (text == null) {
                return fallback;
            }
            if (text.equalsIgnoreCase("true") || text.equalsIgnoreCase("false")) {
                return Boolean.parseBoolean(text);
            }
            throw new IllegalArgumentException(key + " must be true or false, got '" + text + "'");
        }

        Format format(String key) {
            String text = text(key, OUTPUT_FORMAT);
            try {
                return Format.valueOf(text.toUpperCase(Locale.ROOT));
            } catch (IllegalArgumentException | NullPointerException e) {
                throw new IllegalArgumentException(key + " must be AVRO or JSON, got '" + text + "'", e);
            }
        }

        void rejectUnknown() {
            for (String key : values.keySet()) {
                if (!used.contains(key) && !key.equals(RunoffTopology.COUNTERS_CONFIG)) {
                    throw new IllegalArgumentException("unknown setting " + key + " (known: " + new TreeSet<>(used)
                            + ")");
                }
            }
        }
    }
}
