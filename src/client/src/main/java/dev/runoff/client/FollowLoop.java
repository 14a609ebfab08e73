package dev.runoff.client;

import java.time.Clock;
import java.time.Duration;
import java.util.HashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import org.apache.kafka.clients.consumer.CloseOptions;
import org.apache.kafka.clients.consumer.Consumer;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.ConsumerRecords;
import org.apache.kafka.common.PartitionInfo;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.errors.WakeupException;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The follower thread's work: assign every partition of the control topic (no consumer group), read it from
 * the beginning, feed each polled batch to the table, and signal once the positions reach the end offsets
 * seen at the first assignment. Partitions added later are found on a periodic metadata check and read from
 * their beginning. Every failure is counted, logged and retried after a back-off; only {@link #stop()} ends
 * the loop. The consumer is used by this thread alone (KafkaConsumer is not thread-safe), apart from
 * {@code wakeup()}, which is.
 */
final class FollowLoop implements Runnable {
    private static final Logger LOG = LoggerFactory.getLogger(FollowLoop.class);

    private final Consumer<String, byte[]> consumer;
    private final String topic;
    private final AllocationTable table;
    private final Clock clock;
    private final FollowerTimings timings;
    private final CountDownLatch caughtUp = new CountDownLatch(1);
    private final CountDownLatch stopRequested = new CountDownLatch(1);
    private volatile boolean running = true;
    private volatile RuntimeException lastError;
    private Map<TopicPartition, Long> catchUpTarget;
    private Set<TopicPartition> assigned = Set.of();
    private long lastRefreshMillis;
    private int consecutiveFailures;

    FollowLoop(Consumer<String, byte[]> consumer, String topic, AllocationTable table, FollowerTimings timings) {
        this.consumer = consumer;
        this.topic = topic;
        this.table = table;
        this.clock = table.clock();
        this.timings = timings;
    }

    @Override
    public void run() {
        try {
            while (running) {
                stepOrBackOff();
            }
        } finally {
            closeConsumer();
        }
    }

    private void stepOrBackOff() {
        try {
            step();
            if (consecutiveFailures > 0) {
                LOG.info("Following control topic '{}' again after {} failed attempts", topic, consecutiveFailures);
                consecutiveFailures = 0;
            }
        } catch (WakeupException e) {
            if (running) {
                LOG.debug("Unexpected wakeup of the follower of '{}'", topic);
            }
        } catch (RuntimeException e) {
            if (!running) {
                return;
            }
            lastError = e;
            table.counters().pollErrors.increment();
            logFailure(e);
            pause(timings.errorBackoff());
        }
    }

    /** The first of a run of failures is a warning, the repeats are debug lines (no log flood). */
    private void logFailure(RuntimeException e) {
        consecutiveFailures++;
        if (consecutiveFailures == 1) {
            LOG.warn("Following control topic '{}' failed; retrying every {} ms: {}", topic,
                    timings.errorBackoff().toMillis(), e.toString());
        } else {
            LOG.debug("Following control topic '{}' failed again ({} in a row): {}", topic, consecutiveFailures,
                    e.toString());
        }
    }

    private void step() {
        if (assigned.isEmpty() || clock.millis() - lastRefreshMillis >= timings.partitionRefresh().toMillis()) {
            refreshAssignment();
            signalIfCaughtUp();
        }
        ConsumerRecords<String, byte[]> records = consumer.poll(timings.pollTimeout());
        if (!records.isEmpty()) {
            table.applyAll(records, ConsumerRecord::key, ConsumerRecord::value);
        }
        signalIfCaughtUp();
    }

    private void signalIfCaughtUp() {
        if (caughtUp.getCount() > 0 && positionsReached()) {
            caughtUp.countDown();
            LOG.info("Caught up with control topic '{}': {} experiments", topic, table.experimentIds().size());
        }
    }

    private void refreshAssignment() {
        lastRefreshMillis = clock.millis();
        List<PartitionInfo> infos = consumer.partitionsFor(topic);
        Set<TopicPartition> partitions = new HashSet<>();
        if (infos != null) {
            infos.forEach(info -> partitions.add(new TopicPartition(info.topic(), info.partition())));
        }
        if (partitions.isEmpty() && assigned.isEmpty()) {
            throw new IllegalStateException("control topic '" + topic + "' has no partitions (does it exist?)");
        }
        if (partitions.isEmpty() || partitions.equals(assigned)) {
            return;
        }
        Set<TopicPartition> added = new HashSet<>(partitions);
        added.removeAll(assigned);
        consumer.assign(partitions);
        consumer.seekToBeginning(added);
        if (catchUpTarget == null) {
            catchUpTarget = consumer.endOffsets(partitions);
        }
        assigned = Set.copyOf(partitions);
        LOG.info("Following control topic '{}': partitions {} added, {} in all", topic, added.size(),
                partitions.size());
    }

    private boolean positionsReached() {
        for (Map.Entry<TopicPartition, Long> end : catchUpTarget.entrySet()) {
            if (consumer.position(end.getKey()) < end.getValue()) {
                return false;
            }
        }
        return true;
    }

    /** Waits until the table has caught up; false on timeout. */
    boolean awaitCaughtUp(Duration timeout) throws InterruptedException {
        return caughtUp.await(timeout.toNanos(), TimeUnit.NANOSECONDS);
    }

    /** True once the table has read up to the end offsets seen at start. */
    boolean caughtUp() {
        return caughtUp.getCount() == 0;
    }

    /** The last failure seen, or null. */
    RuntimeException lastError() {
        return lastError;
    }

    /** Asks the loop to end: it leaves its poll or back-off at once and closes the consumer. */
    void stop() {
        running = false;
        stopRequested.countDown();
        consumer.wakeup();
    }

    private void pause(Duration duration) {
        try {
            stopRequested.await(duration.toNanos(), TimeUnit.NANOSECONDS);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            running = false;
        }
    }

    private void closeConsumer() {
        try {
            consumer.close(CloseOptions.timeout(timings.closeTimeout()));
        } catch (RuntimeException e) {
            LOG.warn("Closing the consumer of control topic '{}' failed: {}", topic, e.toString());
        }
    }
}
