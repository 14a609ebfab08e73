package dev.runoff.broker;

import dev.runoff.testkit.Directories;

import static dev.runoff.broker.BrokerTestSupport.pollAtLeast;
import static dev.runoff.broker.BrokerTestSupport.producer;
import static dev.runoff.broker.BrokerTestSupport.reader;
import static dev.runoff.broker.BrokerTestSupport.values;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.net.InetAddress;
import java.net.ServerSocket;
import java.time.Duration;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.ExecutionException;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.admin.AdminClientConfig;
import org.apache.kafka.clients.admin.Config;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.config.ConfigResource;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/** One real broker for the class: transactions, compaction, topic creation and start failures. */
class EmbeddedKafkaBrokerIT {
    private static GuardedBroker guarded;
    private static EmbeddedKafkaBroker broker;

    @BeforeAll
    static void startBroker() {
        guarded = GuardedBroker.start(EmbeddedKafkaBroker.builder(Directories.fresh("main"))
                // the cleaner otherwise sleeps 15 s between checks (Kafka docs, log.cleaner.backoff.ms)
                .property("log.cleaner.backoff.ms", "200"));
        broker = guarded.broker();
    }

    @AfterAll
    static void stopBroker() {
        guarded.close();
    }

    @Test
    void readCommittedConsumerSeesOnlyCommittedTransactions() {
        broker.createTopic("tx", 1, Map.of());
        try (KafkaProducer<String, String> producer = producer(broker, "tx-writer")) {
            producer.initTransactions();
            inTransaction(producer, true, "a1", "a2");
            inTransaction(producer, false, "b1");
            inTransaction(producer, true, "c1");
        }
        // Kafka docs (consumer config isolation.level): read_committed returns only messages of
        // committed transactions; read_uncommitted returns all, aborted ones included.
        try (KafkaConsumer<String, String> committed = reader(broker, "tx", "read_committed");
             KafkaConsumer<String, String> all = reader(broker, "tx", "read_uncommitted")) {
            assertEquals(List.of("a1", "a2", "c1"), values(pollAtLeast(committed, 3, Duration.ofSeconds(20))));
            assertEquals(List.of("a1", "a2", "b1", "c1"), values(pollAtLeast(all, 4, Duration.ofSeconds(20))));
        }
    }

    @Test
    void compactedTopicKeepsLatestValuePerKey() throws Exception {
        broker.createTopic("latest", 1, Map.of(
                "cleanup.policy", "compact",
                "segment.ms", "100",
                "min.cleanable.dirty.ratio", "0.01"));
        assertEquals("compact", topicConfig("latest").get("cleanup.policy").value());
        try (KafkaProducer<String, String> producer = producer(broker, null)) {
            for (int version = 1; version <= 3; version++) {
                for (String key : List.of("k1", "k2", "k3")) {
                    producer.send(new ProducerRecord<>("latest", key, key + "-v" + version));
                }
            }
            producer.flush();
            // Kafka docs (Log Compaction): the log retains at least the last value of each key; the
            // active segment is never cleaned, so keep rolling it with records of another key.
            Map<String, List<String>> byKey = awaitCompaction(producer, Duration.ofSeconds(45));
            assertEquals(Map.of("k1", List.of("k1-v3"), "k2", List.of("k2-v3"), "k3", List.of("k3-v3")), byKey);
        }
    }

    @Test
    void createTopicRejectsAnExistingNameAndIfAbsentReportsIt() {
        broker.createTopic("twice", 2, Map.of());
        IllegalStateException e = assertThrows(IllegalStateException.class,
                () -> broker.createTopic("twice", 2, Map.of()));
        assertTrue(e.getMessage().contains("'twice' already exists"), e.getMessage());
        assertFalse(broker.createTopicIfAbsent("twice", 5, Map.of()));
        assertTrue(broker.createTopicIfAbsent("once", 1, Map.of()));
    }

    @Test
    void createTopicNamesBadPartitionCount() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> broker.createTopic("none", 0, Map.of()));
        assertEquals("partitions of topic 'none' must be >= 1, got 0", e.getMessage());
    }

    @Test
    void startingARunningBrokerIsRejected() {
        IllegalStateException e = assertThrows(IllegalStateException.class, broker::start);
        assertTrue(e.getMessage().contains("already running at " + broker.bootstrapServers()), e.getMessage());
    }

    private static int freePort() throws IOException {
        try (ServerSocket socket = new ServerSocket(0, 1, InetAddress.getByName("127.0.0.1"))) {
            return socket.getLocalPort();
        }
    }

    @ParameterizedTest
    @ValueSource(booleans = {true, false})
    void busyFixedPortFailsWithMessageNamingTheListenerAndPort(boolean controllerBusy) throws IOException {
        try (ServerSocket taken = new ServerSocket(0, 1, InetAddress.getByName("127.0.0.1"))) {
            int busy = taken.getLocalPort();
            // the other port: one the system just handed out and took back (busy + 1 was used before, and the
            // system sometimes gave it to another socket meanwhile, which made the wrong listener fail)
            int other = freePort();
            EmbeddedKafkaBroker blocked = EmbeddedKafkaBroker.builder(Directories.fresh("blocked"))
                    .ports(controllerBusy ? other : busy, controllerBusy ? busy : other)
                    .build();
            EmbeddedBrokerException e = assertThrows(EmbeddedBrokerException.class, blocked::start);
            String listener = controllerBusy ? "CONTROLLER" : "PLAINTEXT";
            assertTrue(e.getMessage().startsWith("could not bind " + listener + " 127.0.0.1:" + busy + ": "),
                    e.getMessage());
            assertFalse(blocked.isRunning());
            // the probe kept the busy port away from Kafka, whose CONTROLLER bind failure halts the JVM
            assertEquals(List.of(), guarded.exitCalls());
        }
    }

    @Test
    void invalidBrokerPropertyFailsNamingIt() {
        EmbeddedKafkaBroker misconfigured = EmbeddedKafkaBroker.builder(Directories.fresh("misconfigured"))
                .property("num.network.threads", "many")
                .build();
        EmbeddedBrokerException e = assertThrows(EmbeddedBrokerException.class, misconfigured::start);
        assertTrue(e.getMessage().startsWith("could not start broker on "), e.getMessage());
        assertTrue(e.getMessage().contains("num.network.threads"), e.getMessage());
        assertFalse(misconfigured.isRunning());
    }

    private static void inTransaction(KafkaProducer<String, String> producer, boolean commit, String... values) {
        producer.beginTransaction();
        for (String value : values) {
            producer.send(new ProducerRecord<>("tx", value, value));
        }
        if (commit) {
            producer.commitTransaction();
        } else {
            producer.flush(); // written to the log first, else the abort may drop them unsent
            producer.abortTransaction();
        }
    }

    private static Map<String, List<String>> awaitCompaction(KafkaProducer<String, String> producer,
                                                             Duration timeout) throws InterruptedException {
        long deadline = System.nanoTime() + timeout.toNanos();
        Map<String, List<String>> byKey = readByKey();
        for (int roll = 0; !oneValuePerKey(byKey) && System.nanoTime() < deadline; roll++) {
            Thread.sleep(300);
            producer.send(new ProducerRecord<>("latest", "roll", "roll-" + roll));
            producer.flush();
            byKey = readByKey();
        }
        return byKey;
    }

    private static boolean oneValuePerKey(Map<String, List<String>> byKey) {
        return byKey.values().stream().allMatch(v -> v.size() == 1);
    }

    /** All values of keys other than the rolling key, read from the start of "latest". */
    private static Map<String, List<String>> readByKey() {
        Map<String, List<String>> byKey = new HashMap<>();
        try (KafkaConsumer<String, String> reader = reader(broker, "latest", "read_uncommitted")) {
            List<ConsumerRecord<String, String>> records = pollAtLeast(reader, 3, Duration.ofSeconds(10));
            records.stream().filter(r -> !r.key().equals("roll"))
                    .forEach(r -> byKey.computeIfAbsent(r.key(), k -> new ArrayList<>()).add(r.value()));
        }
        return byKey;
    }

    private static Config topicConfig(String topic) throws ExecutionException, InterruptedException {
        ConfigResource resource = new ConfigResource(ConfigResource.Type.TOPIC, topic);
        try (Admin admin = Admin.create(Map.of(AdminClientConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers()))) {
            return admin.describeConfigs(List.of(resource)).all().get().get(resource);
        }
    }
}
