package dev.runoff.engine.best;

import dev.runoff.engine.posterior.Posterior;
import org.apache.commons.rng.UniformRandomProvider;

/**
 * The distribution of {@code -X} for a posterior of {@code X}. With {@code X = 1 - theta ~ Beta(b, a)} for
 * {@code theta ~ Beta(a, b)}, {@code -X = theta - 1}: the same arm shifted by the constant 1, so it has the
 * same probability of being best, but the end {@code theta = 1} becomes {@code 0}, where doubles are dense
 * (spacing 1e-300 and below instead of 1.1e-16). {@link ExactProbabilityBest} integrates the upper half of
 * Beta supports in these coordinates. All functions are evaluated on {@code X} directly, with no rounding of
 * {@code 1 - x}.
 */
final class Reflected implements Posterior {
    private final Posterior inner;

    Reflected(Posterior inner) {
        this.inner = inner;
    }

    /** The posterior of {@code X}. */
    Posterior inner() {
        return inner;
    }

    @Override
    public double mean() {
        return -inner.mean();
    }

    @Override
    public double variance() {
        return inner.variance();
    }

    @Override
    public double supportLower() {
        return -inner.supportUpper();
    }

    @Override
    public double supportUpper() {
        return -inner.supportLower();
    }

    @Override
    public double logDensity(double x) {
        return inner.logDensity(-x);
    }

    @Override
    public double logCdf(double x) {
        return inner.logSurvival(-x);
    }

    @Override
    public double logSurvival(double x) {
        return inner.logCdf(-x);
    }

    @Override
    public double quantile(double p) {
        return -inner.quantile(1 - p);
    }

    @Override
    public Sampler sampler(UniformRandomProvider rng) {
        Sampler s = inner.sampler(rng);
        return () -> -s.draw();
    }
}
