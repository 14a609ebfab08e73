package dev.runoff.engine.best;

import dev.runoff.engine.posterior.Posterior;
import java.util.List;
import org.apache.commons.rng.UniformRandomProvider;
import org.apache.commons.rng.simple.RandomSource;

/**
 * Monte Carlo probability that each arm is best: {@code draws} joint posterior draws from a seeded
 * xoshiro256++ stream; alpha_i is the share of draws in which arm i is largest (ties to the lowest index),
 * with the binomial standard error {@code sqrt(alpha_i (1 - alpha_i) / draws)}.
 */
public final class MonteCarloProbabilityBest implements ProbabilityBestEstimator {
    private final int draws;

    /**
     * An estimator using {@code draws} joint draws.
     *
     * @param draws number of joint draws, {@code >= 1}
     */
    public MonteCarloProbabilityBest(int draws) {
        if (draws < 1) {
            throw new IllegalArgumentException("draws must be >= 1, got " + draws);
        }
        this.draws = draws;
    }

    @Override
    public ProbabilityBest estimate(List<? extends Posterior> posteriors, long seed) {
        int k = posteriors.size();
        if (k < 2) {
            throw new IllegalArgumentException("at least two posteriors are needed, got " + k);
        }
        UniformRandomProvider rng = RandomSource.XO_SHI_RO_256_PP.create(seed);
        Posterior.Sampler[] samplers = new Posterior.Sampler[k];
        for (int i = 0; i < k; i++) {
            samplers[i] = posteriors.get(i).sampler(rng);
        }
        long[] wins = new long[k];
        for (int d = 0; d < draws; d++) {
            wins[argmaxDraw(samplers)]++;
        }
        double[] alpha = new double[k];
        double[] se = new double[k];
        for (int i = 0; i < k; i++) {
            alpha[i] = (double) wins[i] / draws;
            se[i] = Math.sqrt(alpha[i] * (1 - alpha[i]) / draws);
        }
        return new ProbabilityBest(alpha, se, ProbabilityBest.Method.MONTE_CARLO, draws);
    }

    private static int argmaxDraw(Posterior.Sampler[] samplers) {
        int best = 0;
        double max = samplers[0].draw();
        for (int i = 1; i < samplers.length; i++) {
            double x = samplers[i].draw();
            if (x > max) {
                max = x;
                best = i;
            }
        }
        return best;
    }
}
