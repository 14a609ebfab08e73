package dev.runoff.cli;

import dev.runoff.engine.allocation.AllocationMethod;
import dev.runoff.engine.planning.ArmModel;
import dev.runoff.engine.planning.OptimalAllocation;
import dev.runoff.engine.planning.PosteriorRates;
import dev.runoff.engine.planning.TargetAllocation;

/**
 * The asymptotic planning figures of {@code plan}: the optimal allocation (Garivier &amp; Kaufmann 2016),
 * the allocation the configured rule tends to, and the uniform one. The top-two rules tend to the
 * beta-optimal allocation (Russo 2020; Qin, Klabjan &amp; Russo 2017 for top-two expected improvement); the
 * uniform rule to the uniform one. All three are null when the best arm is not unique (T* is infinite), and
 * the rule's target is null for beta 0 or 1, where it is not defined.
 *
 * @param arms       the assumed true arms
 * @param delta      the error probability
 * @param epsilon    the indifference zone for counting errors
 * @param rule       the allocation rule
 * @param beta       the leader's share of the top-two rules
 * @param optimal    the optimal allocation, or null
 * @param ruleTarget the allocation the rule tends to, or null
 * @param uniform    the uniform allocation, or null
 */
record PlanFigures(ArmModel arms, double delta, double epsilon, AllocationMethod rule, double beta, TargetAllocation optimal,
                   TargetAllocation ruleTarget, TargetAllocation uniform) {

    static PlanFigures of(ArmModel arms, double delta, double epsilon, AllocationMethod rule, double beta) {
        if (arms.bestIsTied()) {
            return new PlanFigures(arms, delta, epsilon, rule, beta, null, null, null);
        }
        ArmModel model = arms;
        TargetAllocation uniform = OptimalAllocation.uniform(model);
        TargetAllocation target = rule == AllocationMethod.UNIFORM ? uniform
                : rule != AllocationMethod.TOP_TWO_ADAPTIVE && beta > 0 && beta < 1
                        ? OptimalAllocation.betaOptimal(model, beta) : null;
        return new PlanFigures(arms, delta, epsilon, rule, beta, OptimalAllocation.optimal(model), target, uniform);
    }

    /** Predicted trials of the optimal allocation, {@code T* log(1/delta)} rounded to the nearest whole trial. */
    long predictedTrials() {
        return predicted(optimal);
    }

    /** {@code T_w log(1/delta)} of an allocation, rounded to the nearest whole trial. */
    long predicted(TargetAllocation allocation) {
        return Math.round(allocation.predictedTrials(delta));
    }

    /**
     * {@code 1000 Gamma*_beta} for the given beta: how fast, per 1,000 trials, the posterior rules out the
     * slowest losing arm under the beta-optimal split (Russo 2020; {@link PosteriorRates}); NaN when the best
     * arm is tied or beta is 0 or 1.
     */
    double betaOptimalRate() {
        return optimal == null || !(beta > 0 && beta < 1) ? Double.NaN : 1000 * PosteriorRates.betaOptimal(arms, beta);
    }

    /** {@code 1000} times the uniform split's rate, NaN when the best arm is tied. */
    double uniformRate() {
        return optimal == null ? Double.NaN : 1000 * PosteriorRates.uniform(arms);
    }

    /** {@code 1000 / T*}: the rate of the best split of all, NaN when the best arm is tied. */
    double optimalRate() {
        return optimal == null ? Double.NaN : 1000 / optimal.characteristicTime();
    }

    /** {@code T_rule / T_uniform}, or NaN when the rule's target is not defined. */
    double asymptoticRatio() {
        return ruleTarget == null ? Double.NaN : ruleTarget.characteristicTime() / uniform.characteristicTime();
    }
}
