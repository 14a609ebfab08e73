package dev.runoff.topology;

import dev.runoff.decision.ExperimentState;

import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.ObjectNode;
import dev.runoff.engine.stats.ArmStats;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.stats.ValueStats;
import dev.runoff.records.Definitions;
import dev.runoff.records.Format;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.RecordSigner;
import dev.runoff.records.avro.MetricKind;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.GuardrailSpec;
import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.util.function.LongSupplier;
import org.apache.kafka.streams.processor.PunctuationType;
import org.apache.kafka.streams.processor.api.ContextualProcessor;
import org.apache.kafka.streams.processor.api.ProcessorContext;
import org.apache.kafka.streams.processor.api.Record;
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
 *   <li>A definition that reuses the id of an ended experiment ({@code experiment-id-ended}) or changes the
 *       metric kind, the counting mode, a value-per-unit metric's cap or a guardrail's valueCap
 *       ({@code metric-change}) is refused: start a new experiment (or, for a guardrail, rename it).</li>
 *   <li>The end of an experiment deletes its state, remembers its id and publishes tombstones on the control
 *       and accepted topics.</li>
 *   <li>Statistics and pending-unit changes are merged into their arm; those for an unknown experiment or
 *       arm, of the other metric kind, or of units first exposed before the arm was last added, are kept out
 *       and sent to the rejected topic.</li>
 *   <li>A wall-clock punctuation runs the {@link AllocationPass} over the store.</li>
 * </ul>
 */
final class Fold extends ContextualProcessor<byte[], StageTwo, byte[], Emit> {

    private static final Logger LOG = LoggerFactory.getLogger(Fold.class);
    private static final ObjectMapper JSON = new ObjectMapper();

    private final String storeName;
    private final TopologySettings settings;
    private final Rejections rejections;
    private final JobCounters counters;
    private final LongSupplier nanoTime;
    private final RecordSigner signer;
    private final RecordCodec<ExperimentDefinition> definitions = RecordCodec.definitions();
    private KeyValueStore<String, ExperimentState> experiments;
    private KeyValueStore<String, Long> ended;

    Fold(String storeName, TopologySettings settings, Rejections rejections, JobCounters counters,
         LongSupplier nanoTime, RecordSigner signer) {
        this.signer = signer;
        this.storeName = storeName;
        this.settings = settings;
        this.rejections = rejections;
        this.counters = counters;
        this.nanoTime = nanoTime;
    }

    @Override
    public void init(ProcessorContext<byte[], Emit> context) {
        super.init(context);
        experiments = context.getStateStore(storeName);
        ended = context.getStateStore(RunoffTopology.ENDED_STORE);
        AllocationPass pass = new AllocationPass(settings, new StoredExperiments(experiments), new Forwarded(),
                counters, nanoTime, signer);
        context.schedule(Duration.ofMillis(settings.allocateIntervalMs()), PunctuationType.WALL_CLOCK_TIME,
                pass::run);
    }

    @Override
    public void process(Record<byte[], StageTwo> record) {
        StageTwo message = record.value();
        switch (message.kind()) {
            case DEFINITION -> define(record, message.definition(), record.timestamp());
            case ENDED -> end(message.experimentId(), record.timestamp());
            case DELTA -> fold(record);
        }
    }

    private void define(Record<byte[], StageTwo> record, ExperimentDefinition submitted, long timestamp) {
        String id = submitted.getExperimentId();
        ExperimentState current = experiments.get(id);
        String refusal = refusal(id, current, submitted);
        if (refusal != null) {
            RejectReason reason = current == null ? RejectReason.EXPERIMENT_ID_ENDED : RejectReason.METRIC_CHANGE;
            context().forward(rejections.emit(record.key(), definitions.encode(submitted, Format.JSON), timestamp,
                    reason.code(), refusal, Source.of(context().recordMetadata())));
            return;
        }
        ExperimentDefinition assigned = Definitions.assignVersion(current == null ? null : current.definition(),
                submitted);
        if (current != null && assigned == current.definition()) {
            return;
        }
        experiments.put(id, current == null ? ExperimentState.start(assigned) : current.withDefinition(assigned));
        emit(settings.acceptedDefinitionsTopic(), id, definitions.encode(assigned, settings.outputFormat()), timestamp);
        LOG.info("Experiment {} now at definition version {}", id, assigned.getVersion());
    }

    /**
     * Why {@code submitted} may not be accepted, or {@code null}: an ended id is never reused, and the metric
     * kind, the counting mode and the cap of per-unit values of an experiment never change (its counts would
     * mix two meanings).
     */
    private String refusal(String id, ExperimentState current, ExperimentDefinition submitted) {
        if (current == null) {
            Long endedAt = ended.get(id);
            return endedAt == null ? null : "experimentId: experiment " + EventValidator.quote(id) + " ended at "
                    + endedAt + " and its id is not reused; start a new experiment with a new id";
        }
        MetricKind kind = submitted.getMetric().getKind();
        if (kind != current.definition().getMetric().getKind()) {
            return "metric.kind: experiment " + EventValidator.quote(id) + " measures "
                    + current.definition().getMetric().getKind() + ", not " + kind
                    + "; the metric of an experiment never changes, start a new experiment with a new id";
        }
        if (Definitions.counting(submitted) != Definitions.counting(current.definition())) {
            return "counting: experiment " + EventValidator.quote(id) + " counts " + Definitions.counting(current.definition())
                    + ", not " + Definitions.counting(submitted)
                    + "; the counting of an experiment never changes, start a new experiment with a new id";
        }
        Double cap = submitted.getMetric().getValueCap();
        Double currentCap = current.definition().getMetric().getValueCap();
        if (!java.util.Objects.equals(cap, currentCap)) {
            return "metric.valueCap: experiment " + EventValidator.quote(id) + " caps per-unit sums at " + currentCap
                    + ", not " + cap + "; units already counted keep their cap, so it never changes, start a new"
                    + " experiment with a new id";
        }
        return guardrailCapRefusal(id, current.definition(), submitted);
    }

    /**
     * Why {@code submitted} may not change a guardrail's valueCap (a rate guardrail becoming a value guardrail
     * or the reverse included), or {@code null}: the guardrail's counts would mix two meanings.
     */
    private static String guardrailCapRefusal(String id, ExperimentDefinition current, ExperimentDefinition submitted) {
        java.util.Map<String, GuardrailSpec> before = new java.util.HashMap<>();
        Definitions.guardrails(current).forEach(g -> before.put(g.getName(), g));
        java.util.List<GuardrailSpec> after = Definitions.guardrails(submitted);
        for (int i = 0; i < after.size(); i++) {
            GuardrailSpec was = before.get(after.get(i).getName());
            if (was != null && !java.util.Objects.equals(was.getValueCap(), after.get(i).getValueCap())) {
                return "guardrails[" + i + "].valueCap: guardrail " + EventValidator.quote(was.getName())
                        + " of experiment " + EventValidator.quote(id) + " has valueCap " + was.getValueCap()
                        + ", not " + after.get(i).getValueCap() + "; units already counted keep their cap, so it"
                        + " never changes: give the guardrail a new name (it starts at zero) or start a new"
                        + " experiment";
            }
        }
        return null;
    }

    private void end(String id, long timestamp) {
        if (experiments.get(id) == null) {
            return;
        }
        experiments.delete(id);
        ended.put(id, timestamp);
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
        long since = current.armSince()[index];
        if (delta.version() < since) {
            rejectDelta(record, RejectReason.DELTA_STALE_ARM.code(), "version: units first exposed under version "
                    + delta.version() + ", but arm " + EventValidator.quote(delta.arm())
                    + " counts only units first exposed from version " + since + " (when it was last added)");
            return;
        }
        experiments.put(delta.experimentId(), current.withDelta(index, delta.stats(), delta.pending(),
                context().currentSystemTimeMs()).withGuardrailUnits(index, delta.stats().trials(), delta.signalUnits(),
                        delta.signalTotals()));
        counters.folded(delta.stats().trials());
    }

    private void rejectDelta(Record<byte[], StageTwo> record, String reason, String message) {
        context().forward(rejections.emit(record.key(), body(record.value()), record.timestamp(), reason, message,
                Source.of(context().recordMetadata())));
    }

    /** The rejected delta as JSON: experiment, arm and statistics. */
    private static byte[] body(StageTwo delta) {
        ObjectNode body = JSON.createObjectNode().put("experimentId", delta.experimentId()).put("arm", delta.arm())
                .put("version", delta.version()).put("pending", delta.pending());
        ArmStats stats = delta.stats();
        if (stats instanceof BernoulliStats b) {
            body.put("trials", b.trials()).put("successes", b.successes());
        } else {
            ValueStats v = (ValueStats) stats;
            body.put("count", v.count()).put("mean", v.mean()).put("m2", v.m2());
        }
        return utf8(body.toString());
    }

    private void emit(String topic, String id, byte[] value, long timestamp) {
        context().forward(new Record<>(utf8(id), new Emit(topic, value), timestamp));
    }

    private static byte[] utf8(String text) {
        return text.getBytes(StandardCharsets.UTF_8);
    }

    /** The allocation pass's records, forwarded by this processor. */
    private final class Forwarded implements AllocationPass.Output {

        @Override
        public void decision(String id, byte[] record, long timestamp) {
            emit(settings.decisionsTopic(), id, record, timestamp);
        }

        @Override
        public void control(String id, byte[] record, long timestamp) {
            emit(settings.allocationsTopic(), id, record, timestamp);
        }

        @Override
        public void rejected(String id, byte[] body, long timestamp, RejectReason reason, String message) {
            context().forward(rejections.emit(utf8(id), body, timestamp, reason.code(), message, Source.NONE));
        }
    }
}
