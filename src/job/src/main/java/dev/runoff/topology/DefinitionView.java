package dev.runoff.topology;

import dev.runoff.engine.core.Metric;
import dev.runoff.records.Definitions;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.ExperimentDefinition;
import java.util.Set;

/**
 * What event validation needs from an accepted definition.
 *
 * @param experimentId        the experiment
 * @param version             its version
 * @param arms                its arm names
 * @param metric              its metric kind
 * @param trialEvent          the event type that counts as a trial
 * @param outcomeEvent        the success event (Bernoulli) or the value event (value metric)
 * @param attributionWindowMs its conversion (attribution) window
 * @param unitLevel           whether it counts units (Bernoulli metric with {@code UNIT} counting, value per unit)
 * @param earlyGraceMs        how long an outcome that arrives before its unit's first trial event waits
 * @param signals             the signals its guardrails count
 * @param valueCap            value per unit: the cap of a unit's sum; NaN for every other metric
 * @param signalCaps          per signal that value guardrails count, their valueCap
 */
record DefinitionView(String experimentId, long version, Set<String> arms, Metric metric, EventType trialEvent,
                      EventType outcomeEvent, long attributionWindowMs, boolean unitLevel, long earlyGraceMs,
                      Set<String> signals, double valueCap, java.util.Map<String, Double> signalCaps) {

    /** Copies the caps. */
    DefinitionView {
        signalCaps = java.util.Map.copyOf(signalCaps);
    }

    static DefinitionView of(ExperimentDefinition def) {
        Metric metric = Definitions.metric(def);
        EventType outcome = metric == Metric.BERNOULLI ? def.getMetric().getSuccessEvent()
                : def.getMetric().getValueEvent();
        return new DefinitionView(def.getExperimentId(), def.getVersion(), Set.copyOf(def.getArms()), metric,
                def.getMetric().getTrialEvent(), outcome, def.getAttributionWindowMs(),
                Definitions.unitLevel(def), Definitions.earlyOutcomeGraceMs(def), Definitions.guardrails(def).stream()
                        .map(dev.runoff.records.avro.GuardrailSpec::getSignal).collect(java.util.stream.Collectors.toSet()),
                Definitions.valueCap(def), signalCaps(def));
    }

    private static java.util.Map<String, Double> signalCaps(ExperimentDefinition def) {
        java.util.Map<String, Double> caps = new java.util.HashMap<>();
        Definitions.guardrails(def).stream().filter(g -> g.getValueCap() != null)
                .forEach(g -> caps.putIfAbsent(g.getSignal(), g.getValueCap()));
        return caps;
    }

    /** The valueCap of the value guardrails that count {@code signal}, or NaN when none does. */
    double signalCap(String signal) {
        Double cap = signalCaps.get(signal);
        return cap == null ? Double.NaN : cap;
    }

    /** The role of an event of type {@code type}, or {@code null} when the metric does not use it. */
    UnitEvent.Role role(EventType type) {
        if (type == trialEvent) {
            return UnitEvent.Role.TRIAL;
        }
        if (type == outcomeEvent) {
            return metric == Metric.BERNOULLI ? UnitEvent.Role.SUCCESS : UnitEvent.Role.VALUE;
        }
        return null;
    }

    /** How the metric uses event types, for messages: {@code trial event EXPOSURE, success event CLICK}. */
    String describeEvents() {
        return "trial event " + trialEvent + ", " + (metric == Metric.BERNOULLI ? "success" : "value") + " event "
                + outcomeEvent;
    }
}
