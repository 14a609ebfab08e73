package dev.runoff.bench;

import dev.runoff.engine.best.MonteCarloProbabilityBest;
import dev.runoff.engine.best.ProbabilityBest;
import dev.runoff.engine.best.TableDrawSource;
import dev.runoff.engine.posterior.BetaPosterior;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.TimeUnit;
import org.apache.commons.math3.distribution.BetaDistribution;
import org.openjdk.jmh.annotations.Benchmark;
import org.openjdk.jmh.annotations.BenchmarkMode;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.annotations.OutputTimeUnit;
import org.openjdk.jmh.annotations.Param;
import org.openjdk.jmh.annotations.Scope;
import org.openjdk.jmh.annotations.Setup;
import org.openjdk.jmh.annotations.State;

/**
 * Probability that each arm is best for 5 Beta arms, rates 0.10 .. 0.14 on 1,000 trials each (uniform
 * prior), with 10,000 joint draws: the engine's {@link MonteCarloProbabilityBest} against a naive baseline
 * that calls Commons Math {@code BetaDistribution.sample()} (its default generator) for every draw and takes
 * the argmax; and the same estimator drawing from {@link TableDrawSource} (the table-based Beta sampler
 * meant for the next engine version). The numpy equivalent is src/bench/alpha_numpy.py.
 */
@State(Scope.Thread)
@BenchmarkMode(Mode.AverageTime)
@OutputTimeUnit(TimeUnit.MILLISECONDS)
public class MonteCarloAlphaBench {
    /** Joint draws per estimate (10,000, as in alpha_numpy.py; other values to find where the table pays). */
    @Param({"10000"})
    public int draws = 10_000;
    static final int TRIALS = 1_000;
    static final double[] RATES = {0.10, 0.11, 0.12, 0.13, 0.14};

    private List<BetaPosterior> posteriors;
    private MonteCarloProbabilityBest estimator;
    private MonteCarloProbabilityBest tableEstimator;
    private BetaDistribution[] commonsMath;
    private long seed;

    /** Builds the posteriors Beta(1 + s, 1 + n - s) and the baseline's distributions once. */
    @Setup
    public void setUp() {
        posteriors = new ArrayList<>();
        commonsMath = new BetaDistribution[RATES.length];
        for (int i = 0; i < RATES.length; i++) {
            double successes = Math.round(RATES[i] * TRIALS);
            BetaPosterior p = new BetaPosterior(1 + successes, 1 + TRIALS - successes);
            posteriors.add(p);
            commonsMath[i] = new BetaDistribution(p.a(), p.b());
        }
        estimator = new MonteCarloProbabilityBest(draws);
        tableEstimator = new MonteCarloProbabilityBest(draws, TableDrawSource.always());
    }

    /** The engine's estimator; a new seed per call so no two evaluations repeat. */
    @Benchmark
    public ProbabilityBest engine() {
        return estimator.estimate(posteriors, seed++);
    }

    /** The engine's estimator with the table draw source (tables built afresh in every call). */
    @Benchmark
    public ProbabilityBest engineTable() {
        return tableEstimator.estimate(posteriors, seed++);
    }

    /** Naive baseline: one Commons Math {@code sample()} per arm per draw, then argmax and counts. */
    @Benchmark
    public double[] commonsMathBaseline() {
        int[] wins = new int[commonsMath.length];
        for (int m = 0; m < draws; m++) {
            int best = 0;
            double bestValue = commonsMath[0].sample();
            for (int i = 1; i < commonsMath.length; i++) {
                double v = commonsMath[i].sample();
                if (v > bestValue) {
                    bestValue = v;
                    best = i;
                }
            }
            wins[best]++;
        }
        double[] alpha = new double[wins.length];
        for (int i = 0; i < wins.length; i++) {
            alpha[i] = (double) wins[i] / draws;
        }
        return alpha;
    }
}
