package dev.runoff.audit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.guardrail.MarginCheck;
import dev.runoff.engine.guardrail.Direction;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.GuardrailDirection;
import dev.runoff.records.avro.GuardrailSpec;
import dev.runoff.records.avro.GuardrailState;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/** `audit verify` recomputes value-guardrail tests and suspensions from the totals each record holds. */
class ValueGuardrailVerificationTest {

    private static final List<String> ARMS = List.of("classic", "wide", "compact");
    private static final String SIGNAL = "refund-issued";

    /**
     * Ten periods of 400 units per arm; a value guardrail on refunds capped at 200 per unit: wide's units
     * refund 30% of the cap on average, the others 10%.
     */
    static List<DecisionRecord> chain() {
        return GuardrailChains.tenPeriods("ferry-refunds", ARMS, new GuardrailSpec("refunds", SIGNAL,
                GuardrailDirection.HIGHER_IS_WORSE, 0.2, 0.05, 200.0), (state, i, now) -> state
                .withDelta(i, new BernoulliStats(400, 40 + i), now)
                .withGuardrailUnits(i, 400, Map.of(SIGNAL, 150L), Map.of(SIGNAL, i == 1 ? 120.25 : 40.5)));
    }

    @Test
    void aValueGuardrailSuspensionVerifiesAndTheRecordGivesTotalStatisticAndThreshold() {
        List<DecisionRecord> records = chain();
        DecisionRecord suspended = records.stream().filter(r -> "refunds".equals(r.getArms().get(1).getSuspendedBy()))
                .findFirst().orElseThrow();
        GuardrailState wide = suspended.getArms().get(1).getGuardrails().get(0);
        GuardrailState classic = suspended.getArms().get(0).getGuardrails().get(0);
        assertNotNull(wide.getTotal());
        assertEquals(wide.getCounted() * 120.25 / 400, wide.getTotal(), 1e-9);
        // the same comparison, made directly on the engine's test of means in [0, 1]
        MarginCheck.Result direct = MarginCheck.check(new MarginCheck.Totals(wide.getCounted(), wide.getTotal()),
                new MarginCheck.Totals(classic.getCounted(), classic.getTotal()), Direction.HIGHER_IS_WORSE, 0.2,
                0.05);
        assertEquals(MarginCheck.Outcome.FAIL, direct.outcome());
        assertEquals(direct.statistic(), wide.getStatistic());
        assertEquals(direct.threshold(), wide.getThreshold());
        assertNull(suspended.getArms().get(2).getSuspendedBy(), "compact matches the control");
        ExperimentAudit audit = new Verifier(0.001).verifyExperiment("ferry-refunds", Chains.entries(records));
        assertEquals(List.of(), audit.findings());
        assertEquals(records.size(), audit.reproduced());
    }

    @Test
    void aChangedValueTotalWithARebuiltChainFailsRecomputation() {
        List<DecisionRecord> records = chain();
        List<DecisionRecord> forged = GuardrailChains.withLastGuardrail(records, 1,
                count -> count.setTotal(count.getTotal() / 3));
        Finding first = GuardrailChains.firstFailure("ferry-refunds", forged);
        assertEquals(records.get(records.size() - 1).getSequence(), first.sequence());
        assertEquals(Check.RECOMPUTATION, first.check());
        assertTrue(first.field().startsWith("arms["), first.toString());
    }
}
