package dev.runoff.topology;

import dev.runoff.records.Decoded;
import dev.runoff.records.Reason;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.OutcomeEvent;
import org.apache.kafka.common.header.internals.RecordHeaders;
import org.apache.kafka.streams.processor.api.ContextualProcessor;
import org.apache.kafka.streams.processor.api.ProcessorContext;
import org.apache.kafka.streams.processor.api.Record;

/**
 * Stage 1, step 1: decodes and checks each outcome event (records package rules, time rules at the
 * injected wall clock), then checks it against the accepted definition of its experiment: known and not
 * ended, a type the metric uses (or a signal one of its guardrails counts), a known arm, an arm on trial
 * events and a value on value events. Valid
 * events go on keyed by experiment and unit; the others to the rejected topic with their reason.
 */
final class EventValidator extends ContextualProcessor<byte[], byte[], byte[], Routed<UnitEvent>> {

    private static final int MAX_QUOTED = 64;

    private final RecordCodec<OutcomeEvent> codec = RecordCodec.outcomeEvents();
    private final String definitionsStore;
    private final Rejections rejections;
    private DefinitionLookup definitions;

    EventValidator(String definitionsStore, Rejections rejections) {
        this.definitionsStore = definitionsStore;
        this.rejections = rejections;
    }

    @Override
    public void init(ProcessorContext<byte[], Routed<UnitEvent>> context) {
        super.init(context);
        definitions = new DefinitionLookup(context.getStateStore(definitionsStore));
    }

    @Override
    public void process(Record<byte[], byte[]> record) {
        Source source = Source.of(context().recordMetadata());
        Decoded<OutcomeEvent> decoded = decode(record.value(), Math.max(0L, context().currentSystemTimeMs()));
        if (!decoded.isValid()) {
            reject(record, RejectReason.codeOf(decoded.reason()), Rejections.describe(decoded.problems()), source);
            return;
        }
        OutcomeEvent event = decoded.orThrow();
        DefinitionLookup.Lookup lookup = definitions.find(event.getExperimentId());
        if (lookup.status() != DefinitionLookup.Status.FOUND) {
            boolean ended = lookup.status() == DefinitionLookup.Status.ENDED;
            reject(record, ended ? RejectReason.EXPERIMENT_ENDED.code() : RejectReason.UNKNOWN_EXPERIMENT.code(),
                    "experimentId: experiment " + quote(event.getExperimentId())
                            + (ended ? " has ended (its definition was deleted)" : " has no accepted definition"),
                    source);
            return;
        }
        check(record, event, lookup.view(), source);
    }

    /**
     * Decodes and checks {@code bytes} as the records package does; an event in the plain JSON layout is read
     * by {@link OutcomeJson} and then checked by the same rules, anything else by the full decoder.
     */
    private Decoded<OutcomeEvent> decode(byte[] bytes, long now) {
        OutcomeEvent plain = OutcomeJson.read(bytes);
        return plain != null ? codec.validate(plain, now) : codec.decode(bytes, now);
    }

    private void check(Record<byte[], byte[]> record, OutcomeEvent event, DefinitionView view, Source source) {
        String signal = event.getSignal();
        UnitEvent.Role role = signal != null ? UnitEvent.Role.GUARDRAIL : view.role(event.getType());
        String arm = event.getArm();
        if (signal != null && !view.signals().contains(signal)) {
            reject(record, RejectReason.UNKNOWN_SIGNAL.code(), "signal: " + quote(signal) + " is not counted by any"
                    + " guardrail of experiment " + quote(view.experimentId()) + " (version " + view.version()
                    + " counts " + new java.util.TreeSet<>(view.signals()) + ")", source);
        } else if (role == null) {
            reject(record, RejectReason.EVENT_NOT_USED.code(), "type: " + event.getType()
                    + " is not used by the metric of experiment " + quote(view.experimentId()) + " ("
                    + view.describeEvents() + ")", source);
        } else if (arm != null && !view.arms().contains(arm)) {
            reject(record, RejectReason.UNKNOWN_ARM.code(), "arm: " + quote(arm) + " is not an arm of experiment "
                    + quote(view.experimentId()) + " (version " + view.version() + ")", source);
        } else if (role == UnitEvent.Role.TRIAL && arm == null) {
            reject(record, RejectReason.MISSING_ARM.code(), "arm: missing (the trial event " + event.getType()
                    + " must name its arm)", source);
        } else if (role == UnitEvent.Role.VALUE && event.getValue() == null) {
            reject(record, RejectReason.MISSING_VALUE.code(), "value: missing (the value event " + event.getType()
                    + " of experiment " + quote(view.experimentId()) + " must carry a value)", source);
        } else if (signal != null && !Double.isNaN(view.signalCap(signal)) && event.getValue() == null) {
            reject(record, RejectReason.MISSING_VALUE.code(), "value: missing (signal " + quote(signal)
                    + " feeds a value guardrail of experiment " + quote(view.experimentId()) + ")", source);
        } else {
            UnitEvent valid = new UnitEvent(event.getExperimentId(), event.getUnitId(), event.getEventId(), role,
                    view.metric(), arm, event.getValue() == null ? Double.NaN : event.getValue(),
                    event.getTimestamp(), view.attributionWindowMs(), view.version(), view.unitLevel(),
                    view.earlyGraceMs(), source, record.key(), record.value(), signal,
                    signal != null ? view.signalCap(signal) : view.valueCap());
            context().forward(new Record<>(valid.unitKeyBytes(), Routed.pass(valid), record.timestamp(),
                    new RecordHeaders()));
        }
    }

    private void reject(Record<byte[], byte[]> record, String reason, String message, Source source) {
        context().forward(rejections.routed(record.key(), record.value(), record.timestamp(), reason, message, source));
    }

    /**
     * {@code text} in single quotes for a message: cut to 64 chars, control characters escaped, so that a
     * hostile key cannot flood or forge a header or a log line.
     */
    static String quote(String text) {
        StringBuilder out = new StringBuilder("'");
        for (int i = 0; i < Math.min(text.length(), MAX_QUOTED); i++) {
            char c = text.charAt(i);
            out.append(Character.isISOControl(c) ? String.format("\\u%04x", (int) c) : String.valueOf(c));
        }
        return out.append(text.length() > MAX_QUOTED ? "...'" : "'").toString();
    }
}
