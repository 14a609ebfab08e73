package dev.runoff.chaos;

import dev.runoff.records.Decoded;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.DecisionRecord;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.serialization.ByteArrayDeserializer;
import org.apache.kafka.common.serialization.StringDeserializer;

/**
 * Reads the decisions topic (read_committed, from the start) on a thread of its own and keeps every record
 * with the moment it was read, so that the suite can time kill-to-next-decision and check the chains.
 */
final class DecisionWatch implements AutoCloseable {

    /**
     * One decision record as read.
     *
     * @param readNanos {@link System#nanoTime()} when it was read
     * @param record    the record
     */
    record Seen(long readNanos, DecisionRecord record) {
    }

    private final List<Seen> seen = new ArrayList<>();
    private final List<String> invalid = new ArrayList<>();
    private final Thread thread;
    private volatile boolean running = true;

    DecisionWatch(String bootstrap, String topic) {
        thread = new Thread(() -> run(bootstrap, topic), "decision-watch");
        thread.setDaemon(true);
        thread.start();
    }

    private void run(String bootstrap, String topic) {
        try (KafkaConsumer<String, byte[]> consumer = new KafkaConsumer<>(Map.of(
                ConsumerConfig.BOOTSTRAP_SERVERS_CONFIG, bootstrap,
                ConsumerConfig.ISOLATION_LEVEL_CONFIG, "read_committed"),
                new StringDeserializer(), new ByteArrayDeserializer())) {
            List<TopicPartition> partitions = consumer.partitionsFor(topic, Duration.ofSeconds(30)).stream()
                    .map(p -> new TopicPartition(topic, p.partition())).toList();
            consumer.assign(partitions);
            consumer.seekToBeginning(partitions);
            while (running) {
                for (ConsumerRecord<String, byte[]> r : consumer.poll(Duration.ofMillis(100))) {
                    long now = System.nanoTime();
                    Decoded<DecisionRecord> decoded = RecordCodec.decisionRecords().decode(r.value(), r.timestamp());
                    synchronized (this) {
                        if (decoded.isValid()) {
                            seen.add(new Seen(now, decoded.orThrow()));
                        } else {
                            invalid.add(r.key() + "@" + r.offset() + ": " + decoded);
                        }
                    }
                }
            }
        }
    }

    /** Every record read so far, in reading order. */
    synchronized List<Seen> seen() {
        return List.copyOf(seen);
    }

    /** Records that did not decode. */
    synchronized List<String> invalid() {
        return List.copyOf(invalid);
    }

    /** The records read so far by experiment, in order. */
    synchronized Map<String, List<DecisionRecord>> chains() {
        Map<String, List<DecisionRecord>> chains = new TreeMap<>();
        seen.forEach(s -> chains.computeIfAbsent(s.record().getExperimentId(), k -> new ArrayList<>()).add(s.record()));
        return chains;
    }

    /**
     * Seconds from {@code fromNanos} until every experiment of {@code ids} had a decision read after it, or -1
     * if one has none yet.
     */
    synchronized double secondsUntilEveryoneDecided(long fromNanos, Iterable<String> ids) {
        long latest = fromNanos;
        for (String id : ids) {
            long first = seen.stream().filter(s -> s.readNanos() > fromNanos && s.record().getExperimentId().equals(id))
                    .mapToLong(Seen::readNanos).min().orElse(-1);
            if (first < 0) {
                return -1;
            }
            latest = Math.max(latest, first);
        }
        return (latest - fromNanos) / 1e9;
    }

    @Override
    public void close() {
        running = false;
        try {
            thread.join(10_000);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }
}
