package dev.runoff.topology;


import dev.runoff.engine.stats.ArmStats;
import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import org.apache.kafka.common.header.internals.RecordHeaders;
import org.apache.kafka.streams.KeyValue;
import org.apache.kafka.streams.processor.PunctuationType;
import org.apache.kafka.streams.processor.api.ContextualProcessor;
import org.apache.kafka.streams.processor.api.ProcessorContext;
import org.apache.kafka.streams.processor.api.Record;
import org.apache.kafka.streams.state.KeyValueIterator;
import org.apache.kafka.streams.state.KeyValueStore;

/**
 * Stage 1, step 5: sums the statistics of each (experiment, arm) seen by this task in a persistent store,
 * and every flush interval (wall clock) forwards each sum keyed by experiment id and deletes it. A flush
 * forwards at most the configured number of sums and resumes where it stopped. With exactly-once
 * processing, the store changes, the forwarded sums and the input offsets commit together: nothing is lost
 * or counted twice.
 */
final class PreAggregate extends ContextualProcessor<byte[], ArmDelta, byte[], StageTwo> {

    private final String storeName;
    private final TopologySettings settings;
    private KeyValueStore<String, ArmStats> sums;
    private String resumeFrom;

    PreAggregate(String storeName, TopologySettings settings) {
        this.storeName = storeName;
        this.settings = settings;
    }

    @Override
    public void init(ProcessorContext<byte[], StageTwo> context) {
        super.init(context);
        sums = context.getStateStore(storeName);
        context.schedule(Duration.ofMillis(settings.flushIntervalMs()), PunctuationType.WALL_CLOCK_TIME, this::flush);
    }

    @Override
    public void process(Record<byte[], ArmDelta> record) {
        ArmDelta delta = record.value();
        String key = delta.key();
        ArmStats sum = sums.get(key);
        sums.put(key, sum == null ? delta.stats() : ArmStats.merge(sum, delta.stats()));
    }

    private void flush(long now) {
        List<KeyValue<String, ArmStats>> batch = new ArrayList<>();
        try (KeyValueIterator<String, ArmStats> it = sums.range(resumeFrom, null)) {
            while (it.hasNext() && batch.size() < settings.flushMaxEntries()) {
                batch.add(it.next());
            }
            resumeFrom = it.hasNext() ? it.peekNextKey() : null;
        }
        for (KeyValue<String, ArmStats> entry : batch) {
            int split = entry.key.indexOf('\u0000');
            String experimentId = entry.key.substring(0, split);
            ArmDelta delta = new ArmDelta(experimentId, entry.key.substring(split + 1), entry.value);
            context().forward(new Record<>(experimentId.getBytes(StandardCharsets.UTF_8), StageTwo.delta(delta), now,
                    new RecordHeaders()));
            sums.delete(entry.key);
        }
    }
}
