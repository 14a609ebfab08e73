package dev.runoff.engine.best;

import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.special.IncompleteBeta;
import dev.runoff.engine.special.CachedIncompleteBeta;
import org.apache.commons.rng.UniformRandomProvider;

/**
 * A Beta posterior as seen by one exact integration of engine version 1.3: the same distribution, with
 * its log density and log tails inside {@code (0, 1)} from a {@link CachedIncompleteBeta} (Taylor steps
 * between increasing points, one kernel per point for the density and the tail). Not thread-safe: made
 * afresh for each integration.
 */
final class CachedBeta implements Posterior {
    private final BetaPosterior beta;
    private final CachedIncompleteBeta table;

    CachedBeta(BetaPosterior beta) {
        this.beta = beta;
        this.table = new CachedIncompleteBeta(new IncompleteBeta(beta.a(), beta.b()));
    }

    /** The posterior this evaluates. */
    BetaPosterior beta() {
        return beta;
    }

    /** Wraps each Beta posterior; other posteriors are kept as they are. */
    static Posterior of(Posterior p) {
        return p instanceof BetaPosterior b ? new CachedBeta(b) : p;
    }

    @Override
    public double mean() {
        return beta.mean();
    }

    @Override
    public double variance() {
        return beta.variance();
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
        return x > 0 && x < 1 ? table.logDensity(x, 1 - x) : beta.logDensity(x);
    }

    @Override
    public double logCdf(double x) {
        return x > 0 && x < 1 ? table.logLower(x, 1 - x) : beta.logCdf(x);
    }

    @Override
    public double logSurvival(double x) {
        return x > 0 && x < 1 ? table.logUpper(x, 1 - x) : beta.logSurvival(x);
    }

    @Override
    public double quantile(double p) {
        return beta.quantile(p);
    }

    @Override
    public Sampler sampler(UniformRandomProvider rng) {
        return beta.sampler(rng);
    }
}
