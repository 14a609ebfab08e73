package dev.runoff.decision;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.guardrail.RateSequence;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.GuardrailDirection;
import dev.runoff.records.avro.GuardrailOutcome;
import dev.runoff.records.avro.GuardrailSpec;
import dev.runoff.records.avro.GuardrailState;
import dev.runoff.testkit.TestDefinitions;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/** Guardrails in the evaluation: suspension, the held-back STOP, the budget stop, and their replay. */
class GuardrailEvaluationTest {

    private static final long NOW = 1_700_000_000_000L;
    private static final String SIGNAL = "payment-failed";

    private static ExperimentDefinition definition(Long budget) {
        ExperimentDefinition def = TestDefinitions.bernoulli("ferry-layout", "classic", "wide", "compact");
        def.setVersion(1);
        def.setControlArm("classic");
        def.setGuardrails(List.of(new GuardrailSpec("failed-payments", SIGNAL,
                GuardrailDirection.HIGHER_IS_WORSE, 0.1, 0.05, null)));
        def.getStopping().setBudgetTrials(budget);
        return def;
    }

    /** Per arm: trials, successes, guardrail hits among the trials (every trial a counted unit). */
    private static ExperimentState state(ExperimentDefinition def, long[][] arms) {
        ExperimentState state = ExperimentState.start(def);
        for (int i = 0; i < arms.length; i++) {
            state = state.withDelta(i, new BernoulliStats(arms[i][0], arms[i][1]), NOW - 1)
                    .withGuardrailUnits(i, arms[i][0], Map.of(SIGNAL, arms[i][2]));
        }
        return state;
    }

    private static DecisionRecord evaluate(ExperimentState state) {
        DecisionRecord record = new Evaluator(10_000).evaluate(state, NOW).decision();
        Replay.assertReplays(record, null);
        return record;
    }

    @Test
    void anArmThatFailsItsGuardrailGetsWeightZeroAndTheRecordSaysWhy() {
        DecisionRecord record = evaluate(state(definition(null), new long[][] {
            {5_000, 500, 100}, {5_000, 520, 400}, {5_000, 480, 100}}));
        ArmState wide = record.getArms().get(1);
        assertEquals(0.0, wide.getWeight());
        assertEquals("failed-payments", wide.getSuspendedBy());
        GuardrailState check = wide.getGuardrails().get(0);
        assertEquals(GuardrailOutcome.FAIL, check.getOutcome());
        // the FAIL rule: the arm's lower bound against the control's upper bound times (1 + margin), each
        // sequence at alpha / 2
        assertEquals(RateSequence.bounds(5_000, 400, 0.025).lower(), check.getStatistic());
        assertEquals(RateSequence.bounds(5_000, 100, 0.025).upper() * 1.1, check.getThreshold(), 1e-15);
        double sum = record.getArms().stream().mapToDouble(ArmState::getWeight).sum();
        assertEquals(1.0, sum, 1e-12);
        assertEquals(GuardrailOutcome.REFERENCE, record.getArms().get(0).getGuardrails().get(0).getOutcome());
    }

    @Test
    void theControlIsNeverSuspendedEvenWhenItIsTheWorstArm() {
        DecisionRecord record = evaluate(state(definition(null), new long[][] {
            {5_000, 500, 400}, {5_000, 520, 100}, {5_000, 480, 100}}));
        assertTrue(record.getArms().stream().allMatch(a -> a.getSuspendedBy() == null));
        assertTrue(record.getArms().get(0).getWeight() > 0);
    }

    @Test
    void aStopIsHeldBackWhileTheWinnersGuardrailIsOpen() {
        DecisionRecord record = evaluate(state(definition(null), new long[][] {
            {5_000, 500, 100}, {5_000, 700, 110}, {5_000, 500, 100}}));
        assertEquals("CONTINUE", record.getDecision().name());
        assertEquals(DecisionReasons.GUARDRAIL_OPEN, record.getReason());
        assertNull(record.getWinner());
    }

    @Test
    void aSuspendedArmIsLeftOutOfTheWeightsAndTheStoppingRule() {
        DecisionRecord record = evaluate(state(definition(null), new long[][] {
            {5_000, 500, 100}, {5_000, 700, 400}, {5_000, 500, 100}}));
        assertEquals("CONTINUE", record.getDecision().name());
        assertEquals(DecisionReasons.BELOW_THRESHOLD, record.getReason(), "classic and compact are alike");
        ArmState wide = record.getArms().get(1);
        assertEquals(List.of(0.0, 0.0, 0.0), List.of(wide.getAlpha(), wide.getWeightBeforeGuards(), wide.getWeight()));
        assertEquals(1.0, record.getArms().get(0).getAlpha() + record.getArms().get(2).getAlpha(), 1e-9);
    }

    @Test
    void aSuspendedLeaderWithOnlyTheControlBesideItIsNeverNamedWinner() {
        ExperimentDefinition def = definition(null);
        def.setArms(List.of("classic", "wide"));
        DecisionRecord record = evaluate(state(def, new long[][] {{5_000, 500, 100}, {5_000, 700, 400}}));
        assertEquals("CONTINUE", record.getDecision().name());
        assertEquals(DecisionReasons.GUARDRAIL_FAILED, record.getReason());
        assertEquals(1.0, record.getArms().get(0).getWeight());
    }

    @Test
    void aWinnerThatPassedItsGuardrailStops() {
        DecisionRecord record = evaluate(state(definition(null), new long[][] {
            {5_000, 500, 100}, {5_000, 700, 20}, {5_000, 500, 100}}));
        assertEquals(GuardrailOutcome.PASS, record.getArms().get(1).getGuardrails().get(0).getOutcome());
        assertEquals("STOP", record.getDecision().name());
        assertEquals("wide", record.getWinner());
    }

    @Test
    void atTheBudgetAWinnerWhoseGuardrailHasNotPassedGivesWayToTheControl() {
        DecisionRecord record = evaluate(state(definition(15_000L), new long[][] {
            {5_000, 500, 100}, {5_000, 700, 110}, {5_000, 500, 100}}));
        assertEquals("STOP", record.getDecision().name());
        assertEquals(DecisionReasons.BUDGET, record.getReason());
        assertEquals("classic", record.getWinner());
    }

    @Test
    void withoutGuardrailsTheRecordHoldsNoGuardrailFields() {
        ExperimentDefinition def = definition(null);
        def.setGuardrails(null);
        DecisionRecord record = evaluate(state(def, new long[][] {{500, 50, 0}, {500, 52, 0}, {500, 48, 0}}));
        assertTrue(record.getArms().stream().allMatch(a -> a.getGuardrails() == null && a.getSuspendedBy() == null));
    }
}
