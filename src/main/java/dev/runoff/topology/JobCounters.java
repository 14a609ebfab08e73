package dev.runoff.topology;

import java.util.Map;
import java.util.TreeMap;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.atomic.LongAdder;

/**
 * Counts of what the job set aside: rejected records per reason code, and dropped duplicates. Thread-safe;
 * shared by every stream thread of one application instance. The counts are operational figures, not part
 * of the exactly-once state: a task that is retried after a failure counts its records again.
 */
public final class JobCounters {

    /** Key under which dropped duplicate events are counted. */
    public static final String DUPLICATE = "duplicate-event";

    private final Map<String, LongAdder> counts = new ConcurrentHashMap<>();

    /** Empty counters. */
    public JobCounters() {
        // nothing counted yet
    }

    /** Counts one rejection with reason code {@code code}. */
    public void rejected(String code) {
        add(code);
    }

    /** Counts one dropped duplicate. */
    public void duplicate() {
        add(DUPLICATE);
    }

    /** The count under {@code key} (a reason code or {@link #DUPLICATE}), 0 if none. */
    public long count(String key) {
        LongAdder adder = counts.get(key);
        return adder == null ? 0 : adder.sum();
    }

    /** Every non-zero count, by key in alphabetical order. */
    public Map<String, Long> snapshot() {
        Map<String, Long> copy = new TreeMap<>();
        counts.forEach((key, adder) -> copy.put(key, adder.sum()));
        return copy;
    }

    private void add(String key) {
        counts.computeIfAbsent(key, k -> new LongAdder()).increment();
    }
}
