package dev.runoff.topology;

import java.util.Map;
import java.util.TreeMap;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.atomic.LongAdder;

/**
 * Counts of what the job did and set aside: trials folded into experiment statistics, decisions written,
 * allocation passes and their duration, rejected records per reason code, and dropped duplicates. Thread-safe;
 * shared by every stream thread of one application instance. The counts are operational figures, not part
 * of the exactly-once state: a task that is retried after a failure counts its records again.
 */
public final class JobCounters {

    /** Key under which dropped duplicate events are counted. */
    public static final String DUPLICATE = "duplicate-event";
    /** Key under which outcome events held to wait for their unit's first trial event are counted. */
    public static final String EARLY_HELD = "early-outcome-held";
    /** Key under which held outcome events matched by their unit's first trial event are counted. */
    public static final String EARLY_MATCHED = "early-outcome-matched";

    private final Map<String, LongAdder> counts = new ConcurrentHashMap<>();
    private final LongAdder foldedTrials = new LongAdder();
    private final LongAdder decisions = new LongAdder();
    private final LongAdder allocationPasses = new LongAdder();
    private final LongAdder allocationPassNanos = new LongAdder();
    private final LongAdder inPlace = new LongAdder();
    private final LongAdder rerouted = new LongAdder();

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

    /** Counts one outcome event held until its unit's first trial event comes (or the grace ends). */
    public void earlyHeld() {
        add(EARLY_HELD);
    }

    /** Counts one held outcome event matched by its unit's first trial event. */
    public void earlyMatched() {
        add(EARLY_MATCHED);
    }

    /** Counts {@code trials} trials folded into an experiment's statistics. */
    public void folded(long trials) {
        foldedTrials.add(trials);
    }

    /** Counts one decision record written. */
    public void decision() {
        decisions.increment();
    }

    /** Counts one allocation pass that took {@code nanos} nanoseconds. */
    public void allocationPass(long nanos) {
        allocationPasses.increment();
        allocationPassNanos.add(nanos);
    }

    /** Counts one valid outcome event read on its unit's partition (outcomes keyed by unit: no repartition). */
    public void inPlace() {
        inPlace.increment();
    }

    /** Counts one valid outcome event sent to its unit's partition through a repartition topic. */
    public void rerouted() {
        rerouted.increment();
    }

    /** Valid outcome events read on their unit's partition so far (0 unless outcomes are keyed by unit). */
    public long inPlaceEvents() {
        return inPlace.sum();
    }

    /** Valid outcome events rerouted to their unit's partition so far (0 unless outcomes are keyed by unit). */
    public long reroutedEvents() {
        return rerouted.sum();
    }

    /** Trials folded into experiment statistics so far. */
    public long foldedTrials() {
        return foldedTrials.sum();
    }

    /** Decision records written so far. */
    public long decisions() {
        return decisions.sum();
    }

    /** Allocation passes run so far. */
    public long allocationPasses() {
        return allocationPasses.sum();
    }

    /** Total duration of the allocation passes so far, in nanoseconds. */
    public long allocationPassNanos() {
        return allocationPassNanos.sum();
    }

    /** The count under {@code key} (a reason code, {@link #DUPLICATE}, {@link #EARLY_HELD}...), 0 if none. */
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
