package dev.runoff.topology;


import dev.runoff.engine.stats.ArmStats;
import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import org.apache.kafka.common.header.internals.RecordHeaders;
import org.apache.kafka.streams.KeyValue;
import org.apache.kafka.streams.processor.PunctuationType;
import org.apache.kafka.streams.processor.api.ContextualProcessor;
import org.apache.kafka.streams.processor.api.ProcessorContext;
import org.apache.kafka.streams.processor.api.Record;
import org.apache.kafka.streams.state.KeyValueIterator;
import org.apache.kafka.streams.state.KeyValueStore;

/**
 * Stage 1, step 5: sums the statistics and pending-unit changes of each (experiment, arm, version of the
 * units' first exposure) seen by this task in a persistent store,
 * and every flush interval (wall clock) forwards each sum keyed by experiment id and deletes it. A flush
 * forwards at most the configured number of sums and resumes where it stopped. With exactly-once
 * processing, the store changes, the forwarded sums and the input offsets commit together: nothing is lost
 * or counted twice.
 */
final class PreAggregate extends ContextualProcessor<byte[], ArmDelta, byte[], StageTwo> {

    private final String storeName;
    private final TopologySettings settings;
    private KeyValueStore<String, Sum> sums;
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
        Sum sum = sums.get(key);
        sums.put(key, sum == null ? new Sum(delta.stats(), delta.pending(), delta.signalUnits(), delta.signalTotals())
                : new Sum(ArmStats.merge(sum.stats(), delta.stats()), sum.pending() + delta.pending(),
                        ArmDelta.sum(sum.signalUnits(), delta.signalUnits()),
                        ArmDelta.sumTotals(sum.signalTotals(), delta.signalTotals())));
    }

    private void flush(long now) {
        List<KeyValue<String, Sum>> batch = new ArrayList<>();
        try (KeyValueIterator<String, Sum> it = sums.range(resumeFrom, null)) {
            while (it.hasNext() && batch.size() < settings.flushMaxEntries()) {
                batch.add(it.next());
            }
            resumeFrom = it.hasNext() ? it.peekNextKey() : null;
        }
        for (KeyValue<String, Sum> entry : batch) {
            ArmDelta delta = ArmDelta.of(entry.key, entry.value.stats(), entry.value.pending(),
                    entry.value.signalUnits(), entry.value.signalTotals());
            context().forward(new Record<>(delta.experimentId().getBytes(StandardCharsets.UTF_8),
                    StageTwo.delta(delta), now, new RecordHeaders()));
            sums.delete(entry.key);
        }
    }

    /**
     * A stored sum: statistics, the change of pending units, per guardrail signal the counted units that
     * had it, and per signal of value guardrails the total of the units' observations. Sums an earlier job
     * stored end after the pending units (they read as having no signals) or after the signal counts (no
     * totals).
     */
    record Sum(ArmStats stats, long pending, Map<String, Long> signalUnits, Map<String, Double> signalTotals) {

        /** A sum without signal totals. */
        Sum(ArmStats stats, long pending, Map<String, Long> signalUnits) {
            this(stats, pending, signalUnits, Map.of());
        }

        /** Serde of the store. */
        static final InternalSerde<Sum> SERDE = new InternalSerde<>(Sum::encode, Sum::decode);

        private static byte[] encode(Sum sum) {
            BinaryOut out = new BinaryOut();
            Stats.write(out, sum.stats);
            out.writeLong(sum.pending);
            ArmDelta.writeSignals(out, sum.signalUnits);
            ArmDelta.writeTotals(out, sum.signalTotals);
            return out.toByteArray();
        }

        private static Sum decode(byte[] bytes) {
            BinaryIn in = new BinaryIn(bytes);
            Sum sum = new Sum(Stats.read(in), in.readLong(), in.hasMore() ? ArmDelta.readSignals(in) : Map.of(),
                    in.hasMore() ? ArmDelta.readTotals(in) : Map.of());
            in.end();
            return sum;
        }
    }
}
