package dev.runoff.topology;

import dev.runoff.broker.EmbeddedKafkaBroker;
import dev.runoff.records.Definitions;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.StoppingSpec;
import java.nio.file.Path;
import java.time.Duration;
import java.util.List;
import java.util.Map;
import java.util.Properties;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.streams.KafkaStreams;
import org.apache.kafka.streams.StreamsConfig;
import org.apache.kafka.streams.StoreQueryParameters;
import org.apache.kafka.streams.state.QueryableStoreTypes;
import org.apache.kafka.streams.state.ReadOnlyKeyValueStore;

/**
 * What the broker tests of the topology share: the job's topics, its settings for two stream threads,
 * definitions that never stop, and sending them and waiting until the job has accepted them.
 */
final class BrokerRuns {
    private BrokerRuns() {
    }

    /**
     * {@code def}, changed to never stop, recompute every second and send heartbeats as often as allowed: the
     * tests read their counts from CONTINUE decisions.
     */
    static ExperimentDefinition endless(ExperimentDefinition def) {
        def.setStopping(StoppingSpec.newBuilder(def.getStopping()).setMinTrialsPerArm(1_000_000_000L).build());
        def.setRecomputePeriodMs(1_000);
        def.setHeartbeatMs(Definitions.MIN_HEARTBEAT_MS);
        return def;
    }

    /**
     * Creates the job's topics on {@code broker}: the outcomes topic with {@code outcomePartitions} partitions,
     * the compacted definition and control topics and the decision topics with 2, the rejected topic with 1.
     */
    static void createTopics(EmbeddedKafkaBroker broker, TopologySettings settings, int outcomePartitions) {
        Map<String, String> compact = Map.of("cleanup.policy", "compact");
        broker.createTopic(settings.outcomesTopic(), outcomePartitions, Map.of());
        broker.createTopic(settings.definitionsTopic(), 2, compact);
        broker.createTopic(settings.acceptedDefinitionsTopic(), 2, compact);
        broker.createTopic(settings.allocationsTopic(), 2, compact);
        broker.createTopic(settings.decisionsTopic(), 2, Map.of());
        broker.createTopic(settings.rejectedTopic(), 1, Map.of());
    }

    /**
     * The job's Kafka Streams settings for application {@code applicationId} on {@code broker}: two stream
     * threads, state in {@code stateDir}, reading topics from their start.
     */
    static Properties twoThreads(TopologySettings settings, JobCounters counters, String applicationId,
                                 EmbeddedKafkaBroker broker, Path stateDir) {
        return RunoffTopology.streamsConfig(settings, counters, Map.of(
                StreamsConfig.APPLICATION_ID_CONFIG, applicationId,
                StreamsConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers(),
                StreamsConfig.NUM_STREAM_THREADS_CONFIG, 2,
                StreamsConfig.STATE_DIR_CONFIG, stateDir.toString(),
                StreamsConfig.consumerPrefix("auto.offset.reset"), "earliest"));
    }

    /** Sends {@code definitions} to the definitions topic and waits until {@code streams} has accepted them. */
    static void define(KafkaStreams streams, KafkaProducer<String, byte[]> producer, TopologySettings settings,
                       List<ExperimentDefinition> definitions, Duration timeout) throws InterruptedException {
        for (ExperimentDefinition def : definitions) {
            producer.send(new ProducerRecord<>(settings.definitionsTopic(), def.getExperimentId(),
                    RecordCodec.definitions().encode(def)));
        }
        producer.flush();
        awaitAccepted(streams, definitions.size(), timeout);
    }

    /** Waits until the definitions store holds at least {@code count} entries, failing after {@code timeout}. */
    static void awaitAccepted(KafkaStreams streams, int count, Duration timeout) throws InterruptedException {
        long deadline = System.nanoTime() + timeout.toNanos();
        while (System.nanoTime() < deadline) {
            ReadOnlyKeyValueStore<String, byte[]> store = streams.store(StoreQueryParameters.fromNameAndType(
                    RunoffTopology.DEFINITIONS_STORE, QueryableStoreTypes.keyValueStore()));
            if (store.approximateNumEntries() >= count) {
                return;
            }
            Thread.sleep(100);
        }
        throw new AssertionError("definitions were not accepted within " + timeout);
    }
}
