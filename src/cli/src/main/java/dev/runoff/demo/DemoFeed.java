package dev.runoff.demo;

import dev.runoff.job.JobConfig;

import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.DecisionRecord;
import java.time.Clock;
import java.time.Duration;
import java.util.ArrayDeque;
import java.util.Deque;
import java.util.List;
import java.util.Properties;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.serialization.ByteArrayDeserializer;
import org.apache.kafka.common.serialization.StringDeserializer;

/**
 * The demo's reader of the decisions topic: the decision records of one experiment, in order. (The visitors
 * are served and reported by {@link DemoServingTier}, through the client library.) The consumer is used under
 * this object's lock, so {@link #close()} from a shutdown hook waits for a poll in progress instead of failing.
 */
final class DemoFeed implements AutoCloseable {

    private static final RecordCodec<DecisionRecord> DECISIONS = RecordCodec.decisionRecords();
    private static final Duration POLL = Duration.ofMillis(20);

    private final String experimentId;
    private final Clock clock;
    private final KafkaConsumer<String, byte[]> decisions;
    private final Deque<DecisionRecord> pending = new ArrayDeque<>();

    private boolean closed;

    DemoFeed(JobConfig config, String experimentId, Clock clock) {
        this.experimentId = experimentId;
        this.clock = clock;
        decisions = follow(config, config.topology().decisionsTopic());
    }

    private static KafkaConsumer<String, byte[]> follow(JobConfig config, String topic) {
        Properties props = config.clientProperties(JobConfig.Client.CONSUMER);
        props.put(ConsumerConfig.ISOLATION_LEVEL_CONFIG, "read_committed");
        props.put(ConsumerConfig.ENABLE_AUTO_COMMIT_CONFIG, "false");
        KafkaConsumer<String, byte[]> consumer = new KafkaConsumer<>(props, new StringDeserializer(),
                new ByteArrayDeserializer());
        List<TopicPartition> partitions = consumer.partitionsFor(topic).stream()
                .map(p -> new TopicPartition(p.topic(), p.partition())).toList();
        consumer.assign(partitions);
        consumer.seekToBeginning(partitions);
        return consumer;
    }

    /**
     * The next decision record of the experiment, waiting up to {@code timeout} (at least one short poll);
     * {@code null} if none came.
     */
    DecisionRecord nextDecision(Duration timeout) {
        long deadline = System.nanoTime() + timeout.toNanos();
        do {
            if (pendingDecisions() > 0) {
                break;
            }
            pollDecisions();
        } while (System.nanoTime() < deadline);
        return takeDecision();
    }

    private synchronized int pendingDecisions() {
        return pending.size();
    }

    private synchronized DecisionRecord takeDecision() {
        return pending.poll();
    }

    /** One short poll; synchronized so that a shutdown hook's close never overlaps a poll. */
    private synchronized void pollDecisions() {
        if (closed) {
            throw new IllegalStateException("the demo feed is closed");
        }
        for (ConsumerRecord<String, byte[]> r : decisions.poll(POLL)) {
            if (experimentId.equals(r.key()) && r.value() != null) {
                pending.add(DECISIONS.decode(r.value(), clock.millis()).orThrow());
            }
        }
    }

    @Override
    public synchronized void close() {
        closed = true;
        decisions.close();
    }
}
