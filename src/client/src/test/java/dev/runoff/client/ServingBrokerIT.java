package dev.runoff.client;

import dev.runoff.testkit.Await;

import dev.runoff.testkit.Directories;

import static dev.runoff.client.ControlRecords.NOW;
import static dev.runoff.client.ControlRecords.avro;
import static dev.runoff.client.ControlRecords.json;
import static dev.runoff.client.ControlRecords.running;
import static dev.runoff.client.ControlRecords.stopped;
import static dev.runoff.client.ControlRecords.validUntil;
import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.broker.EmbeddedKafkaBroker;
import dev.runoff.records.Decoded;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.OutcomeEvent;
import dev.runoff.client.example.ServingTier;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneOffset;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.Map;
import java.util.function.BooleanSupplier;
import java.util.stream.Stream;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.admin.AdminClientConfig;
import org.apache.kafka.clients.admin.NewPartitions;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.serialization.ByteArrayDeserializer;
import org.apache.kafka.common.serialization.ByteArraySerializer;
import org.apache.kafka.common.serialization.StringDeserializer;
import org.apache.kafka.common.serialization.StringSerializer;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/** The follower, the table and the outcome reporter against one real embedded broker. */
class ServingBrokerIT {
    private static final Duration WAIT = Duration.ofSeconds(20);
    private static final Map<String, String> COMPACTED = Map.of("cleanup.policy", "compact");

    private static EmbeddedKafkaBroker broker;
    private static KafkaProducer<String, byte[]> producer;

    @BeforeAll
    static void startBroker() throws IOException {
        broker = EmbeddedKafkaBroker.builder(Directories.fresh("serving")).build().start();
        producer = new KafkaProducer<>(producerProps(null), new StringSerializer(), new ByteArraySerializer());
    }

    @AfterAll
    static void stopBroker() {
        producer.close();
        broker.close();
    }

    @Test
    void tableFollowsUpdatesTombstonesStaleRecordsStopAndSkipsMalformedOnes() {
        broker.createTopic("ctl-follow", 3, COMPACTED);
        send("ctl-follow", "e1", avro(running("e1", 1, "a", 1.0, "b", 0.0)));
        send("ctl-follow", "e2", json(running("e2", 1, "a", 0.0, "b", 1.0)));
        send("ctl-follow", "e3", avro(running("e3", 1, "a", 1.0, "b", 0.0)));
        send("ctl-follow", "e3", null);
        MutableClock clock = new MutableClock(NOW);
        AllocationTable table = AllocationTable.create(PickPolicy.builder("fallback")
                .staleFallback(StaleFallback.DEFAULT_ARM).afterStop(StoppedPick.WINNER).build(), clock);
        try (ControlTopicFollower follower = follow(table, "ctl-follow")) {
            // caught up before start returned: no waiting here
            assertEquals("a", table.pick("e1", "u"));
            assertEquals("b", table.pick("e2", "u"));
            assertEquals("fallback", table.pick("e3", "u"));

            send("ctl-follow", "e1", "{not a control record".getBytes(StandardCharsets.UTF_8));
            send("ctl-follow", "e1", avro(running("e1", 2, "a", 0.0, "b", 1.0)));
            Await.until("e1 to pick arm b", WAIT, () -> "b".equals(table.pick("e1", "u")));
            assertEquals(1, table.metrics().malformedRecords());

            send("ctl-follow", "e2", null);
            Await.until("e2 to leave the table", WAIT, () -> !table.contains("e2"));
            assertEquals("fallback", table.pick("e2", "u"));

            send("ctl-follow", "e4", avro(validUntil(running("e4", 1, "a", 1.0, "b", 0.0), NOW + 1_000)));
            Await.until("e4 in the table", WAIT, () -> table.contains("e4"));
            assertEquals("a", table.pick("e4", "u"));
            clock.set(NOW + 1_001);
            long staleBefore = table.metrics().stalePicks();
            assertEquals("fallback", table.pick("e4", "u"));
            assertEquals(staleBefore + 1, table.metrics().stalePicks());

            send("ctl-follow", "e1", avro(stopped("e1", 3, "a", "a", 0.5, "b", 0.5)));
            Await.until("e1 at sequence 3", WAIT, () -> table.current("e1").map(r -> r.getSequence() == 3).orElse(false));
            for (int i = 0; i < 1_000; i++) {
                assertEquals("a", table.pick("e1", "user-" + i));
            }
            assertTrue(follower.isRunning());
        }
    }

    @Test
    void abortedTransactionsOfTheJobAreNeverApplied() {
        broker.createTopic("ctl-tx", 1, COMPACTED);
        try (KafkaProducer<String, byte[]> job = new KafkaProducer<>(producerProps("job-1"), new StringSerializer(),
                new ByteArraySerializer())) {
            job.initTransactions();
            job.beginTransaction();
            job.send(new ProducerRecord<>("ctl-tx", "e1", avro(running("e1", 1, "a", 1.0, "b", 0.0))));
            job.commitTransaction();
            job.beginTransaction();
            job.send(new ProducerRecord<>("ctl-tx", "e1", avro(running("e1", 2, "a", 0.0, "b", 1.0))));
            job.flush();
            job.abortTransaction();
        }
        AllocationTable table = table(new MutableClock(NOW));
        // the log ends with a transaction marker: start must still see itself caught up
        try (ControlTopicFollower follower = follow(table, "ctl-tx")) {
            assertEquals("a", table.pick("e1", "u"));
            assertEquals(1, table.current("e1").orElseThrow().getSequence());
        }
    }

    @Test
    void hashedPicksAreStablePerUnitAndFollowTheWeights() {
        broker.createTopic("ctl-picks", 2, COMPACTED);
        send("ctl-picks", "layout", avro(running("layout", 5, "a", 0.5, "b", 0.3, "c", 0.15, "d", 0.05)));
        AllocationTable table = table(new MutableClock(NOW));
        AllocationTable replica = table(new MutableClock(NOW));
        try (ControlTopicFollower first = follow(table, "ctl-picks");
             ControlTopicFollower second = follow(replica, "ctl-picks")) {
            long[] counts = ArmCounts.tally(List.of("a", "b", "c", "d"), 100_000,
                    i -> table.pick("layout", "user-" + i));
            // Pearson's chi-square goodness of fit (Apache Commons Math ChiSquareTest), alpha = 0.001
            double p = ArmCounts.pValue(new double[] {0.5, 0.3, 0.15, 0.05}, counts);
            assertTrue(p > ArmCounts.ALPHA, "p = " + p + " for " + java.util.Arrays.toString(counts));

            String[] before = picks(table, 10_000);
            assertArrayEquals(before, picks(replica, 10_000));
            send("ctl-picks", "layout", avro(running("layout", 6, "a", 0.5, "b", 0.3, "c", 0.15, "d", 0.05)));
            Await.until("layout at sequence 6", WAIT, () -> table.current("layout").orElseThrow().getSequence() == 6);
            assertArrayEquals(before, picks(table, 10_000), "a heartbeat must not move units");
        }
    }

    @Test
    void partitionsAddedLaterAreFollowed() throws Exception {
        broker.createTopic("ctl-grow", 1, COMPACTED);
        AllocationTable table = table(Clock.systemUTC());
        try (ControlTopicFollower follower = ControlTopicFollower.builder(table, broker.bootstrapServers())
                .topic("ctl-grow").partitionRefresh(Duration.ofMillis(100)).start();
             Admin admin = Admin.create(Map.of(AdminClientConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers()))) {
            admin.createPartitions(Map.of("ctl-grow", NewPartitions.increaseTo(3))).all().get();
            // valid far beyond the system clock's now, so that the pick below follows the weights, not a stale fallback
            AllocationUpdate e9 = validUntil(running("e9", 1, "a", 0.0, "b", 1.0), Long.MAX_VALUE);
            producer.send(new ProducerRecord<>("ctl-grow", 2, "e9", avro(e9))).get();
            Await.until("e9 in the table", WAIT, () -> table.contains("e9"));
            assertEquals("b", table.pick("e9", "u"));
        }
    }

    @Test
    void missingTopicEndsStartWithinTheTimeout() {
        AllocationTable table = table(new MutableClock(NOW));
        long began = System.nanoTime();
        CatchUpTimeoutException e = assertThrows(CatchUpTimeoutException.class,
                () -> ControlTopicFollower.builder(table, broker.bootstrapServers()).topic("no-such-topic")
                        .startupTimeout(Duration.ofSeconds(2)).errorBackoff(Duration.ofMillis(200)).start());
        assertTrue(e.getMessage().contains("no-such-topic"), e.getMessage());
        assertTrue(System.nanoTime() - began < Duration.ofSeconds(15).toNanos(), "start and close took too long");
    }

    @Test
    void exposuresOnTheOutcomeTopicPassTheJobsValidation() {
        broker.createTopic("outcomes-check", 2, Map.of());
        Clock clock = Clock.fixed(Instant.ofEpochMilli(NOW), ZoneOffset.UTC);
        OutcomeReporter reporter = OutcomeReporter.builder(producer, UnitPseudonymizer.withKey(new byte[32]))
                .topic("outcomes-check").clock(clock).build();
        reporter.exposure("e1", "alice", "a", "req-1");
        reporter.exposure("e1", "bob", "b", "req-2");
        producer.flush();
        List<ConsumerRecord<String, byte[]>> records = readAll("outcomes-check", 2);
        assertEquals(2, records.size());
        for (ConsumerRecord<String, byte[]> record : records) {
            // the job's own validation, at the same "now"
            Decoded<OutcomeEvent> decoded = RecordCodec.outcomeEvents().decode(record.value(), NOW);
            assertTrue(decoded.isValid(), decoded.toString());
            assertEquals(EventType.EXPOSURE, decoded.orThrow().getType());
            assertEquals(record.key(), decoded.orThrow().getUnitId());
            assertFalse(new String(record.value(), StandardCharsets.UTF_8).contains("alice"));
        }
    }

    @Test
    void readmeExampleServesTheWeightsAndReportsExposuresAndClicks() {
        broker.createTopic(ControlTopicFollower.DEFAULT_TOPIC, 3, COMPACTED);
        broker.createTopic(OutcomeReporter.DEFAULT_TOPIC, 3, Map.of());
        send(ControlTopicFollower.DEFAULT_TOPIC, "checkout-button",
                avro(running("checkout-button", 1, "control", 0.0, "green", 1.0)));
        Clock clock = Clock.fixed(Instant.ofEpochMilli(NOW), ZoneOffset.UTC);
        byte[] key = "a secret of at least thirty-two bytes!".getBytes(StandardCharsets.UTF_8);
        try (ServingTier tier = new ServingTier(broker.bootstrapServers(), key, clock)) {
            ArmAssignment served = tier.buttonColour("alice", "req-1");
            assertEquals("green", served.arm());
            tier.clicked(served, "click-1");
        }
        List<ConsumerRecord<String, byte[]>> records = readAll(OutcomeReporter.DEFAULT_TOPIC, 2);
        assertEquals(2, records.size());
        List<EventType> types = new ArrayList<>();
        for (ConsumerRecord<String, byte[]> record : records) {
            OutcomeEvent event = RecordCodec.outcomeEvents().decode(record.value(), NOW).orThrow();
            types.add(event.getType());
            assertEquals(UnitPseudonymizer.withKey(key).pseudonym("alice"), event.getUnitId());
            assertEquals("green", event.getArm(), "every event carries the served arm");
        }
        types.sort(Comparator.naturalOrder());
        assertEquals(List.of(EventType.EXPOSURE, EventType.CLICK), types);
    }

    private static AllocationTable table(Clock clock) {
        return AllocationTable.create(PickPolicy.builder("fallback").build(), clock);
    }

    private static ControlTopicFollower follow(AllocationTable table, String topic) {
        return ControlTopicFollower.builder(table, broker.bootstrapServers()).topic(topic)
                .pollTimeout(Duration.ofMillis(100)).start();
    }

    private static String[] picks(AllocationTable table, int n) {
        String[] arms = new String[n];
        for (int i = 0; i < n; i++) {
            arms[i] = table.pick("layout", "user-" + i);
        }
        return arms;
    }

    private static void send(String topic, String key, byte[] value) {
        try {
            producer.send(new ProducerRecord<>(topic, key, value)).get();
        } catch (Exception e) {
            throw new AssertionError("could not send to " + topic, e);
        }
    }


    private static List<ConsumerRecord<String, byte[]>> readAll(String topic, int expected) {
        Map<String, Object> props = Map.of(ConsumerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers(),
                ConsumerConfig.AUTO_OFFSET_RESET_CONFIG, "earliest");
        List<ConsumerRecord<String, byte[]>> records = new ArrayList<>();
        try (KafkaConsumer<String, byte[]> consumer = new KafkaConsumer<>(props, new StringDeserializer(),
                new ByteArrayDeserializer())) {
            consumer.assign(consumer.partitionsFor(topic).stream()
                    .map(p -> new TopicPartition(topic, p.partition())).toList());
            long deadline = System.nanoTime() + WAIT.toNanos();
            while (records.size() < expected && System.nanoTime() < deadline) {
                consumer.poll(Duration.ofMillis(200)).forEach(records::add);
            }
        }
        return records;
    }

    private static Map<String, Object> producerProps(String transactionalId) {
        Map<String, Object> props = new java.util.HashMap<>(Map.of(
                ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers(),
                ProducerConfig.ACKS_CONFIG, "all"));
        if (transactionalId != null) {
            props.put(ProducerConfig.TRANSACTIONAL_ID_CONFIG, transactionalId);
        }
        return props;
    }

}
