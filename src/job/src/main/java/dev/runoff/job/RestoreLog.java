package dev.runoff.job;

import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;
import java.util.function.LongSupplier;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.streams.processor.StateRestoreListener;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Logs every restore of a local store from its changelog when it starts ({@code event=restore-started ...
 * from=OFFSET to=OFFSET}) and when it ends ({@code event=restored store=... changelog=... partition=...
 * records=... millis=...}), so an operator sees
 * what a restart cost: under exactly-once a crash leaves no checkpoint and Kafka Streams replays the whole
 * changelog partition of each store of the task. Kafka Streams calls the listener from its restore threads;
 * the start times are kept per changelog partition.
 */
final class RestoreLog implements StateRestoreListener {

    private static final Logger LOG = LoggerFactory.getLogger(RestoreLog.class);

    private final LongSupplier nanoTime;
    private final Map<TopicPartition, Long> started = new ConcurrentHashMap<>();

    /** A listener that times restores with {@code nanoTime}. */
    RestoreLog(LongSupplier nanoTime) {
        this.nanoTime = nanoTime;
    }

    @Override
    public void onRestoreStart(TopicPartition partition, String store, long startingOffset, long endingOffset) {
        started.put(partition, nanoTime.getAsLong());
        LOG.info("event=restore-started store={} changelog={} partition={} from={} to={}", store, partition.topic(),
                partition.partition(), startingOffset, endingOffset);
    }

    @Override
    public void onBatchRestored(TopicPartition partition, String store, long batchEndOffset, long numRestored) {
        // the total arrives with onRestoreEnd
    }

    @Override
    public void onRestoreEnd(TopicPartition partition, String store, long totalRestored) {
        LOG.info(line(partition, store, totalRestored));
    }

    @Override
    public void onRestoreSuspended(TopicPartition partition, String store, long totalRestored) {
        LOG.info(line(partition, store, totalRestored) + " suspended=true");
    }

    /** The log line of a finished (or suspended) restore; forgets the partition. */
    String line(TopicPartition partition, String store, long totalRestored) {
        Long start = started.remove(partition);
        long millis = start == null ? -1 : (nanoTime.getAsLong() - start) / 1_000_000;
        return "event=restored store=" + store + " changelog=" + partition.topic() + " partition="
                + partition.partition() + " records=" + totalRestored + " millis=" + millis;
    }
}
