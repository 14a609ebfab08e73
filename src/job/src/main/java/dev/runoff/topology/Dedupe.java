package dev.runoff.topology;

import org.apache.kafka.streams.processor.api.ContextualProcessor;
import org.apache.kafka.streams.processor.api.ProcessorContext;
import org.apache.kafka.streams.processor.api.Record;
import org.apache.kafka.streams.state.WindowStore;
import org.apache.kafka.streams.state.WindowStoreIterator;

/**
 * Stage 1, step 3: drops an event whose id was already seen for the same experiment within the window,
 * measured on the injected wall clock (when the job saw it, not the event's own timestamp, so a redelivery
 * with any timestamp is caught). The ids live in a persistent window store whose retention is the window:
 * old ids expire with their segments, so the store stays bounded. Duplicates are counted, not rejected:
 * redelivery is normal.
 */
final class Dedupe extends ContextualProcessor<byte[], UnitEvent, byte[], UnitEvent> {

    private static final byte[] SEEN = {1};

    private final String storeName;
    private final long windowMs;
    private final JobCounters counters;
    private WindowStore<String, byte[]> seen;

    Dedupe(String storeName, long windowMs, JobCounters counters) {
        this.storeName = storeName;
        this.windowMs = windowMs;
        this.counters = counters;
    }

    @Override
    public void init(ProcessorContext<byte[], UnitEvent> context) {
        super.init(context);
        seen = context.getStateStore(storeName);
    }

    @Override
    public void process(Record<byte[], UnitEvent> record) {
        String key = record.value().eventKey();
        long now = context().currentSystemTimeMs();
        try (WindowStoreIterator<byte[]> earlier = seen.fetch(key, Math.max(0L, now - windowMs), now)) {
            if (earlier.hasNext()) {
                counters.duplicate();
                return;
            }
        }
        seen.put(key, SEEN, now);
        context().forward(record);
    }
}
