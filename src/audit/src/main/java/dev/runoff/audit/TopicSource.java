package dev.runoff.audit;

import java.time.Duration;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Objects;
import java.util.Properties;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.ConsumerRecords;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.common.PartitionInfo;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.serialization.ByteArrayDeserializer;
import org.apache.kafka.common.serialization.StringDeserializer;

/**
 * Decision records from the decisions topic, read once from the beginning of every partition up to the end
 * offsets seen when reading starts. The consumer is assigned the partitions (no consumer group, nothing
 * committed) and reads with {@code isolation.level=read_committed} unless the configuration says otherwise,
 * so records of aborted transactions of the exactly-once job are never audited.
 */
public final class TopicSource implements DecisionSource {

    private static final Duration POLL = Duration.ofMillis(200);

    private final Properties config;
    private final String topic;
    private final Duration timeout;
    private final EntryDecoder decoder;

    /**
     * A source reading {@code topic}.
     *
     * @param clientConfig consumer settings: at least {@code bootstrap.servers}, plus any security keys
     * @param topic        the decisions topic
     * @param timeout      how long metadata requests may take, and how long reading may go without
     *                     progress, before it fails
     * @param decoder      decodes each record value
     * @throws IllegalArgumentException when {@code bootstrap.servers} is missing or the timeout not positive
     */
    public TopicSource(Map<String, String> clientConfig, String topic, Duration timeout, EntryDecoder decoder) {
        Objects.requireNonNull(topic, "topic");
        if (!clientConfig.containsKey(ConsumerConfig.BOOTSTRAP_SERVERS_CONFIG)) {
            throw new IllegalArgumentException("bootstrap.servers is required to read topic '" + topic + "'");
        }
        if (timeout.isNegative() || timeout.isZero()) {
            throw new IllegalArgumentException("timeout must be positive, got " + timeout);
        }
        this.config = new Properties();
        config.put(ConsumerConfig.ISOLATION_LEVEL_CONFIG, "read_committed");
        config.putAll(clientConfig);
        config.put(ConsumerConfig.ENABLE_AUTO_COMMIT_CONFIG, "false");
        config.put(ConsumerConfig.KEY_DESERIALIZER_CLASS_CONFIG, StringDeserializer.class.getName());
        config.put(ConsumerConfig.VALUE_DESERIALIZER_CLASS_CONFIG, ByteArrayDeserializer.class.getName());
        this.topic = topic;
        this.timeout = timeout;
        this.decoder = Objects.requireNonNull(decoder, "decoder");
    }

    /**
     * {@inheritDoc}
     *
     * @throws IllegalArgumentException when the topic does not exist
     * @throws IllegalStateException    when reading makes no progress for the timeout before the end
     *                                  offsets are reached
     */
    @Override
    public List<Entry> read(String experimentId) {
        try (KafkaConsumer<String, byte[]> consumer = new KafkaConsumer<>(config)) {
            List<TopicPartition> partitions = partitions(consumer);
            consumer.assign(partitions);
            consumer.seekToBeginning(partitions);
            Map<TopicPartition, Long> end = new HashMap<>(consumer.endOffsets(partitions, timeout));
            Map<Integer, List<Entry>> byPartition = new HashMap<>();
            long idlePolls = 0;
            long maxIdlePolls = Math.max(1, timeout.toMillis() / POLL.toMillis());
            while (!reached(consumer, end)) {
                ConsumerRecords<String, byte[]> polled = consumer.poll(POLL);
                idlePolls = polled.isEmpty() ? idlePolls + 1 : 0;
                if (idlePolls > maxIdlePolls) {
                    throw new IllegalStateException("reading topic '" + topic + "' made no progress for " + timeout
                            + " before the end offsets " + end);
                }
                for (ConsumerRecord<String, byte[]> r : polled) {
                    if (experimentId == null || experimentId.equals(r.key())) {
                        Position position = new Position(r.partition(), r.offset());
                        byPartition.computeIfAbsent(r.partition(), p -> new ArrayList<>())
                                .add(decoder.decode(r.value(), r.key(), position));
                    }
                }
            }
            List<Entry> entries = new ArrayList<>();
            byPartition.keySet().stream().sorted().forEach(p -> entries.addAll(byPartition.get(p)));
            return entries;
        }
    }

    private List<TopicPartition> partitions(KafkaConsumer<String, byte[]> consumer) {
        List<PartitionInfo> infos = consumer.partitionsFor(topic, timeout);
        if (infos == null || infos.isEmpty()) {
            throw new IllegalArgumentException("topic '" + topic + "' does not exist or has no partitions");
        }
        return infos.stream().map(i -> new TopicPartition(topic, i.partition())).toList();
    }

    /** Whether every partition's position has reached its end offset; drops partitions that have. */
    private static boolean reached(KafkaConsumer<String, byte[]> consumer, Map<TopicPartition, Long> end) {
        end.entrySet().removeIf(e -> consumer.position(e.getKey()) >= e.getValue());
        return end.isEmpty();
    }
}
