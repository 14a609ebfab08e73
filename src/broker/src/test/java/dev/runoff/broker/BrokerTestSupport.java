package dev.runoff.broker;

import java.time.Duration;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Properties;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.serialization.StringDeserializer;
import org.apache.kafka.common.serialization.StringSerializer;

/** Directories and plain string clients for tests that run a real embedded broker. */
final class BrokerTestSupport {
    static final Duration POLL = Duration.ofMillis(200);

    private BrokerTestSupport() {
    }


    /** A string producer; transactional when {@code transactionalId} is not null. */
    static KafkaProducer<String, String> producer(EmbeddedKafkaBroker broker, String transactionalId) {
        Properties props = new Properties();
        props.put(ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers());
        props.put(ProducerConfig.KEY_SERIALIZER_CLASS_CONFIG, StringSerializer.class.getName());
        props.put(ProducerConfig.VALUE_SERIALIZER_CLASS_CONFIG, StringSerializer.class.getName());
        if (transactionalId != null) {
            props.put(ProducerConfig.TRANSACTIONAL_ID_CONFIG, transactionalId);
        }
        return new KafkaProducer<>(props);
    }

    /** A string consumer in a group, reading from the earliest offset with the given isolation level. */
    static KafkaConsumer<String, String> consumer(EmbeddedKafkaBroker broker, String groupId, String isolation) {
        return new KafkaConsumer<>(consumerProps(broker, groupId, isolation),
                new StringDeserializer(), new StringDeserializer());
    }

    /** A string consumer without a group, assigned every partition of {@code topic} from its start. */
    static KafkaConsumer<String, String> reader(EmbeddedKafkaBroker broker, String topic, String isolation) {
        KafkaConsumer<String, String> consumer = consumer(broker, null, isolation);
        consumer.assign(consumer.partitionsFor(topic).stream()
                .map(p -> new TopicPartition(p.topic(), p.partition())).toList());
        return consumer;
    }

    /** Consumer settings: earliest offset, no auto-commit, the given group (may be null) and isolation. */
    static Map<String, Object> consumerProps(EmbeddedKafkaBroker broker, String groupId, String isolation) {
        Map<String, Object> props = new HashMap<>(Map.of(
                ConsumerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers(),
                ConsumerConfig.AUTO_OFFSET_RESET_CONFIG, "earliest",
                ConsumerConfig.ENABLE_AUTO_COMMIT_CONFIG, "false",
                ConsumerConfig.ISOLATION_LEVEL_CONFIG, isolation));
        if (groupId != null) {
            props.put(ConsumerConfig.GROUP_ID_CONFIG, groupId);
        }
        return props;
    }

    /**
     * Polls until {@code expected} records arrived or {@code timeout} passed, then polls once more to
     * catch records beyond the expected count; returns everything received.
     */
    static List<ConsumerRecord<String, String>> pollAtLeast(KafkaConsumer<String, String> consumer,
                                                            int expected, Duration timeout) {
        List<ConsumerRecord<String, String>> received = new ArrayList<>();
        long deadline = System.nanoTime() + timeout.toNanos();
        while (received.size() < expected && System.nanoTime() < deadline) {
            consumer.poll(POLL).forEach(received::add);
        }
        consumer.poll(POLL).forEach(received::add);
        return received;
    }

    /** Values of the records, in order. */
    static List<String> values(List<ConsumerRecord<String, String>> records) {
        return records.stream().map(ConsumerRecord::value).toList();
    }

}
