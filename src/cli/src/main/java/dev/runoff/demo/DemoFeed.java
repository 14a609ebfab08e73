package dev.runoff.demo;

import dev.runoff.job.JobConfig;

import dev.runoff.records.Decoded;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.ArmWeight;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.OutcomeEvent;
import java.nio.charset.StandardCharsets;
import java.time.Clock;
import java.time.Duration;
import java.util.ArrayDeque;
import java.util.Deque;
import java.util.List;
import java.util.Properties;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.serialization.ByteArrayDeserializer;
import org.apache.kafka.common.serialization.ByteArraySerializer;
import org.apache.kafka.common.serialization.StringDeserializer;

/**
 * The demo's side of the topics: sends outcome events, follows the control topic for the latest weights of
 * one experiment (as a serving tier does) and the decisions topic for its decision records. The consumers
 * are used under this object's lock, so {@link #close()} from a shutdown hook waits for a poll in progress
 * instead of failing.
 */
final class DemoFeed implements AutoCloseable {

    private static final RecordCodec<OutcomeEvent> EVENTS = RecordCodec.outcomeEvents();
    private static final RecordCodec<AllocationUpdate> CONTROL = RecordCodec.allocationUpdates();
    private static final RecordCodec<DecisionRecord> DECISIONS = RecordCodec.decisionRecords();
    private static final Duration POLL = Duration.ofMillis(50);

    private final String experimentId;
    private final String outcomesTopic;
    private final Clock clock;
    private final KafkaProducer<byte[], byte[]> producer;
    private final KafkaConsumer<String, byte[]> control;
    private final KafkaConsumer<String, byte[]> decisions;
    private final Deque<DecisionRecord> pending = new ArrayDeque<>();
    private static final long CONTROL_RETRY_MS = 10;

    private AllocationUpdate latest;
    private boolean closed;

    DemoFeed(JobConfig config, String experimentId, Clock clock) {
        this.experimentId = experimentId;
        this.outcomesTopic = config.topology().outcomesTopic();
        this.clock = clock;
        Properties producerProps = config.clientProperties(JobConfig.Client.PRODUCER);
        producerProps.put(ProducerConfig.ACKS_CONFIG, "all");
        producerProps.put(ProducerConfig.LINGER_MS_CONFIG, "5");
        producer = new KafkaProducer<>(producerProps, new ByteArraySerializer(), new ByteArraySerializer());
        control = follow(config, config.topology().allocationsTopic());
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

    /** Sends {@code events} keyed by unit id and waits until the broker has them all. */
    void send(List<OutcomeEvent> events) {
        for (OutcomeEvent e : events) {
            producer.send(new ProducerRecord<>(outcomesTopic, e.getUnitId().getBytes(StandardCharsets.UTF_8),
                    EVENTS.encode(e)));
        }
        producer.flush();
    }

    /** The latest control record of the experiment seen so far (reads what arrived), or {@code null}. */
    synchronized AllocationUpdate latestControl() {
        open();
        for (ConsumerRecord<String, byte[]> r : control.poll(Duration.ZERO)) {
            if (experimentId.equals(r.key()) && r.value() != null) {
                Decoded<AllocationUpdate> d = CONTROL.decode(r.value(), clock.millis());
                if (d.isValid() && (latest == null || d.orThrow().getSequence() > latest.getSequence())) {
                    latest = d.orThrow();
                }
            }
        }
        return latest;
    }

    /** Waits up to {@code timeout} for a control record of the experiment. */
    AllocationUpdate awaitControl(Duration timeout) throws InterruptedException {
        Waiting.until("weights for " + experimentId + " on the control topic", timeout,
                () -> latestControl() != null);
        return latest;
    }

    /**
     * Waits up to {@code timeout} until the control record with sequence {@code sequence} (or a later one) has
     * arrived, and returns the latest control record seen (an older one, or {@code null}, if it did not come).
     * The job writes a decision and its control record in one transaction, so once decision {@code sequence}
     * has been read, its weights follow at once; drawing visitors from anything older would not follow the
     * weights in force.
     */
    AllocationUpdate awaitControl(long sequence, Duration timeout) throws InterruptedException {
        long deadline = System.nanoTime() + timeout.toNanos();
        AllocationUpdate seen = latestControl();
        while ((seen == null || seen.getSequence() < sequence) && System.nanoTime() < deadline) {
            Thread.sleep(CONTROL_RETRY_MS);
            seen = latestControl();
        }
        return seen;
    }

    /** The next decision record of the experiment, waiting up to {@code timeout}; {@code null} if none came. */
    DecisionRecord nextDecision(Duration timeout) {
        long deadline = System.nanoTime() + timeout.toNanos();
        while (pendingDecisions() == 0 && System.nanoTime() < deadline) {
            pollDecisions();
        }
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
        open();
        for (ConsumerRecord<String, byte[]> r : decisions.poll(POLL)) {
            if (experimentId.equals(r.key()) && r.value() != null) {
                pending.add(DECISIONS.decode(r.value(), clock.millis()).orThrow());
            }
        }
    }

    private void open() {
        if (closed) {
            throw new IllegalStateException("the demo feed is closed");
        }
    }

    /** The weights of {@code update} in the order of {@code arms}. */
    static double[] weights(AllocationUpdate update, List<String> arms) {
        double[] w = new double[arms.size()];
        for (ArmWeight aw : update.getWeights()) {
            int i = arms.indexOf(aw.getArm());
            if (i >= 0) {
                w[i] = aw.getWeight();
            }
        }
        return w;
    }

    @Override
    public void close() {
        producer.close(Duration.ofSeconds(5));
        synchronized (this) {
            closed = true;
            control.close();
            decisions.close();
        }
    }
}
