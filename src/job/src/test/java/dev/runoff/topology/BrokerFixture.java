package dev.runoff.topology;

import dev.runoff.broker.EmbeddedKafkaBroker;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.Map;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import java.util.function.Predicate;
import java.util.stream.Stream;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.serialization.ByteArrayDeserializer;
import org.apache.kafka.common.serialization.ByteArraySerializer;
import org.apache.kafka.common.serialization.StringDeserializer;
import org.apache.kafka.common.serialization.StringSerializer;
import org.apache.kafka.streams.KafkaStreams;

/** A directory under {@code target/}, clients of the embedded broker, and waiting helpers. */
final class BrokerFixture {

    private BrokerFixture() {
    }


    static KafkaProducer<String, byte[]> producer(EmbeddedKafkaBroker broker) {
        return new KafkaProducer<>(Map.of(ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers(),
                ProducerConfig.LINGER_MS_CONFIG, 5), new StringSerializer(), new ByteArraySerializer());
    }

    /** A read_committed reader of every partition of {@code topic}, from the start. */
    static KafkaConsumer<String, byte[]> reader(EmbeddedKafkaBroker broker, String topic) {
        KafkaConsumer<String, byte[]> consumer = new KafkaConsumer<>(Map.of(
                ConsumerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers(),
                ConsumerConfig.ISOLATION_LEVEL_CONFIG, "read_committed",
                ConsumerConfig.AUTO_OFFSET_RESET_CONFIG, "earliest",
                ConsumerConfig.ENABLE_AUTO_COMMIT_CONFIG, "false"), new StringDeserializer(),
                new ByteArrayDeserializer());
        List<TopicPartition> partitions = consumer.partitionsFor(topic).stream()
                .map(p -> new TopicPartition(topic, p.partition())).toList();
        consumer.assign(partitions);
        consumer.seekToBeginning(partitions);
        return consumer;
    }

    /**
     * Polls {@code consumer} into {@code received} until {@code done} holds for everything received or
     * {@code timeout} passes; returns whether it held.
     */
    static boolean pollUntil(KafkaConsumer<String, byte[]> consumer, List<ConsumerRecord<String, byte[]>> received,
                             Predicate<List<ConsumerRecord<String, byte[]>>> done, Duration timeout) {
        long deadline = System.nanoTime() + timeout.toNanos();
        while (System.nanoTime() < deadline) {
            consumer.poll(Duration.ofMillis(200)).forEach(received::add);
            if (done.test(received)) {
                return true;
            }
        }
        return false;
    }

    /** Starts {@code streams} and waits until it is RUNNING. */
    static void startAndAwaitRunning(KafkaStreams streams, Duration timeout) throws InterruptedException {
        CountDownLatch running = new CountDownLatch(1);
        streams.setStateListener((now, before) -> {
            if (now == KafkaStreams.State.RUNNING) {
                running.countDown();
            }
        });
        streams.start();
        if (!running.await(timeout.toMillis(), TimeUnit.MILLISECONDS)) {
            throw new AssertionError("streams did not reach RUNNING within " + timeout + ", state " + streams.state());
        }
    }

    /** Everything received so far, in a fresh list. */
    static <T> List<T> copy(List<T> list) {
        return new ArrayList<>(list);
    }
}
