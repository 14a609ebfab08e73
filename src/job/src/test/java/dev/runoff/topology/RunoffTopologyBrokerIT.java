package dev.runoff.topology;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.broker.EmbeddedKafkaBroker;
import dev.runoff.records.Decoded;
import dev.runoff.records.HashChain;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.testkit.Directories;
import dev.runoff.testkit.TestDefinitions;
import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.OptionalInt;
import java.util.Properties;
import java.util.SplittableRandom;
import java.util.TreeMap;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.streams.KafkaStreams;
import org.apache.kafka.streams.StreamsConfig;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/**
 * The job against a real broker (one embedded KRaft broker for the class) with exactly_once_v2 and two
 * stream threads: thousands of events over several experiments on a four-partition input, with duplicates
 * and bad records mixed in.
 */
class RunoffTopologyBrokerIT {

    private static final Duration TIMEOUT = Duration.ofSeconds(60);
    private static final TopologySettings SETTINGS = TopologySettings.fromMap(Map.of(
            TopologySettings.FLUSH_INTERVAL_KEY, 200, TopologySettings.ALLOCATE_INTERVAL_KEY, 200));
    private static final int UNITS_PER_EXPERIMENT = 1_500;
    private static final int BAD_EVENTS = 20;

    private static EmbeddedKafkaBroker broker;

    @BeforeAll
    static void startBroker() {
        broker = EmbeddedKafkaBroker.builder(Directories.fresh("topology")).build().start();
        BrokerRuns.createTopics(broker, SETTINGS, 4);
    }

    @AfterAll
    static void stopBroker() {
        broker.close();
    }

    @Test
    void foldedCountsEqualTheProducedTruthExactlyOnce() throws Exception {
        // Unit counting with a 15 s conversion window: each unit has one exposure and at most one click 100 ms
        // later (all stamped when production starts), so the counts equal the produced truth once the windows
        // have closed; the window covers the time the test takes to produce and the job to read the events.
        List<ExperimentDefinition> definitions = List.of(
                BrokerRuns.endless(short3s(TestDefinitions.bernoulli("hero", "a", "b"))),
                BrokerRuns.endless(short3s(TestDefinitions.bernoulli("cta", "red", "green", "blue"))),
                BrokerRuns.endless(short3s(TestDefinitions.bernoulli("menu", "w", "x", "y", "z"))),
                BrokerRuns.endless(TestDefinitions.value("price", "low", "high")));
        JobCounters counters = new JobCounters();
        Properties props = BrokerRuns.twoThreads(SETTINGS, counters, "runoff-e2e", broker,
                Directories.fresh("topology-state"));
        try (KafkaStreams streams = new KafkaStreams(RunoffTopology.build(SETTINGS, props, counters), props);
             KafkaProducer<String, byte[]> producer = BrokerFixture.producer(broker)) {
            BrokerFixture.startAndAwaitRunning(streams, TIMEOUT);
            BrokerRuns.define(streams, producer, SETTINGS, definitions, TIMEOUT);
            Truth truth = produceEvents(producer, definitions);
            producer.flush();

            Map<String, List<DecisionRecord>> chains = awaitDecisions(truth);
            for (ExperimentDefinition def : definitions) {
                String id = def.getExperimentId();
                DecisionRecord last = chains.get(id).get(chains.get(id).size() - 1);
                assertEquals(truth.trials(id), trials(last), id + " trials");
                if (def.getMetric().getSuccessEvent() != null) {
                    assertEquals(truth.successes(id), successes(last), id + " successes");
                } else {
                    assertMeans(truth, def, last);
                }
                assertChain(id, chains.get(id));
            }
            assertAllocations(definitions);
            assertRejected();
            assertTrue(counters.count(JobCounters.DUPLICATE) >= truth.duplicates, "duplicates dropped and counted");
        }
    }

    @Test
    void exceptionHandlersDeadLetterOnTheRealBroker() throws Exception {
        TopologySettings flaky = TopologySettings.fromMap(Map.of(TopologySettings.REJECTED_TOPIC_KEY,
                "flaky.rejected"));
        broker.createTopic("in", 1, Map.of());
        broker.createTopic("out", 1, Map.of());
        broker.createTopic("flaky.rejected", 1, Map.of());
        JobCounters counters = new JobCounters();
        Properties props = RunoffTopology.streamsConfig(flaky, counters, Map.of(
                StreamsConfig.APPLICATION_ID_CONFIG, "runoff-flaky",
                StreamsConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers(),
                StreamsConfig.STATE_DIR_CONFIG, Directories.fresh("flaky-state").toString(),
                StreamsConfig.consumerPrefix("auto.offset.reset"), "earliest"));
        try (KafkaStreams streams = new KafkaStreams(DeadLetterHandlersTest.flakyTopology(), props);
             KafkaProducer<String, byte[]> producer = BrokerFixture.producer(broker)) {
            BrokerFixture.startAndAwaitRunning(streams, TIMEOUT);
            for (String value : List.of("fine", "boom", "also fine")) {
                producer.send(new ProducerRecord<>("in", value, value.getBytes(StandardCharsets.UTF_8)));
            }
            producer.flush();
            List<ConsumerRecord<String, byte[]>> dead = new ArrayList<>();
            try (KafkaConsumer<String, byte[]> reader = BrokerFixture.reader(broker, "flaky.rejected")) {
                assertTrue(BrokerFixture.pollUntil(reader, dead, r -> reasons(r).contains("processing-error")
                        && reasons(r).contains("punctuation-error"), TIMEOUT), "dead letters: " + reasons(dead));
            }
            ConsumerRecord<String, byte[]> boom = dead.stream()
                    .filter(r -> "processing-error".equals(header(r, Rejections.REASON_HEADER))).findFirst()
                    .orElseThrow();
            assertEquals("boom", boom.key());
            assertEquals("boom", new String(boom.value(), StandardCharsets.UTF_8));
            List<ConsumerRecord<String, byte[]>> out = new ArrayList<>();
            try (KafkaConsumer<String, byte[]> reader = BrokerFixture.reader(broker, "out")) {
                assertTrue(BrokerFixture.pollUntil(reader, out, r -> r.stream().map(ConsumerRecord::key).toList()
                        .containsAll(List.of("fine", "also fine", "tick")), TIMEOUT), "processing went on");
            }
            assertEquals(KafkaStreams.State.RUNNING, streams.state());
        }
    }

    /** Exposures (each unit on one arm), clicks or values, 5% sent twice, and some bad records. */
    private static Truth produceEvents(KafkaProducer<String, byte[]> producer, List<ExperimentDefinition> defs) {
        SplittableRandom random = new SplittableRandom(20_240_601L);
        Truth truth = new Truth();
        long now = System.currentTimeMillis();
        for (int i = 0; i < UNITS_PER_EXPERIMENT; i++) {
            for (ExperimentDefinition def : defs) {
                String id = def.getExperimentId();
                List<String> arms = def.getArms();
                int armIndex = random.nextInt(arms.size());
                String arm = arms.get(armIndex);
                String unit = id + "-u" + i;
                send(producer, random, truth, unit, Events.exposure(id, unit, unit + "-x", arm, now));
                truth.trial(id, arms, arm);
                if (def.getMetric().getSuccessEvent() != null) {
                    if (random.nextDouble() < 0.1 + 0.05 * armIndex) {
                        send(producer, random, truth, unit, Events.click(id, unit, unit + "-c", null, now + 100));
                        truth.success(id, arm);
                    }
                } else {
                    double value = Math.round((20 + 5 * armIndex + 4 * random.nextGaussian()) * 100) / 100.0;
                    send(producer, random, truth, unit, Events.value(id, unit, unit + "-v", null, now + 100, value));
                    truth.value(id, arm, value);
                }
            }
        }
        for (int i = 0; i < BAD_EVENTS; i++) {
            byte[] bad = i % 2 == 0 ? ("{\"experimentId\":\"hero\",\"unitId\":" + i).getBytes(StandardCharsets.UTF_8)
                    : Events.exposure("nobody", "u" + i, "b" + i, "a", now);
            producer.send(new ProducerRecord<>(SETTINGS.outcomesTopic(), "bad-" + i, bad));
        }
        return truth;
    }

    private static ExperimentDefinition short3s(ExperimentDefinition def) {
        return TestDefinitions.withWindow(def, 15_000);
    }

    private static void send(KafkaProducer<String, byte[]> producer, SplittableRandom random, Truth truth, String key,
                             byte[] event) {
        producer.send(new ProducerRecord<>(SETTINGS.outcomesTopic(), key, event));
        if (random.nextDouble() < 0.05) {
            producer.send(new ProducerRecord<>(SETTINGS.outcomesTopic(), key, event));
            truth.duplicates++;
        }
    }

    /** Reads decisions until the latest of every experiment holds the true trial counts. */
    private static Map<String, List<DecisionRecord>> awaitDecisions(Truth truth) {
        List<ConsumerRecord<String, byte[]>> received = new ArrayList<>();
        try (KafkaConsumer<String, byte[]> reader = BrokerFixture.reader(broker, SETTINGS.decisionsTopic())) {
            boolean done = BrokerFixture.pollUntil(reader, received, records -> {
                Map<String, List<DecisionRecord>> chains = chains(records);
                return truth.arms.keySet().stream().allMatch(id -> chains.containsKey(id)
                        && trials(chains.get(id).get(chains.get(id).size() - 1)).equals(truth.trials(id)));
            }, TIMEOUT);
            Map<String, List<DecisionRecord>> chains = chains(received);
            assertTrue(done, "final counts not reached; latest: " + latestCounts(chains) + ", truth " + truth.trials);
            return chains;
        }
    }

    private static Map<String, List<DecisionRecord>> chains(List<ConsumerRecord<String, byte[]>> records) {
        Map<String, List<DecisionRecord>> chains = new TreeMap<>();
        for (ConsumerRecord<String, byte[]> r : records) {
            Decoded<DecisionRecord> decoded = RecordCodec.decisionRecords().decode(r.value(), r.timestamp());
            assertTrue(decoded.isValid(), decoded.toString());
            DecisionRecord record = decoded.orThrow();
            assertEquals(r.key(), record.getExperimentId(), "decisions are keyed by experiment id");
            chains.computeIfAbsent(r.key(), k -> new ArrayList<>()).add(record);
        }
        return chains;
    }

    private static Map<String, List<Long>> latestCounts(Map<String, List<DecisionRecord>> chains) {
        Map<String, List<Long>> latest = new TreeMap<>();
        chains.forEach((id, chain) -> latest.put(id, trials(chain.get(chain.size() - 1))));
        return latest;
    }

    private static void assertChain(String id, List<DecisionRecord> chain) {
        for (int i = 0; i < chain.size(); i++) {
            assertEquals(i + 1, chain.get(i).getSequence(), id + " decision sequence");
        }
        assertEquals(OptionalInt.empty(), HashChain.firstBreak(chain), id + " hash chain");
    }

    private static void assertAllocations(List<ExperimentDefinition> definitions) {
        List<ConsumerRecord<String, byte[]>> received = new ArrayList<>();
        try (KafkaConsumer<String, byte[]> reader = BrokerFixture.reader(broker, SETTINGS.allocationsTopic())) {
            BrokerFixture.pollUntil(reader, received, r -> false, Duration.ofSeconds(2));
        }
        Map<String, Long> lastSequence = new HashMap<>();
        for (ConsumerRecord<String, byte[]> r : received) {
            AllocationUpdate update = RecordCodec.allocationUpdates().decode(r.value(), r.timestamp()).orThrow();
            assertEquals(r.key(), update.getExperimentId(), "control records are keyed by experiment id");
            long previous = lastSequence.getOrDefault(r.key(), 0L);
            assertEquals(previous + 1, update.getSequence(), r.key() + " control sequence");
            lastSequence.put(r.key(), update.getSequence());
        }
        assertEquals(definitions.size(), lastSequence.size());
    }

    private static void assertRejected() {
        List<ConsumerRecord<String, byte[]>> received = new ArrayList<>();
        try (KafkaConsumer<String, byte[]> reader = BrokerFixture.reader(broker, SETTINGS.rejectedTopic())) {
            BrokerFixture.pollUntil(reader, received, r -> r.size() >= BAD_EVENTS, TIMEOUT);
            BrokerFixture.pollUntil(reader, received, r -> false, Duration.ofSeconds(1));
        }
        assertEquals(BAD_EVENTS, received.size(), "exactly the bad records: " + reasons(received));
        Map<String, Long> byReason = new TreeMap<>();
        received.forEach(r -> byReason.merge(header(r, Rejections.REASON_HEADER), 1L, Long::sum));
        assertEquals(Map.of("malformed-json", 10L, "unknown-experiment", 10L), byReason);
        received.forEach(r -> assertNotNull(header(r, Rejections.SOURCE_HEADER)));
    }

    private static void assertMeans(Truth truth, ExperimentDefinition def, DecisionRecord last) {
        for (ArmState arm : last.getArms()) {
            double[] sum = truth.values.get(def.getExperimentId() + "/" + arm.getArm());
            assertEquals(sum[1] / sum[0], arm.getMean(), 1e-9, arm.getArm() + " mean");
            assertNull(arm.getSuccesses());
        }
    }

    private static List<Long> trials(DecisionRecord record) {
        return record.getArms().stream().map(ArmState::getTrials).toList();
    }

    private static List<Long> successes(DecisionRecord record) {
        return record.getArms().stream().map(ArmState::getSuccesses).toList();
    }

    private static List<String> reasons(List<ConsumerRecord<String, byte[]>> records) {
        return records.stream().map(r -> header(r, Rejections.REASON_HEADER)).toList();
    }

    private static String header(ConsumerRecord<?, ?> record, String name) {
        var header = record.headers().lastHeader(name);
        return header == null ? null : new String(header.value(), StandardCharsets.UTF_8);
    }

    /** What the job should count: every unit has one trial event and at most one success or value. */
    private static final class Truth {
        final Map<String, List<String>> arms = new TreeMap<>();
        final Map<String, Long> trials = new HashMap<>();
        final Map<String, Long> successes = new HashMap<>();
        final Map<String, double[]> values = new HashMap<>();
        long duplicates;

        void trial(String id, List<String> allArms, String arm) {
            arms.putIfAbsent(id, allArms);
            trials.merge(id + "/" + arm, 1L, Long::sum);
        }

        void success(String id, String arm) {
            successes.merge(id + "/" + arm, 1L, Long::sum);
        }

        void value(String id, String arm, double value) {
            double[] sum = values.computeIfAbsent(id + "/" + arm, k -> new double[2]);
            sum[0]++;
            sum[1] += value;
        }

        List<Long> trials(String id) {
            return arms.get(id).stream().map(arm -> trials.getOrDefault(id + "/" + arm, 0L)).toList();
        }

        List<Long> successes(String id) {
            return arms.get(id).stream().map(arm -> successes.getOrDefault(id + "/" + arm, 0L)).toList();
        }
    }
}
