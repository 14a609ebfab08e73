package dev.runoff.broker;

import dev.runoff.testkit.Directories;

import static dev.runoff.broker.BrokerTestSupport.consumer;
import static dev.runoff.broker.BrokerTestSupport.pollAtLeast;
import static dev.runoff.broker.BrokerTestSupport.producer;
import static dev.runoff.broker.BrokerTestSupport.reader;
import static dev.runoff.broker.BrokerTestSupport.values;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.time.Duration;
import java.util.List;
import java.util.Map;
import java.util.stream.IntStream;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.admin.AdminClientConfig;
import org.apache.kafka.clients.admin.TopicDescription;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.consumer.OffsetAndMetadata;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.TopicPartition;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/** Restarts, a second instance on a formatted directory, two brokers side by side, and clean shutdown. */
class EmbeddedKafkaBrokerRestartIT {
    private static GuardedBroker guarded;
    private static EmbeddedKafkaBroker broker;

    @BeforeAll
    static void startBroker() {
        guarded = GuardedBroker.start(EmbeddedKafkaBroker.builder(Directories.fresh("restart")));
        broker = guarded.broker();
    }

    @AfterAll
    static void stopBroker() {
        guarded.close();
    }

    @Test
    void restartKeepsTopicsCommittedOffsetsAndPorts() throws Exception {
        broker.createTopic("orders", 2, Map.of());
        send("orders", "first-", 10);
        try (KafkaConsumer<String, String> consumer = consumer(broker, "order-readers", "read_committed")) {
            consumer.subscribe(List.of("orders"));
            assertEquals(10, pollAtLeast(consumer, 10, Duration.ofSeconds(30)).size());
            consumer.commitSync();
        }
        String bootstrap = broker.bootstrapServers();
        String clusterId = broker.clusterId();

        broker.restart();

        assertEquals(bootstrap, broker.bootstrapServers());
        assertEquals(clusterId, broker.clusterId());
        assertEquals(2, describe("orders").partitions().size());
        assertEquals(10, committedTotal("order-readers"));
        send("orders", "second-", 5);
        try (KafkaConsumer<String, String> consumer = consumer(broker, "order-readers", "read_committed")) {
            consumer.subscribe(List.of("orders"));
            List<String> resumed = values(pollAtLeast(consumer, 5, Duration.ofSeconds(30)));
            assertEquals(5, resumed.size(), "resumed at the committed offsets: " + resumed);
            assertTrue(resumed.stream().allMatch(v -> v.startsWith("second-")), resumed.toString());
        }
        assertEquals(List.of(), guarded.exitCalls(), "close during restart tried to end the JVM");
    }

    @Test
    void secondBrokerOnAnotherDirectoryDoesNotClash() throws Exception {
        broker.createTopic("shared-name", 1, Map.of());
        send("shared-name", "on-first-", 3);
        try (EmbeddedKafkaBroker second = EmbeddedKafkaBroker.builder(Directories.fresh("second"))
                .build().start()) {
            assertNotEquals(broker.bootstrapServers(), second.bootstrapServers());
            assertNotEquals(broker.clusterId(), second.clusterId());
            second.createTopic("shared-name", 3, Map.of());
            try (KafkaConsumer<String, String> onSecond = reader(second, "shared-name", "read_committed")) {
                assertEquals(List.of(), values(pollAtLeast(onSecond, 1, Duration.ofSeconds(1))));
            }
        }
        assertEquals(1, describe("shared-name").partitions().size());
        send("shared-name", "after-second-closed-", 1);
        try (KafkaConsumer<String, String> onFirst = reader(broker, "shared-name", "read_committed")) {
            assertEquals(List.of("on-first-0", "on-first-1", "on-first-2", "after-second-closed-0"),
                    values(pollAtLeast(onFirst, 4, Duration.ofSeconds(20))));
        }
    }

    @Test
    void newInstanceOnFormattedDirectoryReusesIt() {
        EmbeddedKafkaBroker other = EmbeddedKafkaBroker.builder(Directories.fresh("reopen")).build();
        String clusterId;
        try (other) {
            clusterId = other.start().clusterId();
            other.createTopic("kept", 1, Map.of());
        }
        try (EmbeddedKafkaBroker reopened = EmbeddedKafkaBroker.builder(other.logDirectory()).build().start()) {
            assertEquals(clusterId, reopened.clusterId());
            assertFalse(reopened.createTopicIfAbsent("kept", 1, Map.of()), "topic 'kept' was lost");
        }
    }

    private static void send(String topic, String prefix, int count) {
        try (KafkaProducer<String, String> producer = producer(broker, null)) {
            IntStream.range(0, count).forEach(i -> producer.send(new ProducerRecord<>(topic, "k" + i, prefix + i)));
        }
    }

    private static TopicDescription describe(String topic) throws Exception {
        try (Admin admin = admin()) {
            return admin.describeTopics(List.of(topic)).allTopicNames().get().get(topic);
        }
    }

    private static long committedTotal(String group) throws Exception {
        try (Admin admin = admin()) {
            Map<TopicPartition, OffsetAndMetadata> offsets =
                    admin.listConsumerGroupOffsets(group).partitionsToOffsetAndMetadata().get();
            return offsets.values().stream().mapToLong(OffsetAndMetadata::offset).sum();
        }
    }

    private static Admin admin() {
        return Admin.create(Map.of(AdminClientConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers()));
    }
}
