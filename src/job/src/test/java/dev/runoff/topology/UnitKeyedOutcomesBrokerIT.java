package dev.runoff.topology;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.broker.EmbeddedKafkaBroker;
import dev.runoff.records.Decoded;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.testkit.Directories;
import dev.runoff.testkit.TestDefinitions;
import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Properties;
import java.util.SplittableRandom;
import java.util.TreeMap;
import java.util.zip.CRC32;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.streams.KafkaStreams;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/**
 * {@code runoff.outcomes.keyed.by.unit=true} on a real broker (one embedded KRaft broker, exactly_once_v2, two
 * stream threads, a four-partition outcomes topic): the events of each unit are written by producers that
 * disagree on where they go (the Java client's default partitioner on the unit id, CRC32 of the unit id,
 * keyed by event id, no key), duplicates by yet another way; the folded counts still equal the produced truth.
 */
class UnitKeyedOutcomesBrokerIT {

    private static final Duration TIMEOUT = Duration.ofSeconds(90);
    private static final int PARTITIONS = 4;
    private static final int UNITS_PER_EXPERIMENT = 1_000;
    private static final TopologySettings SETTINGS = TopologySettings.fromMap(Map.of(
            TopologySettings.FLUSH_INTERVAL_KEY, 200, TopologySettings.ALLOCATE_INTERVAL_KEY, 200,
            TopologySettings.OUTCOMES_KEYED_BY_UNIT_KEY, "true"));

    private static EmbeddedKafkaBroker broker;

    @BeforeAll
    static void startBroker() {
        broker = EmbeddedKafkaBroker.builder(Directories.fresh("unit-keyed")).build().start();
        BrokerRuns.createTopics(broker, SETTINGS, PARTITIONS);
    }

    @AfterAll
    static void stopBroker() {
        broker.close();
    }

    @Test
    void countsAreExactWhicheverPartitionerEachEventCameBy() throws Exception {
        List<ExperimentDefinition> definitions = List.of(endless(TestDefinitions.bernoulli("hero", "a", "b")),
                endless(TestDefinitions.bernoulli("cta", "red", "green", "blue")));
        JobCounters counters = new JobCounters();
        Properties props = BrokerRuns.twoThreads(SETTINGS, counters, "runoff-unit-keyed", broker,
                Directories.fresh("unit-keyed-state"));
        try (KafkaStreams streams = new KafkaStreams(RunoffTopology.build(SETTINGS, props, counters), props);
             KafkaProducer<String, byte[]> producer = BrokerFixture.producer(broker)) {
            BrokerFixture.startAndAwaitRunning(streams, TIMEOUT);
            BrokerRuns.define(streams, producer, SETTINGS, definitions, TIMEOUT);
            Map<String, long[][]> truth = produce(producer, definitions);
            producer.flush();

            Map<String, DecisionRecord> latest = awaitCounts(truth);
            for (ExperimentDefinition def : definitions) {
                String id = def.getExperimentId();
                assertEquals(list(truth.get(id)[1]), latest.get(id).getArms().stream().map(ArmState::getSuccesses)
                        .toList(), id + " successes");
            }
            assertTrue(counters.inPlaceEvents() > 0, "some events were on their unit's partition");
            assertTrue(counters.reroutedEvents() > 0, "some were rerouted");
            assertEquals(counters.count(JobCounters.EARLY_HELD), counters.count(JobCounters.EARLY_MATCHED),
                    "a click that overtook its exposure on the other path waited for it: " + counters.snapshot());
            assertEquals(List.of(), counters.snapshot().keySet().stream().filter(k -> !List.of(JobCounters.DUPLICATE,
                    JobCounters.EARLY_HELD, JobCounters.EARLY_MATCHED).contains(k)).toList(), "nothing rejected");
        }
    }

    /** Each unit: one exposure, a click for some; each event, and a 5% resend, by a random one of four ways. */
    private static Map<String, long[][]> produce(KafkaProducer<String, byte[]> producer,
                                                 List<ExperimentDefinition> definitions) {
        SplittableRandom random = new SplittableRandom(15);
        Map<String, long[][]> truth = new TreeMap<>();
        long now = System.currentTimeMillis();
        for (int i = 0; i < UNITS_PER_EXPERIMENT; i++) {
            for (ExperimentDefinition def : definitions) {
                String id = def.getExperimentId();
                long[][] counts = truth.computeIfAbsent(id, k -> new long[2][def.getArms().size()]);
                int arm = random.nextInt(def.getArms().size());
                String unit = id + "-visitor-" + i;
                send(producer, random, unit, unit + "-x", Events.exposure(id, unit, unit + "-x",
                        def.getArms().get(arm), now));
                counts[0][arm]++;
                if (random.nextDouble() < 0.2) {
                    send(producer, random, unit, unit + "-c", Events.click(id, unit, unit + "-c", null, now + 100));
                    counts[1][arm]++;
                }
            }
        }
        return truth;
    }

    private static void send(KafkaProducer<String, byte[]> producer, SplittableRandom random, String unit,
                             String eventId, byte[] event) {
        int copies = random.nextDouble() < 0.05 ? 2 : 1;
        for (int copy = 0; copy < copies; copy++) {
            producer.send(switch (random.nextInt(4)) {
                case 0 -> new ProducerRecord<>(SETTINGS.outcomesTopic(), unit, event);
                case 1 -> new ProducerRecord<>(SETTINGS.outcomesTopic(), crc32(unit), unit, event);
                case 2 -> new ProducerRecord<>(SETTINGS.outcomesTopic(), eventId, event);
                default -> new ProducerRecord<>(SETTINGS.outcomesTopic(), null, event);
            });
        }
    }

    /** The partition a CRC32 partitioner picks for {@code key} (CRC32 of its UTF-8 bytes modulo the count). */
    private static int crc32(String key) {
        CRC32 crc = new CRC32();
        crc.update(key.getBytes(StandardCharsets.UTF_8));
        return (int) (crc.getValue() % PARTITIONS);
    }

    /** Reads decisions until the latest of every experiment holds the true trial counts; returns those. */
    private static Map<String, DecisionRecord> awaitCounts(Map<String, long[][]> truth) {
        List<ConsumerRecord<String, byte[]>> received = new ArrayList<>();
        try (KafkaConsumer<String, byte[]> reader = BrokerFixture.reader(broker, SETTINGS.decisionsTopic())) {
            boolean done = BrokerFixture.pollUntil(reader, received, records -> truth.entrySet().stream()
                    .allMatch(e -> latest(records).containsKey(e.getKey()) && trials(latest(records).get(e.getKey()))
                            .equals(list(e.getValue()[0]))), TIMEOUT);
            Map<String, DecisionRecord> latest = latest(received);
            assertTrue(done, "final trial counts not reached; truth " + truth.keySet().stream()
                    .map(id -> id + "=" + list(truth.get(id)[0])).toList() + ", latest " + latest.keySet().stream()
                    .map(id -> id + "=" + trials(latest.get(id))).toList());
            return latest;
        }
    }

    private static Map<String, DecisionRecord> latest(List<ConsumerRecord<String, byte[]>> records) {
        Map<String, DecisionRecord> latest = new TreeMap<>();
        for (ConsumerRecord<String, byte[]> r : records) {
            Decoded<DecisionRecord> decoded = RecordCodec.decisionRecords().decode(r.value(), r.timestamp());
            assertTrue(decoded.isValid(), decoded.toString());
            latest.put(r.key(), decoded.orThrow());
        }
        return latest;
    }

    private static List<Long> trials(DecisionRecord record) {
        return record.getArms().stream().map(ArmState::getTrials).toList();
    }

    private static List<Long> list(long[] counts) {
        return java.util.Arrays.stream(counts).boxed().toList();
    }

    /** Never stops, recomputes every second, 15 s conversion window: the counts are read from CONTINUE decisions. */
    private static ExperimentDefinition endless(ExperimentDefinition def) {
        return BrokerRuns.endless(TestDefinitions.withWindow(def, 15_000));
    }
}
