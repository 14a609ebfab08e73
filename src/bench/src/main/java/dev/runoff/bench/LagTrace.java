package dev.runoff.bench;

import dev.runoff.decision.ExperimentState;
import dev.runoff.job.LagWatch;
import dev.runoff.job.Lagging;
import java.util.Arrays;
import java.util.Locale;
import org.apache.kafka.streams.KeyValue;
import org.apache.kafka.streams.state.KeyValueIterator;
import org.apache.kafka.streams.state.KeyValueStore;

/**
 * Follows every experiment of {@link ManyExperimentsBench} from step to step (one read of the whole store per
 * step), to tell why an experiment counts as lagging: never evaluated, or its statistics changed (and since
 * when, as the first step that saw it dirty), or only its heartbeat is due. It also counts the lagging
 * experiments by a {@link LagWatch} fed every step, as the gauge counts them with scans that far apart.
 * Experiment ids are {@code exp-NNNNNN}, the number being the index.
 */
final class LagTrace {

    /** Upper ends (s, inclusive) of the buckets of how long new data has waited for its evaluation. */
    private static final long[] WAITED_S = {2, 5, 10, 20, 60};

    /** Per experiment: wall clock of the first step that saw it dirty since its last evaluation, or -1. */
    private final long[] dirtySince;
    private final LagWatch watch = new LagWatch();
    private long watchLagging;

    LagTrace(int experiments) {
        dirtySince = new long[experiments];
        Arrays.fill(dirtySince, -1);
    }

    /** Reads the store after a step at wall-clock time {@code clock}. */
    void step(KeyValueStore<String, ExperimentState> store, long clock) {
        long lagging = 0;
        watch.begin(clock);
        try (KeyValueIterator<String, ExperimentState> all = store.all()) {
            while (all.hasNext()) {
                KeyValue<String, ExperimentState> next = all.next();
                lagging += watch.lagging(next.key, next.value) ? 1 : 0;
                int index = index(next.key);
                if (!next.value.dirty()) {
                    dirtySince[index] = -1;
                } else if (dirtySince[index] < 0) {
                    dirtySince[index] = clock;
                }
            }
        }
        watch.end();
        watchLagging = lagging;
    }

    /**
     * The experiments lagging at {@code clock}, the time of the last step: by the watch, and by the stateless
     * rule with their causes; one line.
     */
    String lagging(KeyValueStore<String, ExperimentState> store, long clock) {
        long never = 0;
        long heartbeat = 0;
        long[] waited = new long[WAITED_S.length + 1];
        long lastEvaluatedBefore = Long.MAX_VALUE;
        long lastEvaluatedAfter = Long.MIN_VALUE;
        try (KeyValueIterator<String, ExperimentState> all = store.all()) {
            while (all.hasNext()) {
                KeyValue<String, ExperimentState> next = all.next();
                ExperimentState state = next.value;
                if (!Lagging.lagging(state, clock)) {
                    continue;
                }
                if (state.lastComputedAt() < 0) {
                    never++;
                    continue;
                }
                lastEvaluatedBefore = Math.min(lastEvaluatedBefore, state.lastComputedAt());
                lastEvaluatedAfter = Math.max(lastEvaluatedAfter, state.lastComputedAt());
                if (!state.dirty()) {
                    heartbeat++;
                    continue;
                }
                long since = dirtySince[index(next.key)];
                waited[bucket(since < 0 ? 0 : (clock - since) / 1000)]++;
            }
        }
        StringBuilder line = new StringBuilder(String.format(Locale.ROOT, "by the watch %d; by the stateless rule:"
                + " never evaluated %d, heartbeat due %d, new data waiting", watchLagging, never, heartbeat));
        for (int b = 0; b < waited.length; b++) {
            line.append(b < WAITED_S.length ? String.format(Locale.ROOT, " <=%ds: %d", WAITED_S[b], waited[b])
                    : String.format(Locale.ROOT, " >%ds: %d", WAITED_S[b - 1], waited[b]));
        }
        if (lastEvaluatedBefore != Long.MAX_VALUE) {
            line.append(String.format(Locale.ROOT, "; last evaluated %d to %d s before", (clock - lastEvaluatedAfter)
                    / 1000, (clock - lastEvaluatedBefore) / 1000));
        }
        return line.toString();
    }

    private static int bucket(long seconds) {
        for (int b = 0; b < WAITED_S.length; b++) {
            if (seconds <= WAITED_S[b]) {
                return b;
            }
        }
        return WAITED_S.length;
    }

    private static int index(String id) {
        return Integer.parseInt(id.substring(id.indexOf('-') + 1));
    }
}
