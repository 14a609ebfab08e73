package dev.runoff.client;

import static dev.runoff.client.ControlRecords.NOW;
import static dev.runoff.client.ControlRecords.avro;
import static dev.runoff.client.ControlRecords.running;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.time.Duration;
import java.util.List;
import java.util.Map;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.MockConsumer;
import org.apache.kafka.common.KafkaException;
import org.apache.kafka.common.PartitionInfo;
import org.apache.kafka.common.TopicPartition;
import org.junit.jupiter.api.Test;

/** The follower's loop against Kafka's MockConsumer: catch-up at start, poll failures, a missing topic. */
class ControlTopicFollowerTest {

    private static final String TOPIC = "ctl";
    private static final TopicPartition P0 = new TopicPartition(TOPIC, 0);

    private final MockConsumer<String, byte[]> consumer = new MockConsumer<>("earliest");
    private final AllocationTable table = AllocationTable.create(PickPolicy.builder("fallback").build(),
            new MutableClock(NOW));

    private ControlTopicFollower.Builder follower() {
        return ControlTopicFollower.builder(table, "unused:9092").topic(TOPIC)
                .errorBackoff(Duration.ofMillis(10)).pollTimeout(Duration.ofMillis(10))
                .startupTimeout(Duration.ofSeconds(10)).consumerFactory(props -> consumer);
    }

    private void topicWithTwoRecords() {
        consumer.updatePartitions(TOPIC, List.of(new PartitionInfo(TOPIC, 0, null, null, null)));
        consumer.updateBeginningOffsets(Map.of(P0, 0L));
        consumer.updateEndOffsets(Map.of(P0, 2L));
        consumer.schedulePollTask(() -> {
            consumer.addRecord(new ConsumerRecord<>(TOPIC, 0, 0, "e1", avro(running("e1", 1, "a", 1.0, "b", 0.0))));
            consumer.addRecord(new ConsumerRecord<>(TOPIC, 0, 1, "e2", avro(running("e2", 1, "a", 0.0, "b", 1.0))));
        });
    }

    @Test
    void startReturnsOnceTheEndOffsetsAreRead() {
        topicWithTwoRecords();
        try (ControlTopicFollower running = follower().start()) {
            assertTrue(running.caughtUp());
            assertEquals("a", table.pick("e1", "u"));
            assertEquals("b", table.pick("e2", "u"));
            assertEquals(2, table.metrics().recordsApplied());
        }
        assertTrue(consumer.closed());
    }

    @Test
    void failedPollIsCountedAndFollowingGoesOn() {
        topicWithTwoRecords();
        consumer.setPollException(new KafkaException("broker gone for a moment"));
        try (ControlTopicFollower running = follower().start()) {
            assertEquals(1, table.metrics().pollErrors());
            assertEquals(2, table.experimentIds().size());
            assertTrue(running.isRunning());
        }
    }

    @Test
    void missingTopicEndsStartWithTheReason() {
        CatchUpTimeoutException e = assertThrows(CatchUpTimeoutException.class,
                () -> follower().startupTimeout(Duration.ofMillis(300)).start());
        assertTrue(e.getMessage().contains("'ctl'") && e.getMessage().contains("no partitions"), e.getMessage());
        assertTrue(table.metrics().pollErrors() > 0);
        assertTrue(consumer.closed());
    }

    @Test
    void consumerGroupIsRefused() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> follower().consumerProperty("group.id", "serving"));
        assertTrue(e.getMessage().contains("group.id"), e.getMessage());
    }

    @Test
    void closeStopsTheThread() {
        topicWithTwoRecords();
        ControlTopicFollower running = follower().start();
        running.close();
        assertFalse(running.isRunning());
        running.close();
    }
}
