package dev.runoff.topology;

import dev.runoff.records.RecordSigner;
import java.time.Duration;
import java.util.List;
import java.util.Map;
import java.util.Objects;
import java.util.Properties;
import java.util.function.LongSupplier;
import org.apache.kafka.common.serialization.Serde;
import org.apache.kafka.common.serialization.Serdes;
import org.apache.kafka.streams.StreamsBuilder;
import org.apache.kafka.streams.StreamsConfig;
import org.apache.kafka.streams.Topology;
import org.apache.kafka.streams.TopologyConfig;
import org.apache.kafka.streams.kstream.Branched;
import org.apache.kafka.streams.kstream.Consumed;
import org.apache.kafka.streams.kstream.KStream;
import org.apache.kafka.streams.kstream.Named;
import org.apache.kafka.streams.kstream.Produced;
import org.apache.kafka.streams.kstream.Repartitioned;
import org.apache.kafka.streams.processor.TopicNameExtractor;
import org.apache.kafka.streams.processor.UsePartitionTimeOnInvalidTimestamp;
import org.apache.kafka.streams.state.Stores;

/**
 * The streaming job. {@link #build} wires it; {@link #streamsConfig} gives the Kafka Streams settings it
 * expects. Both the application and the tests call them.
 *
 * <pre>
 *  outcomes ──► validate-events ──► [events-by-unit repartition: key experiment|unit]
 *                 │  (global store of accepted definitions)        │
 *                 ▼                                                ▼
 *              rejected               dedupe + attribute ─► pre-aggregate (flush every few s)
 *                                                        │                 │
 *                                                        ▼                 │ DELTA
 *                                                     rejected             ▼
 *  experiments ─► validate-definitions ─► DEFINITION / ENDED ─► [by-experiment repartition: key experiment]
 *                        │                                                  │
 *                        ▼                                                  ▼
 *                     rejected                    fold (versions, statistics) + allocation pass (wall clock)
 *                                                  │          │           │              │
 *                                                  ▼          ▼           ▼              ▼
 *                                        experiments.accepted  allocations  decisions    rejected
 *                                        (feeds the global store)
 * </pre>
 *
 * <p>With {@code runoff.outcomes.keyed.by.unit=true} the events-by-unit repartition is replaced: an event
 * already on its unit's partition of the outcomes topic goes straight to attribution, any other is written to the
 * events-to-unit repartition topic, whose partitioner puts it on its unit's partition and which the same
 * tasks read ({@link UnitPlacement}):
 *
 * <pre>
 *  outcomes ──► validate-events ──┬── on its unit's partition ───────────────────┬──► dedupe + attribute ─► ...
 *                                 └── elsewhere ─► [events-to-unit repartition] ─┘
 * </pre>
 *
 * <p>Kafka Streams refuses to read one topic both into a global store and as a stream, so the global store
 * that validates events is fed from the accepted-definitions topic the fold writes, not from the
 * definitions topic itself.
 */
public final class RunoffTopology {

    /** Name of the global store of accepted definitions. */
    public static final String DEFINITIONS_STORE = "accepted-definitions";
    /**
     * Name of the window store of seen event ids that a job of an earlier version wrote; read, never written but
     * for the anchor record each task writes when it starts ({@link SeenEvents}).
     */
    public static final String DEDUPE_STORE = "seen-event-ids";
    /** Name of the window store of event ids pushed out of their unit's entry ({@link UnitEntry}). */
    public static final String OVERFLOW_STORE = "seen-event-ids-overflow";
    /** Name of the store of unit attribution entries. */
    public static final String UNITS_STORE = "units";
    /** Name of the store of unit deadlines: conversion windows to close, early-outcome graces to end. */
    public static final String DEADLINES_STORE = "unit-deadlines";
    /** Name of the store of outcome events waiting for their unit's first trial event. */
    public static final String EARLY_STORE = "early-outcomes";
    /** Name of the store of experiment ids that have ended (never reused). */
    public static final String ENDED_STORE = "ended-experiments";
    /** Name of the store of pre-aggregated statistics. */
    public static final String DELTAS_STORE = "arm-deltas";
    /** Name of the store of experiment states. */
    public static final String EXPERIMENTS_STORE = "experiments";
    /** Streams-config key under which a {@link JobCounters} object reaches the exception handlers. */
    public static final String COUNTERS_CONFIG = "runoff.counters";

    private static final TopicNameExtractor<byte[], Emit> DESTINATION = (key, emit, context) -> emit.topic();
    private static final Serde<Emit> EMIT_SERDE = new InternalSerde<>(Emit::value, bytes -> {
        throw new UnsupportedOperationException("output records are never read back");
    });

    private RunoffTopology() {
    }

    /**
     * The Kafka Streams settings of the job: exactly_once_v2, the rejected topic as dead-letter queue, the
     * job's exception handlers (also for the global store), partition time for records with an invalid
     * timestamp, and {@code counters} for the handlers; then {@code overrides} (application.id,
     * bootstrap.servers, state.dir...), which win.
     */
    public static Properties streamsConfig(TopologySettings settings, JobCounters counters, Map<String, ?> overrides) {
        Properties props = new Properties();
        props.put(StreamsConfig.PROCESSING_GUARANTEE_CONFIG, StreamsConfig.EXACTLY_ONCE_V2);
        props.put(StreamsConfig.ERRORS_DEAD_LETTER_QUEUE_TOPIC_NAME_CONFIG, settings.rejectedTopic());
        props.put(StreamsConfig.PROCESSING_EXCEPTION_HANDLER_CLASS_CONFIG, DeadLetterProcessingHandler.class.getName());
        props.put(StreamsConfig.PROCESSING_EXCEPTION_HANDLER_GLOBAL_ENABLED_CONFIG, "true");
        props.put(StreamsConfig.DESERIALIZATION_EXCEPTION_HANDLER_CLASS_CONFIG,
                DeadLetterDeserializationHandler.class.getName());
        props.put(StreamsConfig.PRODUCTION_EXCEPTION_HANDLER_CLASS_CONFIG, DeadLetterProductionHandler.class.getName());
        props.put(StreamsConfig.DEFAULT_TIMESTAMP_EXTRACTOR_CLASS_CONFIG,
                UsePartitionTimeOnInvalidTimestamp.class.getName());
        props.put(COUNTERS_CONFIG, Objects.requireNonNull(counters, "counters"));
        props.putAll(overrides);
        return props;
    }

    /** {@link #build(TopologySettings, Properties, JobCounters, LongSupplier)} with {@link System#nanoTime}. */
    public static Topology build(TopologySettings settings, Properties streamsConfig, JobCounters counters) {
        return build(settings, streamsConfig, counters, System::nanoTime);
    }

    /**
     * Builds the topology; its records are unsigned.
     *
     * @param settings      the job's settings
     * @param streamsConfig the Kafka Streams settings (see {@link #streamsConfig})
     * @param counters      where rejections and duplicates are counted
     * @param nanoTime      monotonic clock bounding the time of an allocation pass (never used in a result)
     */
    public static Topology build(TopologySettings settings, Properties streamsConfig, JobCounters counters,
                                 LongSupplier nanoTime) {
        return build(settings, streamsConfig, counters, nanoTime, RecordSigner.unsigned());
    }

    /**
     * Builds the topology, signing every decision and control record with {@code signer}.
     *
     * @param settings      the job's settings
     * @param streamsConfig the Kafka Streams settings (see {@link #streamsConfig})
     * @param counters      where rejections and duplicates are counted
     * @param nanoTime      monotonic clock bounding the time of an allocation pass (never used in a result)
     * @param signer        signs the decision and control records (or leaves them unsigned)
     */
    public static Topology build(TopologySettings settings, Properties streamsConfig, JobCounters counters,
                                 LongSupplier nanoTime, RecordSigner signer) {
        Rejections rejections = new Rejections(settings.rejectedTopic(), counters);
        StreamsBuilder builder = new StreamsBuilder(new TopologyConfig(new StreamsConfig(streamsConfig)));
        addStores(builder, settings);

        KStream<byte[], byte[]> outcomes = builder.stream(settings.outcomesTopic(),
                Consumed.with(Serdes.ByteArray(), Serdes.ByteArray()).withName("outcomes"));
        KStream<byte[], UnitEvent> events = divert(outcomes.process(
                () -> new EventValidator(DEFINITIONS_STORE, rejections), Named.as("validate-events")),
                "validate-events");
        KStream<byte[], ArmDelta> attributed = divert(byUnit(events, settings, counters)
                .process(() -> new Attribution(settings, rejections, counters), Named.as("attribute"), UNITS_STORE,
                        DEADLINES_STORE, EARLY_STORE, DEDUPE_STORE, OVERFLOW_STORE),
                "attribute");
        KStream<byte[], StageTwo> deltas = attributed.process(() -> new PreAggregate(DELTAS_STORE, settings),
                Named.as("pre-aggregate"), DELTAS_STORE);

        KStream<byte[], byte[]> submitted = builder.stream(settings.definitionsTopic(),
                Consumed.with(Serdes.ByteArray(), Serdes.ByteArray()).withName("experiments"));
        KStream<byte[], StageTwo> definitions = divert(submitted.process(() -> new DefinitionValidator(rejections),
                Named.as("validate-definitions")), "validate-definitions");

        deltas.merge(definitions, Named.as("stage-two"))
                .repartition(Repartitioned.with(Serdes.ByteArray(), StageTwo.SERDE).withName("by-experiment"))
                .process(() -> new Fold(EXPERIMENTS_STORE, settings, rejections, counters, nanoTime, signer),
                        Named.as("fold"), EXPERIMENTS_STORE, ENDED_STORE)
                .to(DESTINATION, Produced.with(Serdes.ByteArray(), EMIT_SERDE).withName("fold-outputs"));
        return builder.build(streamsConfig);
    }

    /**
     * {@code events} in the tasks that own their units: through the events-by-unit repartition (key experiment
     * and unit), or, when the outcomes topic is keyed by unit, straight on where already on the unit's
     * partition and through the events-to-unit repartition otherwise ({@link UnitPlacement}).
     */
    private static KStream<byte[], UnitEvent> byUnit(KStream<byte[], UnitEvent> events, TopologySettings settings,
                                                     JobCounters counters) {
        if (!settings.outcomesKeyedByUnit()) {
            return events.repartition(Repartitioned.with(Serdes.ByteArray(), UnitEvent.SERDE)
                    .withName("events-by-unit"));
        }
        UnitPlacement placement = new UnitPlacement(counters);
        Map<String, KStream<byte[], UnitEvent>> paths = events.split(Named.as("unit-"))
                .branch((key, event) -> placement.inPlace(event), Branched.as("in-place"))
                .defaultBranch(Branched.as("elsewhere"));
        KStream<byte[], UnitEvent> rerouted = paths.get("unit-elsewhere").repartition(Repartitioned
                .with(Serdes.ByteArray(), UnitEvent.SERDE).withStreamPartitioner(placement).withName("events-to-unit"));
        return paths.get("unit-in-place").merge(rerouted, Named.as("events-at-unit"));
    }

    /**
     * The stores. A record cache is kept only where writes to one key repeat within a commit interval: the
     * pre-aggregated sums, the experiments and the ended ids. Unit entries, deadlines, early outcomes and event
     * ids are written once or twice per unit, so a cache coalesces little there; its entries filled the cache
     * that all stores of a thread share, and each put into a cached store then evicted that store's own dirty
     * entries, flushing the pre-aggregated sums far more often than once per commit (see "Fold throughput" in
     * src/docs/performance.md).
     */
    private static void addStores(StreamsBuilder builder, TopologySettings settings) {
        builder.addGlobalStore(Stores.keyValueStoreBuilder(Stores.inMemoryKeyValueStore(DEFINITIONS_STORE),
                        Serdes.String(), Serdes.ByteArray()).withLoggingDisabled(),
                settings.acceptedDefinitionsTopic(),
                Consumed.with(Serdes.String(), Serdes.ByteArray()).withName("accepted-definitions"),
                () -> new AcceptedDefinitions(DEFINITIONS_STORE));
        for (String seen : List.of(DEDUPE_STORE, OVERFLOW_STORE)) {
            builder.addStateStore(Stores.windowStoreBuilder(Stores.persistentWindowStore(seen,
                            Duration.ofMillis(settings.dedupeWindowMs()), Duration.ofMillis(1), false),
                    Serdes.String(), Serdes.ByteArray()).withCachingDisabled());
        }
        builder.addStateStore(Stores.keyValueStoreBuilder(Stores.persistentKeyValueStore(UNITS_STORE),
                Serdes.String(), UnitEntry.SERDE).withCachingDisabled());
        builder.addStateStore(Stores.keyValueStoreBuilder(Stores.persistentKeyValueStore(DEADLINES_STORE),
                Serdes.String(), Serdes.ByteArray()).withCachingDisabled());
        builder.addStateStore(Stores.keyValueStoreBuilder(Stores.persistentKeyValueStore(EARLY_STORE),
                Serdes.String(), Waiting.SERDE).withCachingDisabled());
        builder.addStateStore(Stores.keyValueStoreBuilder(Stores.persistentKeyValueStore(ENDED_STORE),
                Serdes.String(), Serdes.Long()).withCachingEnabled());
        builder.addStateStore(Stores.keyValueStoreBuilder(Stores.persistentKeyValueStore(DELTAS_STORE),
                Serdes.String(), PreAggregate.Sum.SERDE).withCachingEnabled());
        builder.addStateStore(Stores.keyValueStoreBuilder(Stores.persistentKeyValueStore(EXPERIMENTS_STORE),
                Serdes.String(), ExperimentStateSerde.SERDE).withCachingEnabled());
    }

    /**
     * Sends the {@link Routed#emit()} side of {@code routed} to its output topics and returns the values
     * passed on.
     */
    private static <V> KStream<byte[], V> divert(KStream<byte[], Routed<V>> routed, String name) {
        Map<String, KStream<byte[], Routed<V>>> branches = routed.split(Named.as(name + "-"))
                .branch((key, value) -> value.isEmit(), Branched.as("emits"))
                .defaultBranch(Branched.as("passes"));
        branches.get(name + "-emits").mapValues(Routed::emit, Named.as(name + "-emit"))
                .to(DESTINATION, Produced.with(Serdes.ByteArray(), EMIT_SERDE).withName(name + "-outputs"));
        return branches.get(name + "-passes").mapValues(Routed::payload, Named.as(name + "-pass"));
    }
}
