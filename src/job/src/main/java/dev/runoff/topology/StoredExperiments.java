package dev.runoff.topology;

import dev.runoff.decision.ExperimentState;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import org.apache.kafka.streams.KeyValue;
import org.apache.kafka.streams.state.KeyValueIterator;
import org.apache.kafka.streams.state.KeyValueStore;

/**
 * The experiments store as the {@link AllocationPass} sees it. A page is read in full and its iterator
 * closed before the pass writes to the store.
 */
final class StoredExperiments implements AllocationPass.Experiments {

    private final KeyValueStore<String, ExperimentState> store;

    StoredExperiments(KeyValueStore<String, ExperimentState> store) {
        this.store = store;
    }

    @Override
    public AllocationPass.Page page(String from, int limit) {
        List<Map.Entry<String, ExperimentState>> entries = new ArrayList<>();
        try (KeyValueIterator<String, ExperimentState> it = store.range(from, null)) {
            while (it.hasNext() && entries.size() < limit) {
                KeyValue<String, ExperimentState> entry = it.next();
                entries.add(Map.entry(entry.key, entry.value));
            }
            return new AllocationPass.Page(entries, it.hasNext() ? it.peekNextKey() : null);
        }
    }

    @Override
    public void put(String id, ExperimentState state) {
        store.put(id, state);
    }
}
