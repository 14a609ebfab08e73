package dev.runoff.engine.planning;

import dev.runoff.engine.AllocationEngine;
import dev.runoff.engine.core.Arm;
import dev.runoff.engine.EngineConfig;
import dev.runoff.engine.Evaluation;
import dev.runoff.engine.core.Metric;
import dev.runoff.engine.stats.ArmStats;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.stats.ValueStats;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.stopping.LeaderConfidence;
import dev.runoff.engine.stopping.LeaderWithin;
import dev.runoff.engine.stopping.Verdict;
import dev.runoff.engine.stopping.StoppingCheck;
import dev.runoff.engine.stopping.Timing;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
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
 */
final class SimulationReplication {
    private static final Timing NO_CLOCK = new Timing(Instant.EPOCH, Instant.EPOCH);

    private final SimulationConfig config;
    private final EngineConfig engineConfig;
    private final List<String> names;
    private final AllocationEngine engine = new AllocationEngine();

    /**
     * A replication of {@code config} whose weights come from {@code engineConfig} (the configured rule, or
     * the uniform baseline).
     */
    SimulationReplication(SimulationConfig config, EngineConfig engineConfig) {
        this.config = config;
        this.engineConfig = engineConfig;
        this.names = config.arms().names();
    }

    /** Runs one experiment from the replication seed {@code seed} until the stopping rule or the budget stops it. */
    SimulationRun run(long seed) {
        Streams streams = new Streams(seed, config.arms());
        ArmStats[] stats = emptyStats();
        long total = 0;
        double[] previous = null;
        while (true) {
            List<Arm> arms = arms(stats);
            Evaluation e = engine.evaluate(arms, engineConfig, streams.engineSeeds.nextLong(), previous);
            Verdict d = StoppingCheck.decide(arms, e.probabilityBest(), NO_CLOCK, config.stopping(), confidence(e));
            if (d.isStop()) {
                return new SimulationRun(total, d.leader(), config.arms().isWrongPick(d.leader(), config.epsilon()),
                        d.reason(), trials(stats), e.probabilityBest().alpha());
            }
            long n = Math.min(config.batch(), config.budgetTrials() - total);
            if (n <= 0) {
                throw new IllegalStateException("CONTINUE at the trial budget: " + d);
            }
            double[] w = e.weights();
            for (long i = 0; i < n; i++) {
                int arm = streams.chooseArm(w);
                stats[arm] = add(stats[arm], streams.outcome(arm));
            }
            total += n;
            previous = w;
        }
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
