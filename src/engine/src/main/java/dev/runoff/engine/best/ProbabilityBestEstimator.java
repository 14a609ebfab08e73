package dev.runoff.engine.best;

import dev.runoff.engine.posterior.Posterior;
import java.util.List;

/** Computes the probability that each arm is best from independent posteriors. */
public interface ProbabilityBestEstimator {

    /**
     * Alpha for each posterior, in order.
     *
     * @param posteriors at least two independent posteriors
     * @param seed       seed of the random stream (ignored by deterministic methods)
     */
    ProbabilityBest estimate(List<? extends Posterior> posteriors, long seed);
}
