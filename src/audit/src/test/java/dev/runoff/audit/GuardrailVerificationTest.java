package dev.runoff.audit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.decision.Evaluator;
import dev.runoff.decision.Evidence;
import dev.runoff.decision.ExperimentState;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.records.HashChain;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.GuardrailDirection;
import dev.runoff.records.avro.GuardrailSpec;
import dev.runoff.records.avro.GuardrailState;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/** `audit verify` recomputes guardrail tests and suspensions like any other part of a decision. */
class GuardrailVerificationTest {

    private static final List<String> ARMS = List.of("classic", "wide", "compact");

    /** Ten periods of 400 units per arm; wide has 8% failed payments, the others 2%. */
    static List<DecisionRecord> chain() {
        ExperimentDefinition def = SimulatedJob.definition("ferry-layout", ARMS, 0);
        def.setControlArm("classic");
        def.setGuardrails(List.of(new GuardrailSpec("failed-payments", "payment-failed",
                GuardrailDirection.HIGHER_IS_WORSE, 0.2, 0.05, null)));
        Evaluator evaluator = new Evaluator(2_000);
        long now = Chains.T0;
        Evaluator.Result result = evaluator.evaluate(ExperimentState.start(def), now);
        List<DecisionRecord> records = new ArrayList<>(List.of(result.decision()));
        for (int round = 0; round < 10 && !result.next().stopped(); round++) {
            ExperimentState state = result.next();
            for (int i = 0; i < ARMS.size(); i++) {
                long failed = i == 1 ? 32 : 8;
                state = state.withDelta(i, new BernoulliStats(400, 40 + i), now)
                        .withGuardrailUnits(i, 400, Map.of("payment-failed", failed));
            }
            now += SimulatedJob.PERIOD_MS;
            result = evaluator.evaluate(state, now);
            records.add(result.decision());
        }
        return records;
    }

    @Test
    void aChainWithASuspensionVerifiesAndEveryRecordIsReproduced() {
        List<DecisionRecord> records = chain();
        assertTrue(records.stream().anyMatch(r -> "failed-payments".equals(r.getArms().get(1).getSuspendedBy())),
                "wide is suspended at some decision");
        ExperimentAudit audit = new Verifier(0.001).verifyExperiment("ferry-layout", Chains.entries(records));
        assertEquals(List.of(), audit.findings());
        assertEquals(records.size(), audit.reproduced());
    }

    @Test
    void theCrossCheckIntegratesOverTheArmsTheJobKeptWhenOneIsSuspended() {
        // A suspended arm is left out of the job's P(best) (alpha 0, the others' alphas among the kept arms);
        // the exact cross-check must compare like with like, or every record after a suspension is a finding.
        List<DecisionRecord> records = chain();
        ExperimentAudit audit = new Verifier(0.001).withCrossCheck(5).verifyExperiment("ferry-layout",
                Chains.entries(records));
        assertEquals(List.of(), audit.findings());
        DecisionRecord suspended = records.stream().filter(r -> r.getArms().get(1).getSuspendedBy() != null)
                .findFirst().orElseThrow();
        assertEquals(0.0, CrossCheck.exact(suspended.getArms()).alpha(1), "a suspended arm's exact alpha");
        assertEquals(1.0, CrossCheck.exact(suspended.getArms()).alpha(0) + CrossCheck.exact(suspended.getArms())
                .alpha(2), 1e-12, "the kept arms' exact alphas sum to 1 among themselves");
        Evidence.Row last = EvidenceView.of(records).last();
        assertFalse(last.points().containsKey("wide"), "a suspended arm is no losing arm of the evidence view");
    }

    @Test
    void aChangedGuardrailCountWithARebuiltChainFailsRecomputation() {
        List<DecisionRecord> records = new ArrayList<>(chain());
        int k = records.size() - 1;
        DecisionRecord last = records.get(k);
        List<ArmState> arms = new ArrayList<>(last.getArms());
        ArmState wide = arms.get(1);
        GuardrailState count = wide.getGuardrails().get(0);
        arms.set(1, ArmState.newBuilder(wide).setGuardrails(List.of(GuardrailState.newBuilder(count)
                .setHits(count.getHits() / 4).build())).build());
        records.set(k, DecisionRecord.newBuilder(last).setArms(arms).build());
        List<DecisionRecord> forged = HashChain.chain(records);
        Finding first = new Verifier(0.001).verifyExperiment("ferry-layout", Chains.entries(forged)).firstFailure()
                .orElseThrow();
        assertEquals(last.getSequence(), first.sequence());
        assertEquals(Check.RECOMPUTATION, first.check());
        // the first field that differs: the suspension lifted, the weights move
        assertTrue(first.field().startsWith("arms["), first.toString());
    }
}
