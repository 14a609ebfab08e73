package dev.runoff.decision;

import dev.runoff.records.Definitions;
import dev.runoff.engine.Evaluation;
import dev.runoff.engine.best.ProbabilityBest;
import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.posterior.StudentTPosterior;
import dev.runoff.engine.stats.ArmStats;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.stats.ValueStats;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.BetaParams;
import dev.runoff.records.avro.StudentTParams;
import java.util.ArrayList;
import java.util.List;

/** The per-arm part of a decision record: statistics, posterior, alpha, weights and guardrails. */
final class ArmStates {

    private ArmStates() {
    }

    static List<ArmState> of(ExperimentState state, Evaluation evaluation, ProbabilityBest best, double[] weights,
                             GuardrailFindings findings) {
        List<String> names = state.definition().getArms();
        double[] ruleWeights = evaluation.ruleWeights();
        List<ArmState> out = new ArrayList<>(names.size());
        for (int i = 0; i < names.size(); i++) {
            ArmState.Builder arm = ArmState.newBuilder()
                    .setArm(names.get(i))
                    .setPosterior(posterior(evaluation.posteriors().get(i).posterior()))
                    .setAlpha(best.alpha(i))
                    .setAlphaStandardError(best.standardError(i))
                    .setWeightBeforeGuards(ruleWeights[i])
                    .setWeight(weights[i]);
            statistics(arm, state.stats().get(i));
            if (reportsPending(state)) {
                arm.setPending(state.pending()[i]);
            }
            if (!Definitions.guardrails(state.definition()).isEmpty()) {
                arm.setGuardrails(findings.states().get(i)).setSuspendedBy(findings.suspended().get(i));
            }
            out.add(arm.build());
        }
        return out;
    }

    /**
     * Pending units are reported when trials are units counted at window close (Bernoulli metrics with unit
     * counting, value per unit), when the state knows them.
     */
    private static boolean reportsPending(ExperimentState state) {
        return state.pending() != null && Definitions.unitLevel(state.definition());
    }

    private static void statistics(ArmState.Builder arm, ArmStats stats) {
        arm.setTrials(stats.trials());
        if (stats instanceof BernoulliStats b) {
            arm.setSuccesses(b.successes());
        } else {
            ValueStats v = (ValueStats) stats;
            arm.setMean(v.mean()).setM2(v.m2());
        }
    }

    private static Object posterior(Posterior posterior) {
        if (posterior instanceof BetaPosterior b) {
            return new BetaParams(b.a(), b.b());
        }
        StudentTPosterior t = (StudentTPosterior) posterior;
        return new StudentTParams(t.location(), t.scale(), t.dof());
    }
}
