package dev.runoff.records;

import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.OutcomeEvent;

/** Rules of {@link OutcomeEvent}: ids, arm and value by event type, guardrail signal, timestamp range. */
final class OutcomeEventRules implements RecordRules<OutcomeEvent> {

    @Override
    public void check(OutcomeEvent event, Limits limits, Problems problems) {
        problems.notBlank("experimentId", event.getExperimentId());
        problems.notBlank("unitId", event.getUnitId());
        problems.notBlank("eventId", event.getEventId());
        problems.notBlank("arm", event.getArm());
        problems.atLeast("timestamp", event.getTimestamp(), 0);
        EventType type = event.getType();
        if (type == EventType.EXPOSURE && event.getArm() == null) {
            problems.add("arm", Reason.MISSING, "missing (an EXPOSURE must name its arm)");
        }
        checkValue(event.getValue(), type, limits, problems);
        GuardrailRules.checkSignal(event.getSignal(), type == EventType.EXPOSURE, problems);
    }

    private static void checkValue(Double value, EventType type, Limits limits, Problems problems) {
        if (value == null) {
            if (type == EventType.VALUE) {
                problems.add("value", Reason.MISSING, "missing (a VALUE event must carry a value)");
            }
            return;
        }
        if (type == EventType.EXPOSURE || type == EventType.CLICK) {
            problems.add("value", Reason.INCONSISTENT, "must be null for " + type + " events, got " + value);
        } else if (Double.isFinite(value) && Math.abs(value) > limits.maxAbsValue()) {
            problems.add("value", Reason.OUT_OF_RANGE,
                    value + " exceeds the magnitude limit " + limits.maxAbsValue());
        }
    }

    @Override
    public void checkAt(OutcomeEvent event, long nowMillis, Limits limits, Problems problems) {
        long timestamp = event.getTimestamp();
        if (timestamp > nowMillis && timestamp - nowMillis > limits.maxFutureSkewMs()) {
            problems.add("timestamp", Reason.BAD_TIME, timestamp + " is more than " + limits.maxFutureSkewMs()
                    + " ms after the current time " + nowMillis);
        }
    }
}
