package dev.runoff.audit;

import dev.runoff.decision.Evaluator;
import dev.runoff.decision.ExperimentState;
import dev.runoff.records.HashChain;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.GuardrailSpec;
import dev.runoff.records.avro.GuardrailState;
import java.util.ArrayList;
import java.util.List;
import java.util.function.UnaryOperator;

/**
 * Decision chains of a three-arm experiment with one guardrail, made by the job's own {@link Evaluator}, and
 * forgeries of them: the guardrail tests' shared fixture.
 */
final class GuardrailChains {

    /** What one period adds to one arm's state. */
    @FunctionalInterface
    interface Period {
        ExperimentState add(ExperimentState state, int arm, long now);
    }

    private GuardrailChains() {
    }

    /**
     * The records of an experiment whose first arm is its control and which has {@code guardrail}: the first
     * evaluation, then up to ten periods of {@code period} on every arm, each period evaluated.
     */
    static List<DecisionRecord> tenPeriods(String experiment, List<String> arms, GuardrailSpec guardrail,
                                           Period period) {
        ExperimentDefinition def = SimulatedJob.definition(experiment, arms, 0);
        def.setControlArm(arms.get(0));
        def.setGuardrails(List.of(guardrail));
        Evaluator evaluator = new Evaluator(2_000);
        long now = Chains.T0;
        Evaluator.Result result = evaluator.evaluate(ExperimentState.start(def), now);
        List<DecisionRecord> records = new ArrayList<>(List.of(result.decision()));
        for (int round = 0; round < 10 && !result.next().stopped(); round++) {
            ExperimentState state = result.next();
            for (int i = 0; i < arms.size(); i++) {
                state = period.add(state, i, now);
            }
            now += SimulatedJob.PERIOD_MS;
            result = evaluator.evaluate(state, now);
            records.add(result.decision());
        }
        return records;
    }

    /**
     * {@code records} with the first guardrail of arm {@code arm} in the last record changed by {@code change},
     * the chain sealed again over the change (a forger's rebuilt chain).
     */
    static List<DecisionRecord> withLastGuardrail(List<DecisionRecord> records, int arm,
                                                  UnaryOperator<GuardrailState.Builder> change) {
        List<DecisionRecord> changed = new ArrayList<>(records);
        int k = changed.size() - 1;
        DecisionRecord last = changed.get(k);
        List<ArmState> arms = new ArrayList<>(last.getArms());
        ArmState state = arms.get(arm);
        GuardrailState guardrail = state.getGuardrails().get(0);
        arms.set(arm, ArmState.newBuilder(state).setGuardrails(List.of(change.apply(GuardrailState.newBuilder(
                guardrail)).build())).build());
        changed.set(k, DecisionRecord.newBuilder(last).setArms(arms).build());
        return HashChain.chain(changed);
    }

    /** The first failure `audit verify` finds in {@code records} of {@code experiment}. */
    static Finding firstFailure(String experiment, List<DecisionRecord> records) {
        return new Verifier(0.001).verifyExperiment(experiment, Chains.entries(records)).firstFailure()
                .orElseThrow();
    }
}
