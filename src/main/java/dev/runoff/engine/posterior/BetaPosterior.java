package dev.runoff.engine.posterior;

import dev.runoff.engine.Checks;
import org.apache.commons.math3.distribution.BetaDistribution;
import org.apache.commons.math3.special.Beta;
import org.apache.commons.rng.UniformRandomProvider;

/**
 * Beta(a, b) posterior of a Bernoulli rate.
 *
 * @param a first shape parameter, {@code > 0}
 * @param b second shape parameter, {@code > 0}
 */
public record BetaPosterior(double a, double b) implements Posterior {

    /** Validates both parameters. */
    public BetaPosterior {
        Checks.positive("Beta posterior a", a);
        Checks.positive("Beta posterior b", b);
    }

    @Override
    public double mean() {
        return a / (a + b);
    }

    @Override
    public double variance() {
        double s = a + b;
        return a * b / (s * s * (s + 1));
    }

    @Override
    public double supportLower() {
        return 0.0;
    }

    @Override
    public double supportUpper() {
        return 1.0;
    }

    @Override
    public double logDensity(double x) {
        if (x < 0 || x > 1) {
            return Double.NEGATIVE_INFINITY;
        }
        return new BetaDistribution(null, a, b).logDensity(x);
    }

    @Override
    public double logCdf(double x) {
        if (x <= 0) {
            return Double.NEGATIVE_INFINITY;
        }
        if (x >= 1) {
            return 0.0;
        }
        return Math.log(Beta.regularizedBeta(x, a, b));
    }

    @Override
    public double logSurvival(double x) {
        if (x <= 0) {
            return 0.0;
        }
        if (x >= 1) {
            return Double.NEGATIVE_INFINITY;
        }
        return Math.log(Beta.regularizedBeta(1 - x, b, a));
    }

    @Override
    public double quantile(double p) {
        Checks.inOpenRange("p", p, 0, 1);
        return new BetaDistribution(null, a, b).inverseCumulativeProbability(p);
    }

    @Override
    public Sampler sampler(UniformRandomProvider rng) {
        return Samplers.beta(rng, a, b);
    }
}
