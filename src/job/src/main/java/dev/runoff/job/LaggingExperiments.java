package dev.runoff.job;

import java.util.ArrayList;
import java.util.Collections;
import java.util.List;

/**
 * The running experiments a census found lagging ({@link Lagging}): how many, and the ids of the first
 * {@link #MAX_LISTED} in store order, so that {@code /lagging} names them without a label per experiment on
 * the {@code runoff_experiments_lagging} gauge (one time series per experiment id would be unbounded). Built
 * by one scan ({@link #add}), then read only.
 */
public final class LaggingExperiments {

    /** Most ids listed; the count goes on past it. */
    public static final int MAX_LISTED = 1_000;

    private final long scannedAtMillis;
    private final List<String> ids = new ArrayList<>();
    private long count;

    /** An empty list for a scan at wall-clock time {@code scannedAtMillis}. */
    public LaggingExperiments(long scannedAtMillis) {
        this.scannedAtMillis = scannedAtMillis;
    }

    /** Counts experiment {@code id} as lagging, listing it while fewer than {@link #MAX_LISTED} are. */
    void add(String id) {
        count++;
        if (ids.size() < MAX_LISTED) {
            ids.add(id);
        }
    }

    /** Lagging experiments found by the scan. */
    public long count() {
        return count;
    }

    /** Ids of the first {@link #MAX_LISTED} of them, in store order. */
    public List<String> ids() {
        return Collections.unmodifiableList(ids);
    }

    /** Whether more lagged than are listed. */
    public boolean truncated() {
        return count > ids.size();
    }

    /** Wall-clock time of the scan, in epoch milliseconds. */
    public long scannedAtMillis() {
        return scannedAtMillis;
    }
}
