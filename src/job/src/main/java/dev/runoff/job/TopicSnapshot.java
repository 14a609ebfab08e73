package dev.runoff.job;

import java.time.Duration;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Properties;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.common.PartitionInfo;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.serialization.ByteArrayDeserializer;
import org.apache.kafka.common.serialization.StringDeserializer;

/**
 * Reads a compacted topic from its start to the end offsets taken when reading began, without a consumer
 * group, and keeps the last value of each key: the topic's current content. A tombstone removes its key.
 */
public final class TopicSnapshot {

    private TopicSnapshot() {
    }

    /**
     * The last value of every key of {@code topic}, in the order keys were first seen.
     *
     * @param consumerProps consumer settings (bootstrap and security); group and deserializers are set here
     * @throws IllegalStateException when the topic does not exist or the end is not reached within {@code timeout}
     */
    public static Map<String, byte[]> read(Properties consumerProps, String topic, Duration timeout) {
        Properties props = new Properties();
        props.putAll(consumerProps);
        props.remove(ConsumerConfig.GROUP_ID_CONFIG);
        props.put(ConsumerConfig.ENABLE_AUTO_COMMIT_CONFIG, "false");
        props.put(ConsumerConfig.ISOLATION_LEVEL_CONFIG, "read_committed");
        Map<String, byte[]> latest = new LinkedHashMap<>();
        try (KafkaConsumer<String, byte[]> consumer = new KafkaConsumer<>(props, new StringDeserializer(),
                new ByteArrayDeserializer())) {
            List<PartitionInfo> partitions = consumer.partitionsFor(topic, timeout);
            if (partitions == null || partitions.isEmpty()) {
                throw new IllegalStateException("topic " + topic + " does not exist (run 'runoff topics create')");
            }
            List<TopicPartition> assigned = partitions.stream()
                    .map(p -> new TopicPartition(p.topic(), p.partition())).toList();
            consumer.assign(assigned);
            consumer.seekToBeginning(assigned);
            Map<TopicPartition, Long> end = consumer.endOffsets(assigned, timeout);
            long deadline = System.nanoTime() + timeout.toNanos();
            while (!reached(consumer, end)) {
                if (System.nanoTime() > deadline) {
                    throw new IllegalStateException("could not read topic " + topic + " to its end within "
                            + timeout.toMillis() + " ms");
                }
                for (ConsumerRecord<String, byte[]> r : consumer.poll(Duration.ofMillis(200))) {
                    if (r.value() == null) {
                        latest.remove(r.key());
                    } else {
                        latest.put(r.key(), r.value());
                    }
                }
            }
        }
        return latest;
    }

    private static boolean reached(KafkaConsumer<?, ?> consumer, Map<TopicPartition, Long> end) {
        return end.entrySet().stream().allMatch(e -> consumer.position(e.getKey()) >= e.getValue());
    }
}
