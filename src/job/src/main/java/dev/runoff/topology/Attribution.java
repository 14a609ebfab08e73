package dev.runoff.topology;

import dev.runoff.engine.core.Metric;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.stats.ValueStats;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
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
 * experiment and unit, so every event of a unit reaches this task).
 * <ul>
 *   <li>A trial event fixes the unit's arm (the first one is kept; a trial on another arm is rejected with
 *       {@code arm-conflict}) and, for a Bernoulli metric, counts one trial.</li>
 *   <li>A success or value event without an arm takes the unit's arm when it lies within the experiment's
 *       attribution window of the unit's latest trial event (either side, to tolerate clock skew between
 *       producers), else it is {@code unattributed}. With an arm, it must be the unit's ({@code arm-mismatch}).
 *       A unit with no trial event cannot be attributed.</li>
 *   <li>Bernoulli: a success counts only while the unit's successes are below its trials, so successes never
 *       exceed trials on any arm; an extra one is rejected with {@code excess-success}.</li>
 *   <li>Value metric: each value event is one observation of the unit's arm; the metric is the mean value
 *       per value event.</li>
 * </ul>
 * Unit entries are dropped once idle for their attribution window plus a margin, by a wall-clock
 * punctuation that looks at a bounded number of entries per call and resumes where it stopped.
 */
final class Attribution extends ContextualProcessor<byte[], UnitEvent, byte[], Routed<ArmDelta>> {

    private final String storeName;
    private final TopologySettings settings;
    private final Rejections rejections;
    private KeyValueStore<String, UnitState> units;
    private String resumeFrom;

    Attribution(String storeName, TopologySettings settings, Rejections rejections) {
        this.storeName = storeName;
        this.settings = settings;
        this.rejections = rejections;
    }

    @Override
    public void init(ProcessorContext<byte[], Routed<ArmDelta>> context) {
        super.init(context);
        units = context.getStateStore(storeName);
        context.schedule(Duration.ofMillis(settings.unitsCleanupIntervalMs()), PunctuationType.WALL_CLOCK_TIME,
                this::cleanUp);
    }

    @Override
    public void process(Record<byte[], UnitEvent> record) {
        UnitEvent event = record.value();
        String key = UnitEvent.unitKey(event.experimentId(), event.unitId());
        UnitState unit = units.get(key);
        long now = context().currentSystemTimeMs();
        if (event.role() == UnitEvent.Role.TRIAL) {
            trial(record, key, unit, now);
            return;
        }
        String arm = resolveArm(record, unit);
        if (arm == null) {
            return;
        }
        if (event.role() == UnitEvent.Role.VALUE) {
            pass(record, new ArmDelta(event.experimentId(), arm, ValueStats.EMPTY.add(event.value())));
        } else if (unit.successes() >= unit.trials()) {
            reject(record, RejectReason.EXCESS_SUCCESS.code(), "type: the unit already has " + unit.successes()
                    + " successes for " + unit.trials() + " trials; successes never exceed trials");
        } else {
            units.put(key, unit.success(now));
            pass(record, new ArmDelta(event.experimentId(), arm, new BernoulliStats(0, 1)));
        }
    }

    private void trial(Record<byte[], UnitEvent> record, String key, UnitState unit, long now) {
        UnitEvent event = record.value();
        if (unit != null && !unit.arm().equals(event.arm())) {
            reject(record, RejectReason.ARM_CONFLICT.code(), "arm: the unit was first counted on arm "
                    + EventValidator.quote(unit.arm()) + ", not " + EventValidator.quote(event.arm())
                    + "; the first arm is kept");
            return;
        }
        units.put(key, unit == null ? UnitState.first(event.arm(), event.timestamp(), event.attributionWindowMs(), now)
                : unit.trial(event.timestamp(), event.attributionWindowMs(), now));
        if (event.metric() == Metric.BERNOULLI) {
            pass(record, new ArmDelta(event.experimentId(), event.arm(), new BernoulliStats(1, 0)));
        }
    }

    /** The arm a success or value event counts for, or {@code null} after rejecting it. */
    private String resolveArm(Record<byte[], UnitEvent> record, UnitState unit) {
        UnitEvent event = record.value();
        if (unit == null) {
            reject(record, RejectReason.UNATTRIBUTED.code(), "unitId: the unit has no trial event in experiment "
                    + EventValidator.quote(event.experimentId()) + " to attribute this " + event.role().name()
                    .toLowerCase(Locale.ROOT) + " event to");
            return null;
        }
        if (event.arm() != null) {
            if (!event.arm().equals(unit.arm())) {
                reject(record, RejectReason.ARM_MISMATCH.code(), "arm: " + EventValidator.quote(event.arm())
                        + " differs from the unit's arm " + EventValidator.quote(unit.arm()));
                return null;
            }
            return unit.arm();
        }
        long gap = Math.abs(event.timestamp() - unit.lastTrialAt());
        if (gap > event.attributionWindowMs()) {
            reject(record, RejectReason.UNATTRIBUTED.code(), "timestamp: " + gap
                    + " ms from the unit's latest trial event, more than the attribution window of "
                    + event.attributionWindowMs() + " ms");
            return null;
        }
        return unit.arm();
    }

    private void pass(Record<byte[], UnitEvent> record, ArmDelta delta) {
        context().forward(new Record<>(record.key(), Routed.pass(delta), record.timestamp(), new RecordHeaders()));
    }

    private void reject(Record<byte[], UnitEvent> record, String reason, String message) {
        UnitEvent event = record.value();
        context().forward(rejections.routed(event.originalKey(), event.originalValue(), record.timestamp(), reason,
                message, event.source()));
    }

    /** Drops expired unit entries, looking at most at the configured number per call. */
    private void cleanUp(long now) {
        List<String> expired = new ArrayList<>();
        int visited = 0;
        try (KeyValueIterator<String, UnitState> it = units.range(resumeFrom, null)) {
            while (it.hasNext() && visited < settings.unitsCleanupMaxEntries()) {
                KeyValue<String, UnitState> entry = it.next();
                visited++;
                if (entry.value.expired(now, settings.unitsRetentionMarginMs())) {
                    expired.add(entry.key);
                }
            }
            resumeFrom = it.hasNext() ? it.peekNextKey() : null;
        }
        expired.forEach(units::delete);
    }
}
