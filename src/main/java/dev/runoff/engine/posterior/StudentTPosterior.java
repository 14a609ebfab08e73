package dev.runoff.engine.posterior;

import dev.runoff.engine.Checks;
import org.apache.commons.math3.distribution.TDistribution;
import org.apache.commons.rng.UniformRandomProvider;

/**
 * Location-scale Student-t posterior of the mean of a value metric.
 *
 * @param location location (the posterior mean when {@code dof > 1})
 * @param scale    scale, {@code > 0}
 * @param dof      degrees of freedom, {@code > 0}
 */
public record StudentTPosterior(double location, double scale, double dof) implements Posterior {

    /** Validates the three parameters. */
    public StudentTPosterior {
        Checks.finite("Student-t location", location);
        Checks.positive("Student-t scale", scale);
        Checks.positive("Student-t degrees of freedom", dof);
    }

    @Override
    public double mean() {
        return dof > 1 ? location : Double.NaN;
    }

    @Override
    public double variance() {
        if (dof > 2) {
            return scale * scale * dof / (dof - 2);
        }
        return dof > 1 ? Double.POSITIVE_INFINITY : Double.NaN;
    }

    @Override
    public double supportLower() {
        return Double.NEGATIVE_INFINITY;
    }

    @Override
    public double supportUpper() {
        return Double.POSITIVE_INFINITY;
    }

    private TDistribution standard() {
        return new TDistribution(null, dof);
    }

    @Override
    public double logDensity(double x) {
        return standard().logDensity((x - location) / scale) - Math.log(scale);
    }

    @Override
    public double logCdf(double x) {
        return Math.log(standard().cumulativeProbability((x - location) / scale));
    }

    @Override
    public double logSurvival(double x) {
        return Math.log(standard().cumulativeProbability((location - x) / scale));
    }

    @Override
    public double quantile(double p) {
        Checks.inOpenRange("p", p, 0, 1);
        return location + scale * standard().inverseCumulativeProbability(p);
    }

    @Override
    public Sampler sampler(UniformRandomProvider rng) {
        return Samplers.studentT(rng, location, scale, dof);
    }
}
