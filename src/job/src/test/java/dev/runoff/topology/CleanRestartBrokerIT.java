package dev.runoff.topology;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.broker.EmbeddedKafkaBroker;
import dev.runoff.records.Decoded;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.testkit.Await;
import dev.runoff.testkit.Directories;
import dev.runoff.testkit.TestDefinitions;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Properties;
import java.util.TreeMap;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.atomic.LongAdder;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.streams.CloseOptions;
import org.apache.kafka.streams.KafkaStreams;
import org.apache.kafka.streams.processor.StateRestoreListener;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/**
 * A clean restart on a real broker (one embedded KRaft broker, exactly_once_v2, two stream threads): the job
 * counts events, is closed, and is started again on the same state directory. The second start must restore
 * nothing from the changelogs of the tasks' stores (a state restore listener counts the records restored), and
 * the state it kept must still count: the same events sent again are duplicates, new events add to the counts.
 *
 * <p>Under exactly-once, Kafka Streams 4.4 treats a persistent logged store that has local data but no committed
 * changelog offset as possibly holding uncommitted writes, wipes the whole task and restores it from its
 * changelogs (ProcessorStateManager.initializeStoreOffsets, read from the 4.4 class files). A window store keeps
 * its committed offset in its segments, so one that was never written (the earlier store of event ids) has none.
 */
class CleanRestartBrokerIT {

    private static final Duration TIMEOUT = Duration.ofSeconds(90);
    private static final int UNITS = 400;
    private static final TopologySettings SETTINGS = TopologySettings.fromMap(Map.of(
            TopologySettings.FLUSH_INTERVAL_KEY, 200, TopologySettings.ALLOCATE_INTERVAL_KEY, 200));
    private static final ExperimentDefinition HERO = BrokerRuns.endless(TestDefinitions.perExposure(
            TestDefinitions.bernoulli("hero", "a", "b")));

    private static EmbeddedKafkaBroker broker;

    @BeforeAll
    static void startBroker() {
        broker = EmbeddedKafkaBroker.builder(Directories.fresh("clean-restart")).build().start();
        BrokerRuns.createTopics(broker, SETTINGS, 2);
    }

    @AfterAll
    static void stopBroker() {
        broker.close();
    }

    @Test
    void aCleanRestartRestoresNoRecordAndKeepsCounting() throws Exception {
        Path stateDir = Directories.fresh("clean-restart-state");
        long[] truth = new long[2];
        try (KafkaProducer<String, byte[]> producer = BrokerFixture.producer(broker)) {
            JobCounters first = new JobCounters();
            KafkaStreams streams = start(first, stateDir, new RestoredRecords());
            BrokerRuns.define(streams, producer, SETTINGS, List.of(HERO), TIMEOUT);
            exposures(producer, 0, UNITS, truth);
            awaitTrials(truth);
            assertTrue(streams.close(CloseOptions.groupMembershipOperation(
                    CloseOptions.GroupMembershipOperation.LEAVE_GROUP).withTimeout(TIMEOUT)), "closed cleanly");

            JobCounters second = new JobCounters();
            RestoredRecords restored = new RestoredRecords();
            streams = start(second, stateDir, restored);
            try {
                exposures(producer, 0, UNITS / 4, new long[2]);
                exposures(producer, UNITS, UNITS + UNITS / 2, truth);
                Await.until("the events sent again counted as duplicates", TIMEOUT,
                        () -> second.count(JobCounters.DUPLICATE) >= UNITS / 4);
                awaitTrials(truth);
                assertEquals(UNITS / 4, second.count(JobCounters.DUPLICATE), "exactly the events sent again");
                assertEquals(Map.of(), restored.taskStores(), "records restored into the tasks' stores");
                assertEquals(1L, restored.of(RunoffTopology.DEFINITIONS_STORE),
                        "the in-memory global store reloads its one definition, as at every start");
            } finally {
                streams.close(TIMEOUT);
            }
        }
    }

    private static KafkaStreams start(JobCounters counters, Path stateDir, StateRestoreListener listener)
            throws InterruptedException {
        Properties props = BrokerRuns.twoThreads(SETTINGS, counters, "runoff-clean-restart", broker, stateDir);
        KafkaStreams streams = new KafkaStreams(RunoffTopology.build(SETTINGS, props, counters), props);
        streams.setGlobalStateRestoreListener(listener);
        BrokerFixture.startAndAwaitRunning(streams, TIMEOUT);
        return streams;
    }

    /** One exposure for each unit {@code from} (inclusive) to {@code to}, on arm a or b, counted in {@code truth}. */
    private static void exposures(KafkaProducer<String, byte[]> producer, int from, int to, long[] truth) {
        long now = System.currentTimeMillis();
        for (int i = from; i < to; i++) {
            String unit = "visitor-" + i;
            int arm = i % 3 == 0 ? 1 : 0;
            producer.send(new ProducerRecord<>(SETTINGS.outcomesTopic(), unit,
                    Events.exposure("hero", unit, unit + "-x", HERO.getArms().get(arm), now)));
            truth[arm]++;
        }
        producer.flush();
    }

    /** Reads decisions until the latest holds {@code truth} as its trial counts. */
    private static void awaitTrials(long[] truth) {
        List<Long> expected = List.of(truth[0], truth[1]);
        List<ConsumerRecord<String, byte[]>> received = new ArrayList<>();
        try (KafkaConsumer<String, byte[]> reader = BrokerFixture.reader(broker, SETTINGS.decisionsTopic())) {
            boolean done = BrokerFixture.pollUntil(reader, received,
                    records -> expected.equals(latestTrials(records)), TIMEOUT);
            assertTrue(done, "trial counts " + expected + " not reached; latest " + latestTrials(received));
        }
    }

    private static List<Long> latestTrials(List<ConsumerRecord<String, byte[]>> records) {
        if (records.isEmpty()) {
            return List.of();
        }
        ConsumerRecord<String, byte[]> last = records.get(records.size() - 1);
        Decoded<DecisionRecord> decoded = RecordCodec.decisionRecords().decode(last.value(), last.timestamp());
        assertTrue(decoded.isValid(), decoded.toString());
        return decoded.orThrow().getArms().stream().map(ArmState::getTrials).toList();
    }

    /**
     * Records restored per store, from every restore Kafka Streams reports. The global store of accepted
     * definitions is in memory and reloaded from its topic at every start, so {@link #taskStores} leaves it out.
     */
    private static final class RestoredRecords implements StateRestoreListener {
        private final Map<String, LongAdder> byStore = new ConcurrentHashMap<>();

        @Override
        public void onRestoreStart(TopicPartition partition, String store, long startingOffset, long endingOffset) {
        }

        @Override
        public void onBatchRestored(TopicPartition partition, String store, long batchEndOffset, long numRestored) {
            byStore.computeIfAbsent(store, s -> new LongAdder()).add(numRestored);
        }

        @Override
        public void onRestoreEnd(TopicPartition partition, String store, long totalRestored) {
        }

        long of(String store) {
            LongAdder n = byStore.get(store);
            return n == null ? 0 : n.sum();
        }

        Map<String, Long> taskStores() {
            Map<String, Long> restored = new TreeMap<>();
            byStore.forEach((store, n) -> {
                if (!store.equals(RunoffTopology.DEFINITIONS_STORE) && n.sum() > 0) {
                    restored.put(store, n.sum());
                }
            });
            return restored;
        }
    }
}
