package dev.runoff.broker;

import dev.runoff.testkit.Directories;

import static dev.runoff.broker.BrokerTestSupport.producer;
import static org.junit.jupiter.api.Assertions.assertEquals;

import java.time.Duration;
import java.util.List;
import java.util.Map;
import java.util.Properties;
import java.util.SplittableRandom;
import java.util.TreeMap;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.serialization.LongDeserializer;
import org.apache.kafka.common.serialization.Serdes;
import org.apache.kafka.common.serialization.StringDeserializer;
import org.apache.kafka.streams.KafkaStreams;
import org.apache.kafka.streams.StreamsBuilder;
import org.apache.kafka.streams.StreamsConfig;
import org.apache.kafka.streams.TopologyConfig;
import org.apache.kafka.streams.kstream.Produced;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/** A Kafka Streams count topology with exactly_once_v2 against the embedded broker, end to end. */
class ExactlyOnceStreamsIT {
    private static final String INPUT = "words";
    private static final String OUTPUT = "word-counts";
    private static final List<String> WORDS = List.of("alpha", "beta", "gamma", "delta", "epsilon");
    private static final int RECORDS = 2_000;

    private static GuardedBroker guarded;
    private static EmbeddedKafkaBroker broker;

    @BeforeAll
    static void startBroker() {
        guarded = GuardedBroker.start(EmbeddedKafkaBroker.builder(Directories.fresh("streams")));
        broker = guarded.broker();
        broker.createTopic(INPUT, 2, Map.of());
        broker.createTopic(OUTPUT, 2, Map.of());
    }

    @AfterAll
    static void stopBroker() {
        guarded.close();
    }

    @Test
    void countTopologyWithExactlyOnceV2CountsEveryRecordOnce() throws Exception {
        Map<String, Long> expected = produceWords();
        Properties config = streamsConfig();
        try (KafkaStreams streams = new KafkaStreams(countTopology(config).build(), config)) {
            CountDownLatch running = new CountDownLatch(1);
            streams.setStateListener((now, before) -> {
                if (now == KafkaStreams.State.RUNNING) {
                    running.countDown();
                }
            });
            streams.start();
            assertEquals(true, running.await(60, TimeUnit.SECONDS), "streams did not reach RUNNING");
            // With exactly-once processing every input record is counted once even though offsets
            // and results are committed together in transactions (Kafka Streams docs,
            // processing.guarantee); a read_committed reader sees only committed results.
            assertEquals(expected, latestCounts(expected, Duration.ofSeconds(60)));
        }
    }

    private static Map<String, Long> produceWords() {
        SplittableRandom random = new SplittableRandom(20_240_601L);
        Map<String, Long> expected = new TreeMap<>();
        try (KafkaProducer<String, String> producer = producer(broker, null)) {
            for (int i = 0; i < RECORDS; i++) {
                String word = WORDS.get(random.nextInt(WORDS.size()));
                expected.merge(word, 1L, Long::sum);
                producer.send(new ProducerRecord<>(INPUT, word, word));
            }
        }
        return expected;
    }

    private static Properties streamsConfig() {
        Properties props = new Properties();
        props.put(StreamsConfig.APPLICATION_ID_CONFIG, "broker-eos-count");
        props.put(StreamsConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers());
        props.put(StreamsConfig.PROCESSING_GUARANTEE_CONFIG, StreamsConfig.EXACTLY_ONCE_V2);
        props.put(StreamsConfig.STATE_DIR_CONFIG, Directories.fresh("streams-state").toString());
        props.put(StreamsConfig.COMMIT_INTERVAL_MS_CONFIG, "100");
        props.put(StreamsConfig.DEFAULT_KEY_SERDE_CLASS_CONFIG, Serdes.StringSerde.class.getName());
        props.put(StreamsConfig.DEFAULT_VALUE_SERDE_CLASS_CONFIG, Serdes.StringSerde.class.getName());
        props.put(StreamsConfig.consumerPrefix("auto.offset.reset"), "earliest");
        return props;
    }

    private static StreamsBuilder countTopology(Properties config) {
        StreamsBuilder builder = new StreamsBuilder(new TopologyConfig(new StreamsConfig(config)));
        builder.<String, String>stream(INPUT)
                .groupByKey()
                .count()
                .toStream()
                .to(OUTPUT, Produced.with(Serdes.String(), Serdes.Long()));
        return builder;
    }

    /** Reads the output until the latest count of each word equals {@code expected} or time runs out. */
    private static Map<String, Long> latestCounts(Map<String, Long> expected, Duration timeout) {
        Map<String, Long> latest = new TreeMap<>();
        Map<String, Object> props = BrokerTestSupport.consumerProps(broker, null, "read_committed");
        try (KafkaConsumer<String, Long> reader =
                     new KafkaConsumer<>(props, new StringDeserializer(), new LongDeserializer())) {
            reader.assign(List.of(new TopicPartition(OUTPUT, 0), new TopicPartition(OUTPUT, 1)));
            long deadline = System.nanoTime() + timeout.toNanos();
            while (!latest.equals(expected) && System.nanoTime() < deadline) {
                for (ConsumerRecord<String, Long> r : reader.poll(BrokerTestSupport.POLL)) {
                    latest.put(r.key(), r.value());
                }
            }
        }
        return latest;
    }
}
