package dev.runoff.engine;

import dev.runoff.engine.core.Arm;

import dev.runoff.engine.core.Metric;

import dev.runoff.engine.allocation.AllocationMethod;
import dev.runoff.engine.allocation.GuardedWeights;
import dev.runoff.engine.best.AdaptiveMonteCarlo;
import dev.runoff.engine.best.AlphaReaders;
import dev.runoff.engine.best.ProbabilityBest;
import dev.runoff.engine.best.ProbabilityBestEstimator;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.stats.ArmStats;
import dev.runoff.engine.stats.BernoulliStats;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Objects;
import java.util.Set;
import java.util.function.UnaryOperator;

/**
 * The engine facade: from arms, a configuration and a seed to posteriors, the probability that each arm is
 * best, the rule's weights and the guarded serving weights, with the arithmetic of one {@link EngineVersion}
 * (the current one unless another is given). Immutable and thread-safe; every evaluation is a pure function
 * of (version, statistics, configuration, seed, previous weights): the same input gives the same bits.
 *
 * <p>With {@link EngineConfig.MethodChoice#MONTE_CARLO}, the default, the probability that each arm is best
 * is estimated by {@link AdaptiveMonteCarlo} with at most {@link EngineConfig#draws()} joint draws: the draw
 * count follows the version's draw policy (1.3: until what this evaluation reads from the alphas, given by
 * the rule and {@link EngineConfig#leaderThreshold()}, is precise enough), and arms that win no draw get a
 * positive conditional Monte Carlo estimate, so top-two Thompson sampling never falls into its degenerate
 * split merely because the draws ran out. {@link EngineConfig.MethodChoice#EXACT} integrates exactly;
 * {@link EngineConfig.MethodChoice#AUTO} integrates exactly for up to {@link #EXACT_ARM_LIMIT} arms and
 * estimates by Monte Carlo beyond (a convention kept for the command line, not a measured crossover).
 */
public final class AllocationEngine {

    /**
     * Version of the arithmetic new evaluations use ({@link EngineVersion#CURRENT}), recorded in every
     * evaluation. A change to the engine that can alter any output bit for the same input is a new
     * {@link EngineVersion}.
     */
    public static final String VERSION = EngineVersion.CURRENT.label();

    /** Largest number of arms for which {@link EngineConfig.MethodChoice#AUTO} integrates exactly. */
    public static final int EXACT_ARM_LIMIT = 12;

    private final EngineVersion version;

    /** An engine of the current version, {@link EngineVersion#CURRENT}. */
    public AllocationEngine() {
        this(EngineVersion.CURRENT);
    }

    /** An engine computing with the arithmetic of {@code version}. */
    public AllocationEngine(EngineVersion version) {
        this.version = Objects.requireNonNull(version, "version");
    }

    /** The version this engine computes with. */
    public EngineVersion version() {
        return version;
    }

    /**
     * Evaluates the arms without previous weights (the per-period cap does not apply).
     *
     * @see #evaluate(List, EngineConfig, long, double[])
     */
    public Evaluation evaluate(List<Arm> arms, EngineConfig config, long seed) {
        return evaluate(arms, config, seed, null);
    }

    /**
     * Evaluates the arms.
     *
     * @param arms            at least two arms with unique names and statistics matching the prior's metric
     * @param config          the configuration
     * @param seed            seed of the Monte Carlo stream (recorded but unused by exact integration)
     * @param previousWeights the previous period's serving weights in arm order, or {@code null}
     * @throws IllegalArgumentException naming the arm or parameter and the value when the input is invalid
     */
    public Evaluation evaluate(List<Arm> arms, EngineConfig config, long seed, double[] previousWeights) {
        Objects.requireNonNull(config, "config");
        List<String> names = checkArms(arms, config.metric());
        List<Posterior> posteriors = posteriors(arms, names, config);
        ProbabilityBest pb = estimator(config, posteriors).estimate(posteriors, seed);
        double[] ruleWeights = config.rule().weights(posteriors, pb.alpha(), config.beta());
        GuardedWeights guarded = config.guards().apply(ruleWeights, names, trials(arms), previousWeights);
        List<Evaluation.PosteriorSummary> summaries = new ArrayList<>(posteriors.size());
        for (Posterior p : posteriors) {
            summaries.add(Evaluation.PosteriorSummary.of(p));
        }
        return new Evaluation(names, summaries, pb, ruleWeights, guarded.weights(), guarded.flags(),
                config.rule(), config.beta(), seed, version.label());
    }

    /**
     * The guarded serving weights alone, without estimating the probability that each arm is best: the same
     * bits as {@link Evaluation#weights()} of {@link #evaluate(List, EngineConfig, long, double[])} for a rule
     * that does not read it. Simulations whose rules never read it use this to skip the estimator.
     *
     * @throws IllegalArgumentException if the rule reads the probability of being best
     *                                  ({@link AllocationMethod#readsProbabilityBest()}), or as {@code evaluate}
     */
    public double[] weights(List<Arm> arms, EngineConfig config, double[] previousWeights) {
        Objects.requireNonNull(config, "config");
        if (config.rule().readsProbabilityBest()) {
            throw new IllegalArgumentException("rule " + config.rule().cliName()
                    + " reads the probability of being best; evaluate the arms instead");
        }
        List<String> names = checkArms(arms, config.metric());
        double[] ruleWeights = config.rule().weights(posteriors(arms, names, config), null, config.beta());
        return config.guards().apply(ruleWeights, names, trials(arms), previousWeights).weights();
    }

    private static List<Posterior> posteriors(List<Arm> arms, List<String> names, EngineConfig config) {
        List<Posterior> posteriors = new ArrayList<>(arms.size());
        for (Arm arm : arms) {
            posteriors.add(config.prior().posterior(arm.stats()));
        }
        if (config.rule().needsMeans()) {
            checkFiniteMeans(names, posteriors, config);
        }
        return posteriors;
    }

    /** The method {@code choice} resolves to for {@code arms} arms. */
    public static ProbabilityBest.Method resolve(EngineConfig.MethodChoice choice, int arms) {
        return switch (choice) {
            case EXACT -> ProbabilityBest.Method.EXACT;
            case MONTE_CARLO -> ProbabilityBest.Method.MONTE_CARLO;
            case AUTO -> arms <= EXACT_ARM_LIMIT ? ProbabilityBest.Method.EXACT : ProbabilityBest.Method.MONTE_CARLO;
        };
    }

    private ProbabilityBestEstimator estimator(EngineConfig config, List<Posterior> posteriors) {
        return resolve(config.method(), posteriors.size()) == ProbabilityBest.Method.EXACT
                ? version.exact()
                : version.monteCarlo(config.draws(), readers(config, posteriors));
    }

    /**
     * What the evaluation reads from the alphas: the rule's weights when they vary smoothly with the alphas,
     * the leader's and (top-two probability sampling) the runner-up's identity, and the configured stopping
     * threshold on the leader's alpha.
     */
    static AlphaReaders readers(EngineConfig config, List<Posterior> posteriors) {
        AllocationMethod rule = config.rule();
        boolean smooth = rule == AllocationMethod.TOP_TWO_THOMPSON || rule == AllocationMethod.TOP_TWO_ADAPTIVE;
        UnaryOperator<double[]> weights = smooth ? alpha -> rule.weights(posteriors, alpha, config.beta()) : null;
        return new AlphaReaders(weights, rule == AllocationMethod.TOP_TWO_PROBABILITY ? 2 : 1,
                config.leaderThreshold());
    }

    private static List<String> checkArms(List<Arm> arms, Metric metric) {
        Objects.requireNonNull(arms, "arms");
        if (arms.size() < 2) {
            throw new IllegalArgumentException("at least two arms are needed, got " + arms.size());
        }
        Set<String> seen = new HashSet<>();
        List<String> names = new ArrayList<>(arms.size());
        for (int i = 0; i < arms.size(); i++) {
            Arm arm = Objects.requireNonNull(arms.get(i), "arm " + i);
            if (!seen.add(arm.name())) {
                throw new IllegalArgumentException("duplicate arm name '" + arm.name() + "'");
            }
            Metric kind = metricOf(arm.stats());
            if (kind != metric) {
                throw new IllegalArgumentException("arm '" + arm.name() + "' has " + describe(kind)
                        + " statistics but the prior is for the " + describe(metric) + " metric");
            }
            names.add(arm.name());
        }
        return names;
    }

    private static void checkFiniteMeans(List<String> names, List<Posterior> posteriors, EngineConfig config) {
        for (int i = 0; i < names.size(); i++) {
            double mean = posteriors.get(i).mean();
            if (!Double.isFinite(mean)) {
                throw new IllegalArgumentException("arm '" + names.get(i) + "': rule " + config.rule().cliName()
                        + " needs a finite posterior mean, got " + mean + " for " + posteriors.get(i));
            }
        }
    }

    private static Metric metricOf(ArmStats stats) {
        return stats instanceof BernoulliStats ? Metric.BERNOULLI : Metric.VALUE;
    }

    private static String describe(Metric metric) {
        return metric == Metric.BERNOULLI ? "Bernoulli" : "value";
    }

    private static long[] trials(List<Arm> arms) {
        long[] t = new long[arms.size()];
        for (int i = 0; i < t.length; i++) {
            t[i] = arms.get(i).stats().trials();
        }
        return t;
    }
}
