package dev.runoff.job;

import dev.runoff.decision.ExperimentState;
import java.util.HashMap;
import java.util.Map;

/**
 * {@link Lagging} over successive reads (scans) of the experiments store, remembering for each experiment
 * seen with new data (dirty) a time that data came after: the previous scan, when that scan did not see the
 * experiment dirty. The decision on that data is then due no earlier than that scan, so an experiment quiet
 * for a long time is not counted as lagging the moment its new data is folded. The bound errs early by at
 * most the time between two scans, so the count may be high by the experiments whose data waited less than
 * one period plus that time; it is not low, except just after a task moved here (below).
 *
 * <p>On the first scan, and for an experiment already dirty then, the time is not known and the stateless
 * rule applies (an upper bound). An experiment whose task moved here since the previous scan is taken as
 * getting its data after that scan, so it may go uncounted for up to one recompute period. Memory: one entry
 * per experiment that is dirty, for the scan. Not thread-safe: one caller at a time.
 */
public final class LagWatch {

    private Map<String, Long> dataAfter = new HashMap<>();
    private Map<String, Long> scanning = new HashMap<>();
    private long previousScan = Lagging.UNKNOWN;
    private long scanAt;

    /** Starts a scan at wall-clock time {@code nowMillis}; each experiment held is then passed to {@link #lagging}. */
    public void begin(long nowMillis) {
        scanning = new HashMap<>();
        scanAt = nowMillis;
    }

    /** Whether experiment {@code id} in {@code state} is lagging at the time of this scan; remembers it. */
    public boolean lagging(String id, ExperimentState state) {
        long after = Lagging.UNKNOWN;
        if (state.dirty()) {
            after = dataAfter.getOrDefault(id, previousScan);
            scanning.put(id, after);
        }
        return Lagging.lagging(state, scanAt, after);
    }

    /** Ends the scan: the next one compares with it. A scan that was not completed is simply not ended. */
    public void end() {
        dataAfter = scanning;
        previousScan = scanAt;
    }
}
