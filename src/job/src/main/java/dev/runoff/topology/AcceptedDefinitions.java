package dev.runoff.topology;

import org.apache.kafka.streams.processor.api.Processor;
import org.apache.kafka.streams.processor.api.ProcessorContext;
import org.apache.kafka.streams.processor.api.Record;
import org.apache.kafka.streams.state.KeyValueStore;

/**
 * Keeps the global store of accepted definitions up to date from the accepted-definitions topic: the
 * encoded definition per experiment id, or {@link DefinitionLookup#ENDED} after a tombstone. The topic is
 * written only by the fold, with definitions it accepted, so the store holds the latest valid version.
 */
final class AcceptedDefinitions implements Processor<String, byte[], Void, Void> {

    private final String storeName;
    private KeyValueStore<String, byte[]> store;

    AcceptedDefinitions(String storeName) {
        this.storeName = storeName;
    }

    @Override
    public void init(ProcessorContext<Void, Void> context) {
        store = context.getStateStore(storeName);
    }

    @Override
    public void process(Record<String, byte[]> record) {
        if (record.key() != null) {
            store.put(record.key(), record.value() == null ? DefinitionLookup.ENDED : record.value());
        }
    }
}
