package dev.runoff.engine.best;

import dev.runoff.engine.posterior.Posterior;
import java.util.Arrays;
import java.util.List;

/**
 * The exact probability that each arm is best, as engine version 1.3 computes it: the integrals, ranges,
 * tail checks and log-space quadrature of {@link ExactProbabilityBest} (whose javadoc gives the design and
 * the accuracy), with the arithmetic of {@link ExactScheme#ENGINE_1_3}: wider 20-point panels, integrals
 * that end once their remainder is negligible ({@link PrunedNodes}), Beta distribution functions by Taylor
 * steps between nodes ({@code CachedIncompleteBeta}), deeper passes for the failing arms only.
 * Deterministic: the seed is ignored, standard errors are 0. The alphas are not bit for bit those of
 * {@link ExactProbabilityBest}; the tests hold both to the same outside references and to each other
 * (FastExactProbabilityBestTest states the agreement). About 2x faster on five Beta arms
 * (src/docs/performance.md).
 */
public final class FastExactProbabilityBest implements ProbabilityBestEstimator {

    /** Creates the (stateless) estimator. */
    public FastExactProbabilityBest() {
        // stateless
    }

    @Override
    public ProbabilityBest estimate(List<? extends Posterior> posteriors, long seed) {
        ExactProbabilityBest.checkPosteriors(posteriors);
        boolean[] all = new boolean[posteriors.size()];
        Arrays.fill(all, true);
        double[] alpha = ExactProbabilityBest.alphas(posteriors, -1, 0, all, ExactScheme.ENGINE_1_3);
        return new ProbabilityBest(alpha, new double[alpha.length], ProbabilityBest.Method.EXACT, 0);
    }

    /**
     * The alphas of the arms selected by {@code which} (the others are 0), with the same integrals and checks
     * as {@link #estimate}: the {@link ExactAlphas} of engine version 1.3.
     */
    static double[] selected(List<? extends Posterior> posteriors, boolean[] which) {
        ExactProbabilityBest.checkPosteriors(posteriors);
        return ExactProbabilityBest.alphas(posteriors, -1, 0, which.clone(), ExactScheme.ENGINE_1_3);
    }
}
