package dev.runoff.topology;

import dev.runoff.decision.Evaluator;
import dev.runoff.decision.ExperimentState;

import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.ObjectNode;
import dev.runoff.engine.stats.ArmStats;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.stats.ValueStats;
import dev.runoff.records.Definitions;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.ExperimentDefinition;
import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.function.LongSupplier;
import org.apache.kafka.streams.KeyValue;
import org.apache.kafka.streams.processor.PunctuationType;
import org.apache.kafka.streams.processor.api.ContextualProcessor;
import org.apache.kafka.streams.processor.api.ProcessorContext;
import org.apache.kafka.streams.processor.api.Record;
import org.apache.kafka.streams.state.KeyValueIterator;
import org.apache.kafka.streams.state.KeyValueStore;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Stage 2: one task holds every experiment whose id hashes to it, in a persistent store of
 * {@link ExperimentState}.
 * <ul>
 *   <li>A definition gets its version ({@link Definitions#assignVersion}: same content keeps it, a change
 *       adds 1), replaces the configuration (see {@link ExperimentState#withDefinition}) and is published on
 *       the accepted-definitions topic, which feeds event validation.</li>
 *   <li>The end of an experiment deletes its state and publishes tombstones on the control and accepted
 *       topics.</li>
 *   <li>Statistics are merged into their arm; statistics for an unknown experiment or arm, or of the other
 *       metric kind, are kept out and sent to the rejected topic.</li>
 *   <li>A wall-clock punctuation (the allocation pass) visits the experiments round robin and evaluates those
 *       that are due: a new experiment or version; new data and the recompute period elapsed; or the
 *       heartbeat elapsed. A stopped experiment only re-publishes its control record at each heartbeat. One
 *       pass does at most the configured number of evaluations, starts none after the configured time, and
 *       the next pass resumes where it stopped.</li>
 * </ul>
 */
final class Fold extends ContextualProcessor<byte[], StageTwo, byte[], Emit> {

    private static final Logger LOG = LoggerFactory.getLogger(Fold.class);
    private static final ObjectMapper JSON = new ObjectMapper();
    private static final long NANOS_PER_MILLI = 1_000_000L;

    private final String storeName;
    private final TopologySettings settings;
    private final Rejections rejections;
    private final JobCounters counters;
    private final LongSupplier nanoTime;
    private final Evaluator evaluator;
    private final RecordCodec<DecisionRecord> decisions = RecordCodec.decisionRecords();
    private final RecordCodec<AllocationUpdate> updates = RecordCodec.allocationUpdates();
    private final RecordCodec<ExperimentDefinition> definitions = RecordCodec.definitions();
    private KeyValueStore<String, ExperimentState> experiments;
    private String resumeFrom;

    Fold(String storeName, TopologySettings settings, Rejections rejections, JobCounters counters,
         LongSupplier nanoTime) {
        this.storeName = storeName;
        this.settings = settings;
        this.rejections = rejections;
        this.counters = counters;
        this.nanoTime = nanoTime;
        this.evaluator = new Evaluator(settings.monteCarloDraws());
    }

    @Override
    public void init(ProcessorContext<byte[], Emit> context) {
        super.init(context);
        experiments = context.getStateStore(storeName);
        context.schedule(Duration.ofMillis(settings.allocateIntervalMs()), PunctuationType.WALL_CLOCK_TIME,
                this::allocate);
    }

    @Override
    public void process(Record<byte[], StageTwo> record) {
        StageTwo message = record.value();
        switch (message.kind()) {
            case DEFINITION -> define(message.definition(), record.timestamp());
            case ENDED -> end(message.experimentId(), record.timestamp());
            case DELTA -> fold(record);
        }
    }

    private void define(ExperimentDefinition submitted, long timestamp) {
        String id = submitted.getExperimentId();
        ExperimentState current = experiments.get(id);
        ExperimentDefinition assigned = Definitions.assignVersion(current == null ? null : current.definition(),
                submitted);
        if (current != null && assigned == current.definition()) {
            return;
        }
        experiments.put(id, current == null ? ExperimentState.start(assigned) : current.withDefinition(assigned));
        emit(settings.acceptedDefinitionsTopic(), id, definitions.encode(assigned, settings.outputFormat()), timestamp);
        LOG.info("Experiment {} now at definition version {}", id, assigned.getVersion());
    }

    private void end(String id, long timestamp) {
        if (experiments.get(id) == null) {
            return;
        }
        experiments.delete(id);
        emit(settings.allocationsTopic(), id, null, timestamp);
        emit(settings.acceptedDefinitionsTopic(), id, null, timestamp);
        LOG.info("Experiment {} ended: state deleted, tombstones published", id);
    }

    private void fold(Record<byte[], StageTwo> record) {
        StageTwo delta = record.value();
        ExperimentState current = experiments.get(delta.experimentId());
        if (current == null) {
            rejectDelta(record, RejectReason.DELTA_UNKNOWN_EXPERIMENT.code(), "experimentId: no experiment "
                    + EventValidator.quote(delta.experimentId()) + " is held (ended or never defined)");
            return;
        }
        if (Stats.metric(delta.stats()) != current.metric()) {
            rejectDelta(record, RejectReason.DELTA_METRIC_MISMATCH.code(), "stats: " + Stats.metric(delta.stats())
                    + " statistics for an experiment whose metric is " + current.metric());
            return;
        }
        int index = current.definition().getArms().indexOf(delta.arm());
        if (index < 0) {
            rejectDelta(record, RejectReason.DELTA_UNKNOWN_ARM.code(), "arm: " + EventValidator.quote(delta.arm())
                    + " is not an arm of version " + current.definition().getVersion());
            return;
        }
        experiments.put(delta.experimentId(), current.withDelta(index, delta.stats(), context().currentSystemTimeMs()));
        counters.folded(delta.stats().trials());
    }

    /** The allocation pass. */
    private void allocate(long now) {
        long began = nanoTime.getAsLong();
        List<KeyValue<String, ExperimentState>> batch = new ArrayList<>();
        String next;
        try (KeyValueIterator<String, ExperimentState> it = experiments.range(resumeFrom, null)) {
            while (it.hasNext() && batch.size() < settings.allocateMaxVisits()) {
                batch.add(it.next());
            }
            next = it.hasNext() ? it.peekNextKey() : null;
        }
        int work = 0;
        for (KeyValue<String, ExperimentState> entry : batch) {
            Action action = action(entry.value, now);
            if (action == Action.NONE) {
                continue;
            }
            if (work >= settings.allocateMaxEvaluations()
                    || nanoTime.getAsLong() - began >= settings.allocateMaxTimeMs() * NANOS_PER_MILLI) {
                next = entry.key;
                break;
            }
            work++;
            run(entry.key, entry.value, action, now);
        }
        resumeFrom = next;
        counters.allocationPass(nanoTime.getAsLong() - began);
    }

    private Action action(ExperimentState state, long now) {
        long heartbeat = state.definition().getHeartbeatMs();
        if (state.stopped()) {
            return since(state.lastPublishedAt(), now) >= heartbeat ? Action.HEARTBEAT : Action.NONE;
        }
        boolean recompute = state.dirty()
                && since(state.lastComputedAt(), now) >= state.definition().getRecomputePeriodMs();
        return state.due() || recompute || since(state.lastPublishedAt(), now) >= heartbeat
                ? Action.EVALUATE : Action.NONE;
    }

    private static long since(long then, long now) {
        return then < 0 ? Long.MAX_VALUE : now - then;
    }

    private void run(String id, ExperimentState state, Action action, long now) {
        try {
            if (action == Action.HEARTBEAT) {
                Evaluator.Republished republished = evaluator.heartbeat(state, now);
                byte[] update = updates.encode(republished.update(), settings.outputFormat());
                experiments.put(id, republished.next());
                emit(settings.allocationsTopic(), id, update, now);
                return;
            }
            Evaluator.Result result = evaluator.evaluate(state, now);
            byte[] decision = decisions.encode(result.decision(), settings.outputFormat());
            byte[] update = updates.encode(result.update(), settings.outputFormat());
            experiments.put(id, result.next());
            emit(settings.decisionsTopic(), id, decision, now);
            emit(settings.allocationsTopic(), id, update, now);
            counters.decision();
        } catch (RuntimeException e) {
            LOG.warn("Evaluation of experiment {} (version {}) failed; retried after new data or the heartbeat", id,
                    state.definition().getVersion(), e);
            experiments.put(id, state.failed(now));
            ObjectNode body = JSON.createObjectNode().put("experimentId", id)
                    .put("definitionVersion", state.definition().getVersion()).put("error", String.valueOf(e));
            context().forward(rejections.emit(utf8(id), utf8(body.toString()), now,
                    RejectReason.EVALUATION_ERROR.code(), "evaluation: " + e, Source.NONE));
        }
    }

    private void rejectDelta(Record<byte[], StageTwo> record, String reason, String message) {
        StageTwo delta = record.value();
        ObjectNode body = JSON.createObjectNode().put("experimentId", delta.experimentId()).put("arm", delta.arm());
        ArmStats stats = delta.stats();
        if (stats instanceof BernoulliStats b) {
            body.put("trials", b.trials()).put("successes", b.successes());
        } else {
            ValueStats v = (ValueStats) stats;
            body.put("count", v.count()).put("mean", v.mean()).put("m2", v.m2());
        }
        context().forward(rejections.emit(record.key(), utf8(body.toString()), record.timestamp(), reason, message,
                Source.of(context().recordMetadata())));
    }

    private void emit(String topic, String id, byte[] value, long timestamp) {
        context().forward(new Record<>(utf8(id), new Emit(topic, value), timestamp));
    }

    private static byte[] utf8(String text) {
        return text.getBytes(StandardCharsets.UTF_8);
    }

    /** What the allocation pass does for one experiment. */
    private enum Action {
        NONE,
        EVALUATE,
        HEARTBEAT
    }
}
