package dev.runoff.topology;

import dev.runoff.records.Decoded;
import dev.runoff.records.Reason;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.ExperimentDefinition;
import java.nio.charset.StandardCharsets;
import org.apache.kafka.common.header.internals.RecordHeaders;
import org.apache.kafka.streams.processor.api.ContextualProcessor;
import org.apache.kafka.streams.processor.api.Record;

/**
 * Checks each record of the definitions topic. A tombstone (null value) keyed by an experiment id ends that
 * experiment. A value must be a valid definition (records package rules, the deadline judged at the
 * record's timestamp, i.e. when it was submitted, so a replay judges it the same way) whose experimentId
 * equals the record key. Valid definitions and ends go on keyed by experiment id; the rest to the rejected
 * topic with reasons naming the fields.
 */
final class DefinitionValidator extends ContextualProcessor<byte[], byte[], byte[], Routed<StageTwo>> {

    private final RecordCodec<ExperimentDefinition> codec = RecordCodec.definitions();
    private final Rejections rejections;

    DefinitionValidator(Rejections rejections) {
        this.rejections = rejections;
    }

    @Override
    public void process(Record<byte[], byte[]> record) {
        Source source = Source.of(context().recordMetadata());
        String key = record.key() == null ? null : new String(record.key(), StandardCharsets.UTF_8);
        if (record.value() == null) {
            if (key == null || key.isBlank()) {
                reject(record, RejectReason.codeOf(Reason.MISSING),
                        "key: a tombstone must be keyed by the experiment id", source);
            } else {
                pass(record, StageTwo.ended(key));
            }
            return;
        }
        Decoded<ExperimentDefinition> decoded = codec.decode(record.value(), Math.max(0L, record.timestamp()));
        if (!decoded.isValid()) {
            reject(record, RejectReason.codeOf(decoded.reason()), Rejections.describe(decoded.problems()), source);
            return;
        }
        ExperimentDefinition definition = decoded.orThrow();
        if (!definition.getExperimentId().equals(key)) {
            String shown = key == null ? "missing" : EventValidator.quote(key);
            reject(record, RejectReason.KEY_MISMATCH.code(), "key: " + shown + " differs from experimentId "
                    + EventValidator.quote(definition.getExperimentId()), source);
            return;
        }
        pass(record, StageTwo.definition(definition));
    }

    private void pass(Record<byte[], byte[]> record, StageTwo value) {
        context().forward(new Record<>(value.experimentId().getBytes(StandardCharsets.UTF_8), Routed.pass(value),
                record.timestamp(), new RecordHeaders()));
    }

    private void reject(Record<byte[], byte[]> record, String reason, String message, Source source) {
        context().forward(rejections.routed(record.key(), record.value(), record.timestamp(), reason, message, source));
    }
}
