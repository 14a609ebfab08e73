package dev.runoff.job.pages;

import dev.runoff.records.Decoded;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.DecisionRecord;
import java.time.Duration;
import java.util.List;
import java.util.Map;
import java.util.Properties;
import java.util.function.Supplier;
import org.apache.kafka.clients.consumer.Consumer;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.errors.WakeupException;
import org.apache.kafka.common.serialization.ByteArrayDeserializer;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Reads the decisions topic from its start, committed records only, into a {@link DecisionHistory}, on its
 * own thread: a plain consumer without a group that is assigned every partition, so every instance of the
 * job knows every experiment's decisions and any instance can serve any page. A failure is logged and the
 * feed starts again after a pause (from the start: the history ignores records it already holds).
 */
public final class DecisionFeed implements AutoCloseable {

    private static final Logger LOG = LoggerFactory.getLogger(DecisionFeed.class);
    private static final Duration POLL = Duration.ofMillis(500);
    private static final long RETRY_MS = 5_000;
    private static final RecordCodec<DecisionRecord> CODEC = RecordCodec.decisionRecords();

    private final Supplier<Consumer<byte[], byte[]>> consumers;
    private final String topic;
    private final DecisionHistory history;
    private final Thread thread;
    private volatile boolean closed;
    private volatile Consumer<byte[], byte[]> consumer;

    private DecisionFeed(Supplier<Consumer<byte[], byte[]>> consumers, String topic, DecisionHistory history) {
        this.consumers = consumers;
        this.topic = topic;
        this.history = history;
        this.thread = new Thread(this::run, "runoff-pages-feed");
        this.thread.setDaemon(true);
    }

    /**
     * Starts reading {@code topic} with a consumer of {@code consumerProps} (the job's connection and
     * security settings; group, offsets and isolation are set here) into {@code history}.
     */
    public static DecisionFeed start(Properties consumerProps, String topic, DecisionHistory history) {
        Properties props = properties(consumerProps);
        return start(() -> new KafkaConsumer<>(props, new ByteArrayDeserializer(), new ByteArrayDeserializer()),
                topic, history);
    }

    /** Starts reading {@code topic} into {@code history} with consumers from {@code consumers}. */
    static DecisionFeed start(Supplier<Consumer<byte[], byte[]>> consumers, String topic, DecisionHistory history) {
        DecisionFeed feed = new DecisionFeed(consumers, topic, history);
        feed.thread.start();
        return feed;
    }

    /**
     * The feed's consumer settings: the job's, without its group, reading committed records from the start
     * and committing nothing; a configured {@code client.id} gets the suffix {@code -pages-feed}.
     */
    static Properties properties(Properties consumerProps) {
        Properties props = new Properties();
        props.putAll(consumerProps);
        props.remove(ConsumerConfig.GROUP_ID_CONFIG);
        props.remove(ConsumerConfig.GROUP_INSTANCE_ID_CONFIG);
        Object clientId = props.get(ConsumerConfig.CLIENT_ID_CONFIG);
        if (clientId != null) {
            props.put(ConsumerConfig.CLIENT_ID_CONFIG, clientId + "-pages-feed");
        }
        props.put(ConsumerConfig.ISOLATION_LEVEL_CONFIG, "read_committed");
        props.put(ConsumerConfig.ENABLE_AUTO_COMMIT_CONFIG, "false");
        props.put(ConsumerConfig.AUTO_OFFSET_RESET_CONFIG, "earliest");
        return props;
    }

    private void run() {
        while (!closed) {
            try (Consumer<byte[], byte[]> c = consumers.get()) {
                consumer = c;
                if (!closed) {
                    follow(c);
                }
            } catch (WakeupException e) {
                return;
            } catch (RuntimeException e) {
                LOG.warn("event=pages-feed-failed topic={} cause=\"{}\": retrying in {} ms", topic, e, RETRY_MS);
                pause();
            }
        }
    }

    private void follow(Consumer<byte[], byte[]> c) {
        List<TopicPartition> partitions = c.partitionsFor(topic, Duration.ofSeconds(30)).stream()
                .map(p -> new TopicPartition(topic, p.partition())).toList();
        if (partitions.isEmpty()) {
            throw new IllegalStateException("topic " + topic + " does not exist (yet)");
        }
        c.assign(partitions);
        c.seekToBeginning(partitions);
        Map<TopicPartition, Long> end = c.endOffsets(partitions);
        while (!closed) {
            for (ConsumerRecord<byte[], byte[]> r : c.poll(POLL)) {
                add(r);
            }
            if (!history.isCaughtUp() && end.entrySet().stream().allMatch(e -> c.position(e.getKey()) >= e.getValue())) {
                history.caughtUp();
            }
        }
    }

    private void add(ConsumerRecord<byte[], byte[]> r) {
        if (r.value() == null) {
            return;
        }
        Decoded<DecisionRecord> decoded = CODEC.decode(r.value(), Math.max(0, r.timestamp()));
        if (decoded.isValid()) {
            history.add(decoded.orThrow());
        } else {
            history.rejected();
        }
    }

    private void pause() {
        synchronized (this) {
            try {
                if (!closed) {
                    wait(RETRY_MS);
                }
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
                closed = true;
            }
        }
    }

    /**
     * Stops the feed: wakes its consumer (never interrupts the thread, which would make the consumer's close
     * fail noisily) and waits at most 5 s for the thread.
     */
    @Override
    public void close() {
        closed = true;
        Consumer<byte[], byte[]> c = consumer;
        if (c != null) {
            c.wakeup();
        }
        synchronized (this) {
            notifyAll();
        }
        try {
            thread.join(5_000);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }
}
