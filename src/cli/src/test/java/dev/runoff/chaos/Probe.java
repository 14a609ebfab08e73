package dev.runoff.chaos;

import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.header.Header;
import org.apache.kafka.common.serialization.ByteArrayDeserializer;
import org.apache.kafka.common.serialization.ByteArraySerializer;
import org.apache.kafka.common.serialization.StringDeserializer;
import org.apache.kafka.common.serialization.StringSerializer;

/**
 * Learns from outside when the job's event validator knows an experiment: an exposure on an arm the experiment
 * does not have is rejected as {@code unknown-experiment} while the definition has not reached the validator's
 * store and as {@code unknown-arm} once it has. (The experiment state answering on {@code /experiments/{id}}
 * does not prove it: the validator reads its own copy of the accepted definitions.)
 */
final class Probe {

    /** Key prefix of the probes. */
    static final String KEY_PREFIX = "probe-";
    private static final String REJECTED = "runoff.rejected";

    private Probe() {
    }

    /** Sends probes until every experiment of {@code ids} answers {@code unknown-arm}; the probes sent. */
    static int untilAccepted(String bootstrap, Set<String> ids, Duration timeout) throws InterruptedException {
        return untilAccepted(bootstrap, "runoff.outcomes", ids, timeout);
    }

    /** As {@link #untilAccepted(String, Set, Duration)}, sending the probes to {@code outcomes}. */
    static int untilAccepted(String bootstrap, String outcomes, Set<String> ids, Duration timeout)
            throws InterruptedException {
        Set<String> known = new HashSet<>();
        int sent = 0;
        long deadline = System.nanoTime() + timeout.toNanos();
        try (KafkaProducer<String, byte[]> producer = new KafkaProducer<>(Map.of(
                ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, bootstrap), new StringSerializer(), new ByteArraySerializer());
             KafkaConsumer<String, byte[]> rejected = consumer(bootstrap)) {
            while (!known.containsAll(ids)) {
                if (System.nanoTime() > deadline) {
                    throw new AssertionError("the validator never knew " + ids + " (known: " + known + ")");
                }
                for (String id : ids) {
                    if (!known.contains(id)) {
                        String key = KEY_PREFIX + sent++;
                        producer.send(new ProducerRecord<>(outcomes, key, ("{\"experimentId\":\"" + id
                                + "\",\"unitId\":\"" + key + "\",\"eventId\":\"" + key + "\",\"type\":\"EXPOSURE\","
                                + "\"timestamp\":" + System.currentTimeMillis() + ",\"arm\":\"no-such-arm\"}")
                                .getBytes(StandardCharsets.UTF_8)));
                    }
                }
                producer.flush();
                Thread.sleep(500);
                for (ConsumerRecord<String, byte[]> r : rejected.poll(Duration.ofMillis(500))) {
                    if ("unknown-arm".equals(reason(r))) {
                        String value = new String(r.value(), StandardCharsets.UTF_8);
                        ids.stream().filter(id -> value.contains("\"experimentId\":\"" + id + "\"")).forEach(known::add);
                    }
                }
            }
        }
        return sent;
    }

    /** Every record of the rejected topic (read_committed), reading until {@code quiet} passes without one. */
    static List<ConsumerRecord<String, byte[]>> readAll(String bootstrap, Duration quiet) {
        List<ConsumerRecord<String, byte[]>> all = new ArrayList<>();
        try (KafkaConsumer<String, byte[]> consumer = consumer(bootstrap)) {
            long quietSince = System.nanoTime();
            while (System.nanoTime() - quietSince < quiet.toNanos()) {
                for (ConsumerRecord<String, byte[]> r : consumer.poll(Duration.ofMillis(200))) {
                    all.add(r);
                    quietSince = System.nanoTime();
                }
            }
        }
        return all;
    }

    /** The {@code runoff.reason} header of a rejected record. */
    static String reason(ConsumerRecord<String, byte[]> r) {
        Header reason = r.headers().lastHeader("runoff.reason");
        return reason == null ? "none" : new String(reason.value(), StandardCharsets.UTF_8);
    }

    private static KafkaConsumer<String, byte[]> consumer(String bootstrap) {
        KafkaConsumer<String, byte[]> consumer = new KafkaConsumer<>(Map.of(
                ConsumerConfig.BOOTSTRAP_SERVERS_CONFIG, bootstrap,
                ConsumerConfig.ISOLATION_LEVEL_CONFIG, "read_committed"),
                new StringDeserializer(), new ByteArrayDeserializer());
        List<TopicPartition> partitions = consumer.partitionsFor(REJECTED, Duration.ofSeconds(30)).stream()
                .map(p -> new TopicPartition(REJECTED, p.partition())).toList();
        consumer.assign(partitions);
        consumer.seekToBeginning(partitions);
        return consumer;
    }
}
