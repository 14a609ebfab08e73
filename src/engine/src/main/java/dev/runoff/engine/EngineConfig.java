package dev.runoff.engine;

import dev.runoff.engine.core.Metric;

import dev.runoff.engine.core.Checks;

import dev.runoff.engine.allocation.AllocationMethod;
import dev.runoff.engine.allocation.Guards;
import dev.runoff.engine.best.LeaderThreshold;
import dev.runoff.engine.posterior.BetaPrior;
import dev.runoff.engine.posterior.NormalGammaPrior;
import dev.runoff.engine.posterior.Prior;
import java.util.Objects;

/**
 * Everything an evaluation needs besides the arms and the seed.
 *
 * @param prior  the prior of every arm; its kind fixes the metric ({@link BetaPrior}: Bernoulli,
 *               {@link NormalGammaPrior}: value)
 * @param rule   the allocation rule
 * @param beta   the leader's share in the top-two rules, in [0, 1]
 * @param method how the probability that each arm is best is computed
 * @param draws  the most Monte Carlo joint draws, {@code >= 1} (the cap of {@link dev.runoff.engine.best.AdaptiveMonteCarlo};
 *               used only when Monte Carlo is chosen)
 * @param guards the guards applied to the rule's weights
 * @param leaderThreshold a stopping threshold on the leader's Monte Carlo alpha (the posterior rule's), or
 *               {@code null}: engine 1.3 draws until the leader's alpha is clearly on one side of it
 *               ({@link dev.runoff.engine.best.DecisionPrecision}); 1.2 ignores it
 */
public record EngineConfig(Prior prior, AllocationMethod rule, double beta, MethodChoice method, int draws,
                           Guards guards, LeaderThreshold leaderThreshold) {

    /** Default leader share: the beta = 1/2 of Russo (2020), within a factor 2 of the optimal rate. */
    public static final double DEFAULT_BETA = 0.5;
    /** Default cap on Monte Carlo joint draws: four times the first stage of 10,000. */
    public static final int DEFAULT_DRAWS = 40_000;

    /** Validates every field; messages name the field and value. */
    public EngineConfig {
        Objects.requireNonNull(prior, "prior");
        Objects.requireNonNull(rule, "rule");
        Checks.inClosedRange("beta", beta, 0, 1);
        Objects.requireNonNull(method, "method");
        if (draws < 1) {
            throw new IllegalArgumentException("draws must be >= 1, got " + draws);
        }
        Objects.requireNonNull(guards, "guards");
    }

    /** A configuration without a stopping threshold on the leader's alpha. */
    public EngineConfig(Prior prior, AllocationMethod rule, double beta, MethodChoice method, int draws,
                        Guards guards) {
        this(prior, rule, beta, method, draws, guards, null);
    }

    /**
     * Defaults for a metric: uniform Beta(1, 1) prior for Bernoulli metrics or {@link NormalGammaPrior#WEAK}
     * for value metrics, top-two Thompson sampling with beta 0.5, Monte Carlo with at most
     * {@value #DEFAULT_DRAWS} draws, no guards.
     */
    public static EngineConfig defaults(Metric metric) {
        Prior prior = metric == Metric.BERNOULLI ? BetaPrior.UNIFORM : NormalGammaPrior.WEAK;
        return new EngineConfig(prior, AllocationMethod.TOP_TWO_THOMPSON, DEFAULT_BETA, MethodChoice.MONTE_CARLO,
                DEFAULT_DRAWS, Guards.NONE);
    }

    /** The metric this configuration's prior is for. */
    public Metric metric() {
        return prior instanceof BetaPrior ? Metric.BERNOULLI : Metric.VALUE;
    }

    /** This configuration with another prior. */
    public EngineConfig withPrior(Prior newPrior) {
        return new EngineConfig(newPrior, rule, beta, method, draws, guards, leaderThreshold);
    }

    /** This configuration with another rule. */
    public EngineConfig withRule(AllocationMethod newRule) {
        return new EngineConfig(prior, newRule, beta, method, draws, guards, leaderThreshold);
    }

    /** This configuration with another beta. */
    public EngineConfig withBeta(double newBeta) {
        return new EngineConfig(prior, rule, newBeta, method, draws, guards, leaderThreshold);
    }

    /** This configuration with another method choice. */
    public EngineConfig withMethod(MethodChoice newMethod) {
        return new EngineConfig(prior, rule, beta, newMethod, draws, guards, leaderThreshold);
    }

    /** This configuration with another number of Monte Carlo draws. */
    public EngineConfig withDraws(int newDraws) {
        return new EngineConfig(prior, rule, beta, method, newDraws, guards, leaderThreshold);
    }

    /** This configuration with other guards. */
    public EngineConfig withGuards(Guards newGuards) {
        return new EngineConfig(prior, rule, beta, method, draws, newGuards, leaderThreshold);
    }

    /** This configuration with another stopping threshold on the leader's alpha ({@code null}: none). */
    public EngineConfig withLeaderThreshold(LeaderThreshold newThreshold) {
        return new EngineConfig(prior, rule, beta, method, draws, guards, newThreshold);
    }

    /** How to compute the probability that each arm is best. */
    public enum MethodChoice {
        /**
         * Exact integration for up to {@link AllocationEngine#EXACT_ARM_LIMIT} arms, Monte Carlo beyond.
         */
        AUTO,
        /** Always exact numerical integration. */
        EXACT,
        /** Always Monte Carlo ({@link dev.runoff.engine.best.AdaptiveMonteCarlo}) with at most the configured draws. */
        MONTE_CARLO
    }
}
