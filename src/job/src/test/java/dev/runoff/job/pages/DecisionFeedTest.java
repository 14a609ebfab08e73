package dev.runoff.job.pages;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.stats.ArmStats;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.testkit.Await;
import dev.runoff.testkit.TestDefinitions;
import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.util.List;
import java.util.Map;
import java.util.Properties;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.MockConsumer;
import org.apache.kafka.common.Node;
import org.apache.kafka.common.PartitionInfo;
import org.apache.kafka.common.TopicPartition;
import org.junit.jupiter.api.Test;

class DecisionFeedTest {

    private static final String TOPIC = "runoff.decisions";
    private static final TopicPartition PARTITION = new TopicPartition(TOPIC, 0);

    @Test
    void readsTheTopicToItsEndCountsWhatDoesNotDecodeAndStopsOnClose() {
        List<DecisionRecord> chain = DecisionChains.run(TestDefinitions.bernoulli("fares", "a", "b"), 2,
                d -> new ArmStats[] {new BernoulliStats(30, 2), new BernoulliStats(30, 5)});
        MockConsumer<byte[], byte[]> consumer = new MockConsumer<>("earliest");
        consumer.updatePartitions(TOPIC, List.of(new PartitionInfo(TOPIC, 0, Node.noNode(), new Node[0], new Node[0])));
        consumer.updateBeginningOffsets(Map.of(PARTITION, 0L));
        consumer.updateEndOffsets(Map.of(PARTITION, 3L));
        consumer.schedulePollTask(() -> {
            consumer.addRecord(record(0, RecordCodec.decisionRecords().encode(chain.get(0))));
            consumer.addRecord(record(1, "not a decision".getBytes(StandardCharsets.UTF_8)));
            consumer.addRecord(record(2, RecordCodec.decisionRecords().encode(chain.get(1))));
        });
        DecisionHistory history = new DecisionHistory();
        try (DecisionFeed feed = DecisionFeed.start(() -> consumer, TOPIC, history)) {
            Await.until("the topic read to its end", Duration.ofSeconds(10), history::isCaughtUp);
            assertEquals(2, history.records());
            assertEquals(1, history.rejectedRecords());
            assertEquals(2, history.experiment("fares").orElseThrow().latest().getSequence());
        }
        assertTrue(consumer.closed(), "the consumer is closed with the feed");
    }

    @Test
    void theConsumerReadsCommittedRecordsFromTheStartOutsideTheJobsGroup() {
        Properties job = new Properties();
        job.put(ConsumerConfig.GROUP_ID_CONFIG, "runoff");
        job.put(ConsumerConfig.GROUP_INSTANCE_ID_CONFIG, "runoff-0");
        job.put(ConsumerConfig.CLIENT_ID_CONFIG, "runoff-0");
        job.put(ConsumerConfig.AUTO_OFFSET_RESET_CONFIG, "latest");
        job.put("security.protocol", "SSL");
        Properties feed = DecisionFeed.properties(job);
        assertFalse(feed.containsKey(ConsumerConfig.GROUP_ID_CONFIG));
        assertFalse(feed.containsKey(ConsumerConfig.GROUP_INSTANCE_ID_CONFIG));
        assertEquals("runoff-0-pages-feed", feed.get(ConsumerConfig.CLIENT_ID_CONFIG));
        assertEquals("read_committed", feed.get(ConsumerConfig.ISOLATION_LEVEL_CONFIG));
        assertEquals("earliest", feed.get(ConsumerConfig.AUTO_OFFSET_RESET_CONFIG));
        assertEquals("false", feed.get(ConsumerConfig.ENABLE_AUTO_COMMIT_CONFIG));
        assertEquals("SSL", feed.get("security.protocol"), "the job's connection settings kept");
    }

    private static ConsumerRecord<byte[], byte[]> record(long offset, byte[] value) {
        return new ConsumerRecord<>(TOPIC, 0, offset, "fares".getBytes(StandardCharsets.UTF_8), value);
    }
}
