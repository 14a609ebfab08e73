package dev.runoff.engine.posterior;

import dev.runoff.engine.core.Checks;
import dev.runoff.engine.stats.ArmStats;
import dev.runoff.engine.stats.BernoulliStats;

/**
 * Beta(a, b) prior on a Bernoulli rate; the posterior after s successes in n trials is
 * Beta(a + s, b + n - s) (conjugacy, e.g. Gelman et al., "Bayesian Data Analysis", 3rd ed., section 2.4).
 *
 * @param a prior successes, {@code > 0}
 * @param b prior failures, {@code > 0}
 */
public record BetaPrior(double a, double b) implements Prior {

    /** The uniform prior Beta(1, 1). */
    public static final BetaPrior UNIFORM = new BetaPrior(1.0, 1.0);

    /** Validates both parameters. */
    public BetaPrior {
        Checks.positive("prior a", a);
        Checks.positive("prior b", b);
    }

    @Override
    public BetaPosterior posterior(ArmStats stats) {
        if (!(stats instanceof BernoulliStats s)) {
            throw new IllegalArgumentException("a Beta prior needs Bernoulli statistics, got " + stats);
        }
        return new BetaPosterior(a + s.successes(), b + s.failures());
    }
}
