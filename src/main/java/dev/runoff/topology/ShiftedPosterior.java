package dev.runoff.topology;

import dev.runoff.engine.posterior.Posterior;
import java.util.Objects;
import org.apache.commons.rng.UniformRandomProvider;

/**
 * The distribution of {@code theta + shift} when {@code theta} follows {@code base}: every function is the
 * base's evaluated at {@code x - shift}.
 *
 * @param base  the posterior of theta
 * @param shift the constant added, finite
 */
record ShiftedPosterior(Posterior base, double shift) implements Posterior {

    /** Checks that the base is present and the shift finite. */
    ShiftedPosterior {
        Objects.requireNonNull(base, "base");
        if (!Double.isFinite(shift)) {
            throw new IllegalArgumentException("shift must be finite, got " + shift);
        }
    }

    @Override
    public double mean() {
        return base.mean() + shift;
    }

    @Override
    public double variance() {
        return base.variance();
    }

    @Override
    public double supportLower() {
        return base.supportLower() + shift;
    }

    @Override
    public double supportUpper() {
        return base.supportUpper() + shift;
    }

    @Override
    public double logDensity(double x) {
        return base.logDensity(x - shift);
    }

    @Override
    public double logCdf(double x) {
        return base.logCdf(x - shift);
    }

    @Override
    public double logSurvival(double x) {
        return base.logSurvival(x - shift);
    }

    @Override
    public double quantile(double p) {
        return base.quantile(p) + shift;
    }

    @Override
    public Sampler sampler(UniformRandomProvider rng) {
        Sampler inner = base.sampler(rng);
        return () -> inner.draw() + shift;
    }
}
