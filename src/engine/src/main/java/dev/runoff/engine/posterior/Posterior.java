package dev.runoff.engine.posterior;

import org.apache.commons.rng.UniformRandomProvider;

/**
 * Marginal posterior distribution of one arm's mean parameter (a Bernoulli rate, or the mean of a value
 * metric). All probabilities are offered in log space so that tails far below double precision's
 * {@code 1 - x} resolution stay accurate.
 */
public interface Posterior {

    /** Posterior mean. */
    double mean();

    /** Posterior variance. */
    double variance();

    /** Lower end of the support ({@code 0} for Beta, {@code -infinity} for Student-t). */
    double supportLower();

    /** Upper end of the support ({@code 1} for Beta, {@code +infinity} for Student-t). */
    double supportUpper();

    /** Natural log of the density at {@code x}; {@code -infinity} outside the support. */
    double logDensity(double x);

    /** Natural log of {@code P(theta <= x)}. */
    double logCdf(double x);

    /** Natural log of {@code P(theta > x)}, computed without forming {@code 1 - cdf}. */
    double logSurvival(double x);

    /** The {@code p}-quantile, for {@code 0 < p < 1}. */
    double quantile(double p);

    /**
     * A sampler of this posterior drawing from {@code rng}. Samplers are not thread-safe; the sequence of
     * draws is a pure function of the posterior and the generator's state.
     */
    Sampler sampler(UniformRandomProvider rng);

    /** Draws independent values of the posterior. */
    @FunctionalInterface
    interface Sampler {
        /** One draw. */
        double draw();
    }
}
