package dev.runoff.records;

import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.GuardrailDirection;
import dev.runoff.records.avro.GuardrailOutcome;
import dev.runoff.records.avro.GuardrailSpec;
import dev.runoff.records.avro.GuardrailState;
import dev.runoff.records.avro.MetricKind;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;

/** Value guardrails (a guardrail with a valueCap): their definitions and their decision-record entries. */
class ValueGuardrailValidationTest {

    private static final RecordCodec<DecisionRecord> DECISIONS = RecordCodec.decisionRecords();

    private static GuardrailSpec refunds(Double cap) {
        return new GuardrailSpec("refunds", "refund-issued", GuardrailDirection.HIGHER_IS_WORSE, 0.1, 0.05, cap);
    }

    @Test
    void aValueGuardrailOnABernoulliOrAValuePerUnitMetricIsValid() {
        for (ExperimentDefinition def : List.of(Samples.bernoulli(), Samples.valuePerUnit())) {
            def.setGuardrails(List.of(refunds(150.0), new GuardrailSpec("errors", "payment-failed",
                    GuardrailDirection.HIGHER_IS_WORSE, 0.2, 0.05, null)));
            assertTrue(Definitions.validate(def, Samples.NOW).isValid(),
                    Definitions.validate(def, Samples.NOW).problems().toString());
        }
    }

    @Test
    void aValueCapThatIsNotAPositiveNumberIsRejectedNamingTheField() {
        for (double cap : new double[] {0.0, -5.0}) {
            ExperimentDefinition def = Samples.bernoulli();
            def.setGuardrails(List.of(refunds(cap)));
            Rejections.assertFirstProblem(Definitions.validate(def, Samples.NOW), "guardrails[0].valueCap",
                    Reason.OUT_OF_RANGE, "must be a finite number > 0, got " + cap);
        }
    }

    @Test
    void twoValueGuardrailsOfOneSignalWithDifferentCapsAreRejected() {
        ExperimentDefinition def = Samples.bernoulli();
        GuardrailSpec second = refunds(300.0);
        second.setName("refunds-strict");
        def.setGuardrails(List.of(refunds(150.0), second));
        Rejections.assertFirstProblem(Definitions.validate(def, Samples.NOW), "guardrails[1].valueCap",
                Reason.INCONSISTENT, "must equal 150.0, the valueCap of an earlier guardrail counting signal"
                        + " 'refund-issued', got 300.0");
    }

    @Test
    void guardrailsOnAValueMetricCountedPerEventAreRejected() {
        ExperimentDefinition def = Samples.valueMetric();
        assertTrue(def.getMetric().getKind() == MetricKind.VALUE);
        def.setGuardrails(List.of(refunds(150.0)));
        Rejections.assertFirstProblem(Definitions.validate(def, Samples.NOW), "guardrails", Reason.INCONSISTENT,
                "need metric.kind BERNOULLI with counting UNIT, or VALUE_PER_UNIT");
    }

    /** A decision for a definition with one value guardrail, every arm's entry as the job writes it. */
    private static DecisionRecord decision(Double total) {
        DecisionRecord d = Samples.decisionUnsealed();
        ExperimentDefinition def = ExperimentDefinition.newBuilder(d.getDefinition()).build();
        def.setGuardrails(List.of(refunds(150.0)));
        d.setDefinition(def);
        List<ArmState> arms = new ArrayList<>();
        for (ArmState arm : d.getArms()) {
            GuardrailState entry = GuardrailState.newBuilder().setGuardrail("refunds").setCounted(1_000).setHits(80)
                    .setTotal(total).setLower(0.01).setUpper(0.05).setOutcome(arms.isEmpty()
                            ? GuardrailOutcome.REFERENCE : GuardrailOutcome.OPEN).build();
            arms.add(ArmState.newBuilder(arm).setGuardrails(List.of(entry)).build());
        }
        d.setArms(arms);
        return d;
    }

    @Test
    void aValueGuardrailEntryWithItsTotalIsValid() {
        DecisionRecord sealed = HashChain.seal(decision(31.5), HashChain.GENESIS);
        assertTrue(DECISIONS.validate(sealed, Samples.NOW).isValid(),
                DECISIONS.validate(sealed, Samples.NOW).problems().toString());
    }

    @Test
    void aValueGuardrailEntryWithoutItsTotalOrWithATotalAboveItsUnitsIsRejectedNamingTheField() {
        Rejections.assertFirstProblem(DECISIONS.validate(decision(null), Samples.NOW), "arms[0].guardrails[0].total",
                Reason.MISSING, "missing");
        Rejections.assertFirstProblem(DECISIONS.validate(decision(1_000.5), Samples.NOW),
                "arms[0].guardrails[0].total", Reason.OUT_OF_RANGE, "must be in [0, counted=1000], got 1000.5");
    }

    @Test
    void aRateGuardrailEntryWithATotalIsRejected() {
        DecisionRecord d = decision(31.5);
        d.getDefinition().getGuardrails().get(0).setValueCap(null);
        Rejections.assertFirstProblem(DECISIONS.validate(d, Samples.NOW), "arms[0].guardrails[0].total",
                Reason.INCONSISTENT, "only set for a guardrail with a valueCap, got 31.5");
    }
}
