package dev.runoff.topology;

import dev.runoff.engine.core.Metric;
import dev.runoff.engine.stats.ArmStats;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.stats.ValueStats;
import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import org.apache.kafka.common.header.internals.RecordHeaders;
import org.apache.kafka.streams.KeyValue;
import org.apache.kafka.streams.processor.PunctuationType;
import org.apache.kafka.streams.processor.api.ContextualProcessor;
import org.apache.kafka.streams.processor.api.ProcessorContext;
import org.apache.kafka.streams.processor.api.Record;
import org.apache.kafka.streams.state.KeyValueIterator;
import org.apache.kafka.streams.state.KeyValueStore;

/**
 * Stage 1, step 4: turns events into per-arm statistics, one unit at a time (events arrive keyed by
 * experiment and unit, so every event of a unit reaches this task). {@link UnitCounting} is the rule.
 * <ul>
 *   <li>First, deduplication ({@link SeenEvents}): an event whose id the unit's entry (or, past the entry's
 *       bound, the overflow store) holds from within the window is dropped and counted; any other has its id
 *       added to the entry, which the step that follows writes once.</li>
 *   <li>A trial event fixes the unit's arm (the first one is kept; a trial on another arm is rejected with
 *       {@code arm-conflict}). Unit counting (Bernoulli, the default): the unit becomes pending on its arm;
 *       per-exposure counting: one trial.</li>
 *   <li>A success or value event is credited to the unit's counted (first) exposure. Naming another arm than
 *       the unit's is {@code arm-mismatch}; an arm-less event takes the unit's arm. Unit counting: a success
 *       stamped more than the conversion window after the first exposure is {@code unattributed}, a second
 *       one {@code excess-success}, one arriving after the unit was counted {@code late-outcome}. Per
 *       exposure: an arm-less event must lie within the window of the latest exposure, and successes never
 *       exceed trials. Value per unit: a value event within the window of the first exposure is added to the
 *       unit's sum (any number of them), outside it {@code unattributed}, after the unit was counted
 *       {@code late-outcome}; the unit reports its capped sum when its window closes.</li>
 *   <li>An outcome whose unit has no trial event yet waits up to the definition's early-outcome grace
 *       ({@link #MAX_WAITING_PER_UNIT} per unit) and is replayed when the trial event comes; after the grace
 *       it is rejected as {@code unattributed}.</li>
 *   <li>A punctuation every flush interval (wall clock) closes the windows that have ended by the close time
 *       of {@link UnitCounting#closeTime}: each such unit enters its arm's trials, as a success if it
 *       converted (value per unit: as one observation, its capped sum, 0 without value events).</li>
 * </ul>
 * Time: windows compare event timestamps with each other. A window counts as closed only once both the wall
 * clock and the task's stream time (the largest record timestamp it has read; records on the events-by-unit
 * topic keep the timestamp of the original outcome record, which the client library sets to the event's
 * timestamp) have passed its end, so a task that lags behind its input does not count a unit before it has
 * read the outcomes stamped inside the window. A task that has read nothing for
 * {@link TopologySettings#unitsCloseIdleMs()} (counted from start-up too) closes by the wall clock alone.
 * Early-outcome graces and the clean-up run on the wall clock. Unit entries are dropped once counted and idle
 * for their window plus a margin, by a wall-clock punctuation that looks at a bounded number of entries per
 * call.
 */
final class Attribution extends ContextualProcessor<byte[], UnitEvent, byte[], Routed<ArmDelta>> {

    /** Most outcome events one unit may have waiting for its first trial event. */
    static final int MAX_WAITING_PER_UNIT = 16;

    private static final char CLOSE = 'C';
    private static final char EXPIRE = 'E';
    private static final int DIGITS = 19;

    private final TopologySettings settings;
    private final Rejections rejections;
    private final JobCounters counters;
    private KeyValueStore<String, UnitEntry> units;
    private KeyValueStore<String, byte[]> deadlines;
    private KeyValueStore<String, Waiting> early;
    private SeenEvents seen;
    private String resumeFrom;
    private long lastReadAt;
    /** The entry of the unit whose event is being processed, with the event's id. */
    private UnitEntry current;
    /** Whether {@link #current} has changed since it was last written. */
    private boolean unsaved;

    Attribution(TopologySettings settings, Rejections rejections, JobCounters counters) {
        this.settings = settings;
        this.rejections = rejections;
        this.counters = counters;
    }

    @Override
    public void init(ProcessorContext<byte[], Routed<ArmDelta>> context) {
        super.init(context);
        units = context.getStateStore(RunoffTopology.UNITS_STORE);
        deadlines = context.getStateStore(RunoffTopology.DEADLINES_STORE);
        early = context.getStateStore(RunoffTopology.EARLY_STORE);
        seen = new SeenEvents(context.getStateStore(RunoffTopology.OVERFLOW_STORE),
                context.getStateStore(RunoffTopology.DEDUPE_STORE), settings.dedupeWindowMs());
        lastReadAt = context.currentSystemTimeMs();
        seen.anchor(lastReadAt);
        context.schedule(Duration.ofMillis(settings.unitsCleanupIntervalMs()), PunctuationType.WALL_CLOCK_TIME,
                this::cleanUp);
        context.schedule(Duration.ofMillis(settings.flushIntervalMs()), PunctuationType.WALL_CLOCK_TIME,
                this::deadlinesDue);
    }

    @Override
    public void process(Record<byte[], UnitEvent> record) {
        UnitEvent event = record.value();
        String key = UnitEvent.unitKey(event.experimentId(), event.unitId());
        UnitEntry entry = units.get(key);
        long now = context().currentSystemTimeMs();
        if (seen.seen(entry, event, now)) {
            counters.duplicate();
            return;
        }
        lastReadAt = now;
        current = seen.remember(entry, event, now);
        unsaved = true;
        UnitState unit = current.unit();
        if (event.role() == UnitEvent.Role.TRIAL) {
            trial(event, record.timestamp(), key, unit, now);
        } else if (unit == null) {
            hold(event, record.timestamp(), key, now);
        } else {
            outcome(event, record.timestamp(), key, unit, now);
        }
        if (unsaved) {
            units.put(key, current);
        }
    }

    /** Stores {@code unit} in the entry being processed, with the ids it keeps. */
    private void putUnit(String key, UnitState unit) {
        current = current.withUnit(unit);
        units.put(key, current);
        unsaved = false;
    }

    private void trial(UnitEvent event, long timestamp, String key, UnitState unit, long now) {
        UnitCounting.Step step = UnitCounting.expose(unit, event.arm(), event.version(), event.unitLevel(),
                event.timestamp(), event.attributionWindowMs(), event.valueCap(), now);
        if (step.verdict() == UnitCounting.Verdict.ARM_CONFLICT) {
            reject(event, timestamp, RejectReason.ARM_CONFLICT, "arm: the unit was first counted on arm "
                    + EventValidator.quote(unit.arm()) + ", not " + EventValidator.quote(event.arm())
                    + "; the first arm is kept");
            return;
        }
        putUnit(key, step.unit());
        if (unit == null && step.unit().unitLevel()) {
            deadlines.put(deadline(step.unit().closesAt(), CLOSE, key), new byte[0]);
        }
        if (event.metric() == Metric.BERNOULLI || step.unit().valuePerUnit()) {
            pass(step.unit(), event.experimentId(), step.count(), timestamp);
        }
        if (unit == null) {
            release(key, now);
        }
    }

    /** A success or value event of a unit that has a trial event. */
    private void outcome(UnitEvent event, long timestamp, String key, UnitState unit, long now) {
        if (event.arm() != null && !event.arm().equals(unit.arm())) {
            reject(event, timestamp, RejectReason.ARM_MISMATCH, "arm: " + EventValidator.quote(event.arm())
                    + " differs from the arm " + EventValidator.quote(unit.arm()) + " the unit was first exposed to");
            return;
        }
        if (event.role() == UnitEvent.Role.VALUE && unit.valuePerUnit()) {
            unitValue(event, timestamp, key, unit, now);
            return;
        }
        if (event.role() == UnitEvent.Role.VALUE) {
            value(event, timestamp, unit);
            return;
        }
        if (event.role() == UnitEvent.Role.GUARDRAIL) {
            signal(event, timestamp, key, unit, now);
            return;
        }
        UnitCounting.Step step = UnitCounting.convert(unit, event.timestamp(), event.arm() != null, now);
        switch (step.verdict()) {
            case TAKEN -> {
                putUnit(key, step.unit());
                pass(step.unit(), event.experimentId(), step.count(), timestamp);
            }
            case OUTSIDE_WINDOW -> reject(event, timestamp, RejectReason.UNATTRIBUTED, "timestamp: "
                    + (event.timestamp() - (unit.unitLevel() ? unit.firstTrialAt() : unit.lastTrialAt()))
                    + " ms from the unit's " + (unit.unitLevel() ? "first" : "latest") + " trial event, outside"
                    + " the conversion window of " + unit.windowMs() + " ms");
            case EXCESS -> reject(event, timestamp, RejectReason.EXCESS_SUCCESS, "type: the unit already has "
                    + unit.successes() + (unit.unitLevel() ? " success; a unit converts at most once"
                    : " successes for " + unit.trials() + " trials; successes never exceed trials"));
            case LATE -> reject(event, timestamp, RejectReason.LATE_OUTCOME, "timestamp: the unit's conversion"
                    + " window closed at " + unit.closesAt() + " and it was counted as a failure before this"
                    + " success arrived");
            default -> throw new IllegalStateException("unexpected verdict " + step.verdict());
        }
    }

    /** A guardrail signal: marks the unit, which reports it when its window closes. */
    private void signal(UnitEvent event, long timestamp, String key, UnitState unit, long now) {
        marked(event, timestamp, key, unit, UnitCounting.signal(unit, event.signal(), event.valueCap(),
                event.value(), event.timestamp(), now), "it was counted for the guardrails before this signal arrived");
    }

    /** Value per unit: adds the value to the unit's sum, which the unit reports when its window closes. */
    private void unitValue(UnitEvent event, long timestamp, String key, UnitState unit, long now) {
        marked(event, timestamp, key, unit, UnitCounting.addValue(unit, event.value(), event.timestamp(), now),
                "its value was counted before this value arrived");
    }

    /**
     * Stores the unit an outcome marked (a signal, a value to add up), or rejects the outcome naming its
     * timestamp: outside the window of the first exposure, or after the unit was counted ({@code lateWhy}).
     */
    private void marked(UnitEvent event, long timestamp, String key, UnitState unit, UnitCounting.Step step,
                        String lateWhy) {
        switch (step.verdict()) {
            case TAKEN -> putUnit(key, step.unit());
            case OUTSIDE_WINDOW -> reject(event, timestamp, RejectReason.UNATTRIBUTED, "timestamp: "
                    + (event.timestamp() - unit.firstTrialAt()) + " ms from the unit's first trial event, outside"
                    + " the conversion window of " + unit.windowMs() + " ms");
            case LATE -> reject(event, timestamp, RejectReason.LATE_OUTCOME, "timestamp: the unit's conversion"
                    + " window closed at " + unit.closesAt() + " and " + lateWhy);
            default -> throw new IllegalStateException("unexpected verdict " + step.verdict());
        }
    }

    private void value(UnitEvent event, long timestamp, UnitState unit) {
        long gap = Math.abs(event.timestamp() - unit.lastTrialAt());
        if (event.arm() == null && gap > event.attributionWindowMs()) {
            reject(event, timestamp, RejectReason.UNATTRIBUTED, "timestamp: " + gap
                    + " ms from the unit's latest trial event, more than the attribution window of "
                    + event.attributionWindowMs() + " ms");
            return;
        }
        forward(new ArmDelta(event.experimentId(), unit.arm(), unit.version(), ValueStats.EMPTY.add(event.value()),
                0), timestamp);
    }

    /** An outcome before its unit's first trial event: waits for it, within the grace and the bound. */
    private void hold(UnitEvent event, long timestamp, String key, long now) {
        Waiting waiting = early.get(key);
        int count = waiting == null ? 0 : waiting.events().size();
        if (event.earlyGraceMs() <= 0 || count >= MAX_WAITING_PER_UNIT) {
            reject(event, timestamp, RejectReason.UNATTRIBUTED, "unitId: the unit has no trial event in experiment "
                    + EventValidator.quote(event.experimentId()) + " to attribute this "
                    + event.role().name().toLowerCase(Locale.ROOT) + " event to"
                    + (event.earlyGraceMs() <= 0 ? "" : " and already has " + count + " events waiting for one"));
            return;
        }
        Waiting.Entry entry = new Waiting.Entry(now, event);
        early.put(key, waiting == null ? new Waiting(List.of(entry)) : waiting.with(entry));
        deadlines.put(deadline(saturatedSum(now, event.earlyGraceMs()), EXPIRE, key), new byte[0]);
        counters.earlyHeld();
    }

    /** Replays the outcomes that waited for the unit's first trial event. */
    private void release(String key, long now) {
        Waiting waiting = early.get(key);
        if (waiting == null) {
            return;
        }
        early.delete(key);
        for (Waiting.Entry entry : waiting.events()) {
            counters.earlyMatched();
            outcome(entry.event(), now, key, current.unit(), now);
        }
    }

    private void pass(UnitState unit, String experimentId, UnitCounting.Count count, long timestamp) {
        if (!count.isEmpty()) {
            forward(new ArmDelta(experimentId, unit.arm(), unit.version(), stats(unit, count), count.pending(),
                    ArmDelta.ofUnit(count.signals()), count.signalObservations()), timestamp);
        }
    }

    /** The statistics a count adds: Bernoulli, or (value per unit) the counted unit's observation, if any. */
    private static ArmStats stats(UnitState unit, UnitCounting.Count count) {
        if (!unit.valuePerUnit()) {
            return new BernoulliStats(count.trials(), count.successes());
        }
        return count.trials() > 0 ? ValueStats.EMPTY.add(count.value()) : ValueStats.EMPTY;
    }

    private void forward(ArmDelta delta, long timestamp) {
        String key = UnitEvent.unitKey(delta.experimentId(), "");
        context().forward(new Record<>(key.getBytes(StandardCharsets.UTF_8), Routed.pass(delta), timestamp,
                new RecordHeaders()));
    }

    private void reject(UnitEvent event, long timestamp, RejectReason reason, String message) {
        context().forward(rejections.routed(event.originalKey(), event.originalValue(), timestamp, reason.code(),
                message, event.source()));
    }

    /**
     * Closes the windows due by the close time and ends the graces due by {@code now} (wall clock), at most
     * the clean-up bound of each per call.
     */
    private void deadlinesDue(long now) {
        moveEarlierLayout();
        long closeTime = UnitCounting.closeTime(now, context().currentStreamTimeMs(), lastReadAt,
                settings.unitsCloseIdleMs());
        for (String entry : due(CLOSE, closeTime)) {
            deadlines.delete(entry);
            close(entry.substring(DIGITS + 1), closeTime, now);
        }
        for (String entry : due(EXPIRE, now)) {
            deadlines.delete(entry);
            expire(entry.substring(DIGITS + 1), now);
        }
    }

    /**
     * Moves deadlines written in the earlier key layout (the time first, then the kind: a key that starts with a
     * digit) to the current one, at most the clean-up bound per call, so that the windows and graces a job of an
     * earlier version left in its store are still closed and ended.
     */
    private void moveEarlierLayout() {
        List<String> earlier = new ArrayList<>();
        try (KeyValueIterator<String, byte[]> it = deadlines.range("0", ":")) {
            while (it.hasNext() && earlier.size() < settings.unitsCleanupMaxEntries()) {
                earlier.add(it.next().key);
            }
        }
        for (String entry : earlier) {
            deadlines.delete(entry);
            deadlines.put(deadline(Long.parseLong(entry.substring(0, DIGITS)), entry.charAt(DIGITS),
                    entry.substring(DIGITS + 1)), new byte[0]);
        }
    }

    /** Deadlines of {@code kind} at or before {@code at}, in time order, at most the clean-up bound. */
    private List<String> due(char kind, long at) {
        List<String> due = new ArrayList<>();
        long after = at == Long.MAX_VALUE ? at : at + 1;
        try (KeyValueIterator<String, byte[]> it = deadlines.range(String.valueOf(kind), deadline(after, kind, ""))) {
            while (it.hasNext() && due.size() < settings.unitsCleanupMaxEntries()) {
                due.add(it.next().key);
            }
        }
        return due;
    }

    private void close(String key, long closeTime, long now) {
        UnitEntry entry = units.get(key);
        if (entry == null || entry.unit() == null) {
            return;
        }
        UnitCounting.Step step = UnitCounting.close(entry.unit(), closeTime, now);
        if (!step.count().isEmpty()) {
            units.put(key, entry.withUnit(step.unit()));
            pass(step.unit(), key.substring(0, key.indexOf('\u0000')), step.count(), now);
        }
    }

    private void expire(String key, long now) {
        Waiting waiting = early.get(key);
        if (waiting == null) {
            return;
        }
        List<Waiting.Entry> kept = new ArrayList<>();
        for (Waiting.Entry entry : waiting.events()) {
            UnitEvent event = entry.event();
            if (now - entry.arrivedAt() >= event.earlyGraceMs()) {
                reject(event, now, RejectReason.UNATTRIBUTED, "unitId: the unit had no trial event in experiment "
                        + EventValidator.quote(event.experimentId()) + " within the early-outcome grace of "
                        + event.earlyGraceMs() + " ms after this " + event.role().name().toLowerCase(Locale.ROOT)
                        + " event arrived");
            } else {
                kept.add(entry);
            }
        }
        if (kept.isEmpty()) {
            early.delete(key);
        } else {
            early.put(key, new Waiting(kept));
        }
    }

    /**
     * Deadline key: the kind, the time as 19 digits (sorts in time order within a kind), the unit key. The
     * kinds are apart so that windows and graces, due by different clocks, are each read in time order.
     */
    static String deadline(long at, char kind, String unitKey) {
        String time = Long.toString(Math.max(0L, at));
        StringBuilder key = new StringBuilder(1 + DIGITS + unitKey.length()).append(kind);
        for (int i = time.length(); i < DIGITS; i++) {
            key.append('0');
        }
        return key.append(time).append(unitKey).toString();
    }

    private static long saturatedSum(long a, long b) {
        long sum = a + b;
        return ((a ^ sum) & (b ^ sum)) < 0 ? Long.MAX_VALUE : sum;
    }

    /**
     * Drops expired units, looking at most at the configured number of entries per call. An entry whose ids
     * are still inside the deduplication window keeps them without its unit (a unit that returns is counted
     * as a new one, as before); it is deleted once they are not.
     */
    private void cleanUp(long now) {
        Map<String, UnitEntry> changed = new LinkedHashMap<>();
        int visited = 0;
        try (KeyValueIterator<String, UnitEntry> it = units.range(resumeFrom, null)) {
            while (it.hasNext() && visited < settings.unitsCleanupMaxEntries()) {
                KeyValue<String, UnitEntry> entry = it.next();
                visited++;
                UnitState unit = entry.value.unit();
                if (unit != null && !unit.expired(now, settings.unitsRetentionMarginMs())) {
                    continue;
                }
                if (!entry.value.remembersAt(now, settings.dedupeWindowMs())) {
                    changed.put(entry.key, null);
                } else if (unit != null) {
                    changed.put(entry.key, entry.value.withUnit(null));
                }
            }
            resumeFrom = it.hasNext() ? it.peekNextKey() : null;
        }
        changed.forEach((key, entry) -> {
            if (entry == null) {
                units.delete(key);
            } else {
                units.put(key, entry);
            }
        });
    }
}
