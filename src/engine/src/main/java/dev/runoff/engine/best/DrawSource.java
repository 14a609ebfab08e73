package dev.runoff.engine.best;

import dev.runoff.engine.posterior.Posterior;
import org.apache.commons.rng.UniformRandomProvider;

/**
 * How a Monte Carlo estimator turns a posterior and a seeded generator into a stream of draws. The draws of
 * one engine version must never change, so each version names the source it uses.
 */
@FunctionalInterface
public interface DrawSource {

    /** The posterior's own exact sampler ({@link Posterior#sampler}): the draws of engine version 1.2. */
    DrawSource POSTERIOR = Posterior::sampler;

    /**
     * A sampler of {@code posterior} drawing from {@code rng}; the sequence of draws must be a pure function of
     * the posterior and the generator's state.
     */
    Posterior.Sampler sampler(Posterior posterior, UniformRandomProvider rng);
}
