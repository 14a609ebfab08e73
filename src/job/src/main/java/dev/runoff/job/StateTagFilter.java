package dev.runoff.job;

import io.micrometer.core.instrument.Meter;
import io.micrometer.core.instrument.Tag;
import io.micrometer.core.instrument.config.MeterFilter;
import java.util.ArrayList;
import java.util.List;

/**
 * Gives every Kafka Streams state-store metric the same tag keys. Kafka Streams names the store's tag after
 * the store type ({@code rocksdb-state-id}, {@code rocksdb-window-state-id}, {@code in-memory-state-id}...),
 * while Prometheus requires one set of tag keys per metric name, so the registry would drop all but the first
 * store type. This filter turns {@code <type>.state.id=<store>} into {@code state.id=<store>} plus
 * {@code store.type=<type>}.
 */
final class StateTagFilter implements MeterFilter {

    private static final String SUFFIX = "state.id";

    @Override
    public Meter.Id map(Meter.Id id) {
        List<Tag> tags = id.getTags();
        Tag store = tags.stream().filter(t -> t.getKey().endsWith("." + SUFFIX)).findFirst().orElse(null);
        if (store == null) {
            return id;
        }
        List<Tag> renamed = new ArrayList<>(tags.size() + 1);
        for (Tag t : tags) {
            if (t != store) {
                renamed.add(t);
            }
        }
        String type = store.getKey().substring(0, store.getKey().length() - SUFFIX.length() - 1);
        renamed.add(Tag.of(SUFFIX, store.getValue()));
        renamed.add(Tag.of("store.type", type));
        return id.replaceTags(renamed);
    }
}
