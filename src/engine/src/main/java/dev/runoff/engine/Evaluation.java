package dev.runoff.engine;

import dev.runoff.engine.allocation.AllocationMethod;
import dev.runoff.engine.allocation.GuardFlag;
import dev.runoff.engine.best.ProbabilityBest;
import dev.runoff.engine.posterior.Posterior;
import java.util.Arrays;
import java.util.Collections;
import java.util.EnumSet;
import java.util.List;
import java.util.Objects;
import java.util.Set;

/**
 * The result of one evaluation, with everything needed to explain and replay it. Lists and arrays are in
 * arm order.
 *
 * @param arms            arm names
 * @param posteriors      each arm's posterior with its mean and central 95% interval
 * @param probabilityBest probability that each arm is best, with standard errors and the method used
 * @param ruleWeights     the rule's weights before the guards
 * @param weights         the serving weights after the guards: non-negative, summing to 1
 * @param flags           guards that changed the weights
 * @param rule            the allocation rule
 * @param beta            the leader's share used by the rule
 * @param seed            the seed of the evaluation (unused by exact integration, recorded anyway)
 * @param engineVersion   {@link AllocationEngine#VERSION} of the engine that computed it
 */
public record Evaluation(List<String> arms, List<PosteriorSummary> posteriors, ProbabilityBest probabilityBest,
                         double[] ruleWeights, double[] weights, Set<GuardFlag> flags, AllocationMethod rule,
                         double beta, long seed, String engineVersion) {

    /** Copies every mutable component. */
    public Evaluation {
        arms = List.copyOf(arms);
        posteriors = List.copyOf(posteriors);
        Objects.requireNonNull(probabilityBest, "probabilityBest");
        ruleWeights = ruleWeights.clone();
        weights = weights.clone();
        flags = flags.isEmpty() ? Set.of() : Collections.unmodifiableSet(EnumSet.copyOf(flags));
        Objects.requireNonNull(rule, "rule");
        Objects.requireNonNull(engineVersion, "engineVersion");
    }

    /** The method that computed {@link #probabilityBest()}. */
    public ProbabilityBest.Method method() {
        return probabilityBest.method();
    }

    /** Whether the warm-up guard replaced the rule's weights by equal weights. */
    public boolean warmUpActive() {
        return flags.contains(GuardFlag.WARM_UP);
    }

    /** Serving weight of arm {@code i}. */
    public double weight(int i) {
        return weights[i];
    }

    @Override
    public double[] ruleWeights() {
        return ruleWeights.clone();
    }

    @Override
    public double[] weights() {
        return weights.clone();
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof Evaluation e && arms.equals(e.arms) && posteriors.equals(e.posteriors)
                && probabilityBest.equals(e.probabilityBest) && Arrays.equals(ruleWeights, e.ruleWeights)
                && Arrays.equals(weights, e.weights) && flags.equals(e.flags) && rule == e.rule
                && Double.compare(beta, e.beta) == 0 && seed == e.seed && engineVersion.equals(e.engineVersion);
    }

    @Override
    public int hashCode() {
        return Objects.hash(arms, posteriors, probabilityBest, Arrays.hashCode(ruleWeights),
                Arrays.hashCode(weights), flags, rule, beta, seed, engineVersion);
    }

    @Override
    public String toString() {
        return "Evaluation[arms=" + arms + ", posteriors=" + posteriors + ", probabilityBest=" + probabilityBest
                + ", ruleWeights=" + Arrays.toString(ruleWeights) + ", weights=" + Arrays.toString(weights)
                + ", flags=" + flags + ", rule=" + rule + ", beta=" + beta + ", seed=" + seed
                + ", engineVersion=" + engineVersion + "]";
    }

    /**
     * One arm's posterior with its mean and central 95% credible interval. The interval's quantiles are computed
     * when asked for, not when the arm is evaluated: the allocation and the stopping rules never read them, and
     * simulations evaluate millions of arms.
     *
     * @param posterior the posterior (its parameters are the record's components)
     */
    public record PosteriorSummary(Posterior posterior) {

        /** Summarises {@code posterior}. */
        public static PosteriorSummary of(Posterior posterior) {
            return new PosteriorSummary(Objects.requireNonNull(posterior, "posterior"));
        }

        /** Posterior mean (NaN for a Student-t with at most 1 degree of freedom). */
        public double mean() {
            return posterior.mean();
        }

        /** 2.5% quantile. */
        public double lower95() {
            return posterior.quantile(0.025);
        }

        /** 97.5% quantile. */
        public double upper95() {
            return posterior.quantile(0.975);
        }
    }
}
