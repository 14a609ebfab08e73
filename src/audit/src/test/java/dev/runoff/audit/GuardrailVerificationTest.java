package dev.runoff.audit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.decision.Evidence;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.GuardrailDirection;
import dev.runoff.records.avro.GuardrailSpec;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/** `audit verify` recomputes guardrail tests and suspensions like any other part of a decision. */
class GuardrailVerificationTest {

    private static final List<String> ARMS = List.of("classic", "wide", "compact");

    /** Ten periods of 400 units per arm; wide has 8% failed payments, the others 2%. */
    static List<DecisionRecord> chain() {
        return GuardrailChains.tenPeriods("ferry-layout", ARMS, new GuardrailSpec("failed-payments",
                "payment-failed", GuardrailDirection.HIGHER_IS_WORSE, 0.2, 0.05, null), (state, i, now) -> state
                .withDelta(i, new BernoulliStats(400, 40 + i), now)
                .withGuardrailUnits(i, 400, Map.of("payment-failed", i == 1 ? 32L : 8L)));
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
        List<DecisionRecord> records = chain();
        List<DecisionRecord> forged = GuardrailChains.withLastGuardrail(records, 1,
                count -> count.setHits(count.getHits() / 4));
        Finding first = GuardrailChains.firstFailure("ferry-layout", forged);
        assertEquals(records.get(records.size() - 1).getSequence(), first.sequence());
        assertEquals(Check.RECOMPUTATION, first.check());
        // the first field that differs: the suspension lifted, the weights move
        assertTrue(first.field().startsWith("arms["), first.toString());
    }
}
