package dev.runoff.decision;

import dev.runoff.engine.AllocationEngine;
import dev.runoff.engine.EngineConfig;
import dev.runoff.engine.Evaluation;
import dev.runoff.engine.best.ProbabilityBest;
import dev.runoff.engine.core.Arm;
import java.util.List;

/**
 * The evaluation with suspended arms left out: once a guardrail suspends an arm, the engine's weights and the
 * stopping rule see only the other arms (at least two), evaluated again with the same seed and the previous
 * weights of those arms rescaled to sum to 1. Otherwise a suspended challenger would keep its top-two share
 * (handed to the others only by rescaling) and, its counts frozen, hold the stopping statistic of the leader
 * below its threshold for good.
 *
 * <p>In the record a suspended arm keeps its posterior and gets alpha 0, standard error 0 and rule weight 0.
 *
 * @param evaluation the evaluation in the definition's arm order (the full one when nothing was left out)
 * @param kept       the arms the stopping rule sees
 * @param keptEval   the evaluation of those arms
 */
record Narrowing(Evaluation evaluation, List<Arm> kept, Evaluation keptEval) {

    /** {@code full} narrowed to the arms {@code findings} did not suspend, when at least two remain. */
    static Narrowing of(AllocationEngine engine, List<Arm> arms, EngineConfig config, long seed,
                        double[] lastWeights, Evaluation full, GuardrailFindings findings) {
        boolean[] suspended = new boolean[arms.size()];
        for (int i = 0; i < suspended.length; i++) {
            suspended[i] = findings.isSuspended(i);
        }
        List<Integer> index = EstimatedArms.of(suspended);
        if (index.size() == arms.size()) {
            return new Narrowing(full, arms, full);
        }
        List<Arm> kept = index.stream().map(arms::get).toList();
        Evaluation sub = engine.evaluate(kept, config, seed, previous(lastWeights, index));
        return new Narrowing(expand(full, sub, index), kept, sub);
    }

    /** The previous weights of the kept arms, rescaled to sum to 1; null when there are none or they sum to 0. */
    static double[] previous(double[] lastWeights, List<Integer> index) {
        if (lastWeights == null) {
            return null;
        }
        double[] out = new double[index.size()];
        double sum = 0;
        for (int k = 0; k < out.length; k++) {
            out[k] = lastWeights[index.get(k)];
            sum += out[k];
        }
        if (sum <= 0) {
            return null;
        }
        for (int k = 0; k < out.length; k++) {
            out[k] /= sum;
        }
        return out;
    }

    private static Evaluation expand(Evaluation full, Evaluation sub, List<Integer> index) {
        int n = full.arms().size();
        double[] alpha = new double[n];
        double[] se = new double[n];
        boolean[] conditional = new boolean[n];
        double[] rule = new double[n];
        double[] weights = new double[n];
        ProbabilityBest b = sub.probabilityBest();
        for (int k = 0; k < index.size(); k++) {
            int i = index.get(k);
            alpha[i] = b.alpha(k);
            se[i] = b.standardError(k);
            conditional[i] = b.conditional()[k];
            rule[i] = sub.ruleWeights()[k];
            weights[i] = sub.weights()[k];
        }
        return new Evaluation(full.arms(), full.posteriors(), new ProbabilityBest(alpha, se, b.method(), b.draws(),
                conditional), rule, weights, sub.flags(), sub.rule(), sub.beta(), sub.seed(), sub.engineVersion());
    }
}
