package dev.runoff.engine.planning;

import dev.runoff.engine.AllocationEngine;
import dev.runoff.engine.core.Arm;
import dev.runoff.engine.EngineConfig;
import dev.runoff.engine.Evaluation;
import dev.runoff.engine.core.Metric;
import dev.runoff.engine.stats.ArmStats;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.stats.ValueStats;
import dev.runoff.engine.best.ProbabilityBest;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.stopping.LeaderConfidence;
import dev.runoff.engine.stopping.LeaderWithin;
import dev.runoff.engine.stopping.Rule;
import dev.runoff.engine.stopping.Verdict;
import dev.runoff.engine.stopping.StoppingCheck;
import dev.runoff.engine.stopping.Timing;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.EnumSet;
import java.util.List;
import java.util.Set;
import org.apache.commons.rng.JumpableUniformRandomProvider;
import org.apache.commons.rng.UniformRandomProvider;
import org.apache.commons.rng.sampling.distribution.ZigguratSampler;
import org.apache.commons.rng.simple.RandomSource;

/**
 * One simulated experiment in batched mode, run by the same code as the streaming job: at each evaluation
 * the {@link AllocationEngine} computes the weights (with the previous period's weights, as the job does)
 * and {@link StoppingCheck} decides; on CONTINUE, the next batch of trials draws arms i.i.d. from the
 * weights and outcomes from the true arms. The last batch is cut short at the trial budget, so a budget stop
 * happens at exactly the budget.
 *
 * <p>Randomness: a xoshiro256++ generator seeded with the replication seed is split with {@code jump()}
 * (Blackman &amp; Vigna 2021, "Scrambled linear pseudorandom number generators", ACM TOMS) into
 * non-overlapping streams: one for the arm choices, one for the engine's Monte Carlo seeds, and one per arm
 * for its outcomes. The n-th outcome of an arm is therefore the same whatever the allocation rule, so the
 * baseline run on the same seed sees the same outcomes (common random numbers).
 *
 * <p>When neither the allocation rule nor the stopping rule reads the probability that each arm is best
 * before a stop (uniform, value or expected-improvement weights with the GLR or mixture rule), the estimator
 * runs only at evaluations that may stop: the same runs, bit for bit, at a fraction of the cost (the engine's
 * seed stream advances at every evaluation either way).
 */
final class SimulationReplication {
    private static final Timing NO_CLOCK = new Timing(Instant.EPOCH, Instant.EPOCH);
    /** Stopping rules that read alpha only for a stop (the winner of a budget stop, the recorded alpha). */
    private static final Set<Rule> ALPHA_FREE_RULES = EnumSet.of(Rule.GLR, Rule.GLR_HEURISTIC, Rule.MIXTURE);

    private final SimulationConfig config;
    private final EngineConfig engineConfig;
    private final List<String> names;
    private final AllocationEngine engine = new AllocationEngine();
    private final boolean skipsEstimator;

    /**
     * A replication of {@code config} whose weights come from {@code engineConfig} (the configured rule, or
     * the uniform baseline).
     */
    SimulationReplication(SimulationConfig config, EngineConfig engineConfig) {
        this(config, engineConfig, !engineConfig.rule().readsProbabilityBest()
                && ALPHA_FREE_RULES.contains(config.stopping().rule()));
    }

    /**
     * As above; {@code skipsEstimator} asks for alpha only where a stop may happen, and is allowed only when
     * neither the allocation rule nor the stopping rule reads alpha before a stop.
     */
    SimulationReplication(SimulationConfig config, EngineConfig engineConfig, boolean skipsEstimator) {
        if (skipsEstimator && (engineConfig.rule().readsProbabilityBest()
                || !ALPHA_FREE_RULES.contains(config.stopping().rule()))) {
            throw new IllegalArgumentException("allocation rule " + engineConfig.rule().cliName()
                    + " or stopping rule " + config.stopping().rule() + " reads alpha: the estimator cannot be skipped");
        }
        this.config = config;
        this.engineConfig = engineConfig;
        this.names = config.arms().names();
        this.skipsEstimator = skipsEstimator;
    }

    /** Runs one experiment from the replication seed {@code seed} until the stopping rule or the budget stops it. */
    SimulationRun run(long seed) {
        Streams streams = new Streams(seed, config.arms());
        ArmStats[] stats = emptyStats();
        long total = 0;
        double[] previous = null;
        while (true) {
            List<Arm> arms = arms(stats);
            long engineSeed = streams.engineSeeds.nextLong();
            double[] w = skipsEstimator ? continuingWeights(arms, previous) : null;
            if (w == null) {
                Evaluation e = engine.evaluate(arms, engineConfig, engineSeed, previous);
                Verdict d = StoppingCheck.decide(arms, e.probabilityBest(), NO_CLOCK, config.stopping(),
                        confidence(e));
                if (d.isStop()) {
                    return new SimulationRun(total, d.leader(), config.arms().isWrongPick(d.leader(),
                            config.epsilon()), d.reason(), trials(stats), e.probabilityBest().alpha());
                }
                w = e.weights();
            }
            long n = Math.min(config.batch(), config.budgetTrials() - total);
            if (n <= 0) {
                throw new IllegalStateException("CONTINUE at the trial budget at " + total + " trials");
            }
            for (long i = 0; i < n; i++) {
                int arm = streams.chooseArm(w);
                stats[arm] = add(stats[arm], streams.outcome(arm));
            }
            total += n;
            previous = w;
        }
    }

    /**
     * For rules that never read alpha before a stop: the serving weights when the stopping rule continues,
     * or null when it may stop (then the full evaluation decides). The rule's verdict is asked with a
     * provisional alpha of {@code 1 / K} per arm: the GLR and mixture rules fire on their statistics alone,
     * so the verdict is CONTINUE with it exactly when it is CONTINUE with the estimated alpha; only a stop
     * (the winner of a budget stop, the alpha recorded in the run) reads alpha, and a stop is always
     * re-decided from a full evaluation.
     */
    private double[] continuingWeights(List<Arm> arms, double[] previous) {
        double[] equal = new double[arms.size()];
        Arrays.fill(equal, 1.0 / arms.size());
        ProbabilityBest provisional = new ProbabilityBest(equal, new double[equal.length],
                ProbabilityBest.Method.EXACT, 0);
        if (StoppingCheck.decide(arms, provisional, NO_CLOCK, config.stopping()).isStop()) {
            return null;
        }
        return engine.weights(arms, engineConfig, previous);
    }

    /** The indifference rule's confidence, bound to this evaluation's posteriors (as the decision module does). */
    private static LeaderConfidence confidence(Evaluation e) {
        List<Posterior> posteriors = e.posteriors().stream().map(Evaluation.PosteriorSummary::posterior).toList();
        return LeaderWithin.of(posteriors);
    }

    private ArmStats[] emptyStats() {
        ArmStats[] stats = new ArmStats[names.size()];
        for (int a = 0; a < stats.length; a++) {
            stats[a] = config.arms().metric() == Metric.BERNOULLI ? BernoulliStats.EMPTY : ValueStats.EMPTY;
        }
        return stats;
    }

    private static ArmStats add(ArmStats s, double outcome) {
        if (s instanceof BernoulliStats b) {
            return new BernoulliStats(b.trials() + 1, b.successes() + (outcome > 0 ? 1 : 0));
        }
        return ((ValueStats) s).add(outcome);
    }

    private List<Arm> arms(ArmStats[] stats) {
        List<Arm> arms = new ArrayList<>(stats.length);
        for (int a = 0; a < stats.length; a++) {
            arms.add(new Arm(names.get(a), stats[a]));
        }
        return arms;
    }

    private static long[] trials(ArmStats[] stats) {
        long[] t = new long[stats.length];
        for (int a = 0; a < t.length; a++) {
            t[a] = stats[a].trials();
        }
        return t;
    }

    /** The replication's random streams. */
    private static final class Streams {
        private final ArmModel truth;
        private final UniformRandomProvider choices;
        private final UniformRandomProvider engineSeeds;
        private final UniformRandomProvider[] outcomes;
        private final ZigguratSampler.NormalizedGaussian[] gaussians;

        Streams(long seed, ArmModel truth) {
            this.truth = truth;
            JumpableUniformRandomProvider root = (JumpableUniformRandomProvider) RandomSource.XO_SHI_RO_256_PP.create(seed);
            choices = root.jump();
            engineSeeds = root.jump();
            outcomes = new UniformRandomProvider[truth.size()];
            gaussians = new ZigguratSampler.NormalizedGaussian[truth.size()];
            for (int a = 0; a < outcomes.length; a++) {
                outcomes[a] = root.jump();
                gaussians[a] = ZigguratSampler.NormalizedGaussian.of(outcomes[a]);
            }
        }

        /**
         * An arm drawn from the weights by inversion; a rounding remainder (u at or above the weights' sum)
         * goes to the last arm with a positive weight, never to an arm with weight 0.
         */
        int chooseArm(double[] w) {
            double u = choices.nextDouble();
            double cumulative = 0;
            int last = -1;
            for (int a = 0; a < w.length; a++) {
                if (w[a] > 0) {
                    cumulative += w[a];
                    last = a;
                    if (u < cumulative) {
                        return a;
                    }
                }
            }
            return last;
        }

        /** The next outcome of arm {@code a}: 1 or 0 for Bernoulli arms, a Normal(mean, stddev) value otherwise. */
        double outcome(int a) {
            if (truth.metric() == Metric.BERNOULLI) {
                return outcomes[a].nextDouble() < truth.mean(a) ? 1.0 : 0.0;
            }
            return truth.mean(a) + truth.stddev(a) * gaussians[a].sample();
        }
    }
}
