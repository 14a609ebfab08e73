package dev.runoff.job.pages;

import dev.runoff.records.avro.DecisionRecord;
import java.util.Comparator;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.atomic.AtomicLong;

/**
 * Every experiment's decision records as read from the decisions topic (by {@link DecisionFeed}), for the
 * pages. Written by one thread, read by the HTTP query threads.
 */
public final class DecisionHistory {

    private final Map<String, ExperimentHistory> experiments = new ConcurrentHashMap<>();
    private final AtomicLong records = new AtomicLong();
    private final AtomicLong rejected = new AtomicLong();
    private volatile boolean caughtUp;

    /** Adds one decision record. */
    public void add(DecisionRecord record) {
        experiments.computeIfAbsent(record.getExperimentId(), id -> new ExperimentHistory()).add(record);
        records.incrementAndGet();
    }

    /** Counts a record on the decisions topic that did not decode as a decision record. */
    void rejected() {
        rejected.incrementAndGet();
    }

    /** Marks that the topic was read to its end once (before that, the pages say the list may be short). */
    void caughtUp() {
        caughtUp = true;
    }

    /** Whether the decisions topic was read to its end once. */
    boolean isCaughtUp() {
        return caughtUp;
    }

    /** Decision records read. */
    long records() {
        return records.get();
    }

    /** Records on the decisions topic that were not valid decision records. */
    long rejectedRecords() {
        return rejected.get();
    }

    /** The history of {@code id}, if a decision record of it was read. */
    Optional<ExperimentHistory> experiment(String id) {
        return Optional.ofNullable(experiments.get(id));
    }

    /** The latest record of every experiment, by experiment id. */
    List<DecisionRecord> latest() {
        return experiments.values().stream().map(ExperimentHistory::latest)
                .sorted(Comparator.comparing(DecisionRecord::getExperimentId)).toList();
    }
}
