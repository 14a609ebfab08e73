package dev.runoff.job;

import dev.runoff.decision.ExperimentState;
import dev.runoff.topology.RunoffTopology;
import java.util.function.LongSupplier;
import org.apache.kafka.streams.KafkaStreams;
import org.apache.kafka.streams.KeyValue;
import org.apache.kafka.streams.StoreQueryParameters;
import org.apache.kafka.streams.errors.InvalidStateStoreException;
import org.apache.kafka.streams.state.KeyValueIterator;
import org.apache.kafka.streams.state.QueryableStoreTypes;
import org.apache.kafka.streams.state.ReadOnlyKeyValueStore;

/**
 * Counts the experiments this instance holds (its active partitions of the experiments store), running and
 * stopped, for the {@code runoff_experiments} gauge, and the running ones that are {@link Lagging} for the
 * {@code runoff_experiments_lagging} gauge and {@code /lagging}, by a {@link LagWatch} over the census's own
 * scans. A count is at most {@link #MAX_AGE_NANOS} old: the store is scanned at most once per interval,
 * whatever the scrape rate. While the store cannot be read (rebalance, restore) the last counts stay.
 */
final class ExperimentCensus {

    /** Longest a count is reused: 5 s. */
    static final long MAX_AGE_NANOS = 5_000_000_000L;

    private final KafkaStreams streams;
    private final LongSupplier nanoTime;
    private final LongSupplier wallMillis;
    private final LagWatch watch = new LagWatch();
    private long takenAt;
    private boolean taken;
    private long running;
    private long stopped;
    private LaggingExperiments lagging = new LaggingExperiments(0);

    ExperimentCensus(KafkaStreams streams, LongSupplier nanoTime, LongSupplier wallMillis) {
        this.streams = streams;
        this.nanoTime = nanoTime;
        this.wallMillis = wallMillis;
    }

    /** Experiments held here that have not stopped. */
    synchronized long running() {
        refresh();
        return running;
    }

    /** Experiments held here that stopped (still published until their definition is ended). */
    synchronized long stopped() {
        refresh();
        return stopped;
    }

    /** Running experiments held here whose next decision is overdue ({@link Lagging}). */
    synchronized long lagging() {
        refresh();
        return lagging.count();
    }

    /** The lagging experiments of the latest scan, with their ids ({@code /lagging}). */
    synchronized LaggingExperiments laggingExperiments() {
        refresh();
        return lagging;
    }

    private void refresh() {
        long now = nanoTime.getAsLong();
        if (taken && now - takenAt < MAX_AGE_NANOS || streams.state() != KafkaStreams.State.RUNNING) {
            return;
        }
        try {
            ReadOnlyKeyValueStore<String, ExperimentState> store = streams.store(StoreQueryParameters.fromNameAndType(
                    RunoffTopology.EXPERIMENTS_STORE, QueryableStoreTypes.<String, ExperimentState>keyValueStore()));
            long run = 0;
            long stop = 0;
            long scanAt = wallMillis.getAsLong();
            LaggingExperiments late = new LaggingExperiments(scanAt);
            watch.begin(scanAt);
            try (KeyValueIterator<String, ExperimentState> all = store.all()) {
                while (all.hasNext()) {
                    KeyValue<String, ExperimentState> next = all.next();
                    if (next.value.stopped()) {
                        stop++;
                    } else {
                        run++;
                        if (watch.lagging(next.key, next.value)) {
                            late.add(next.key);
                        }
                    }
                }
            }
            watch.end();
            running = run;
            stopped = stop;
            lagging = late;
            takenAt = now;
            taken = true;
        } catch (InvalidStateStoreException e) {
            // rebalancing or restoring: keep the last counts
        }
    }
}
