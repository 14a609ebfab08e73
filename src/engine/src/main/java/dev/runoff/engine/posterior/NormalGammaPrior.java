package dev.runoff.engine.posterior;

import dev.runoff.engine.core.Checks;
import dev.runoff.engine.stats.ArmStats;
import dev.runoff.engine.stats.ValueStats;

/**
 * Normal-Gamma prior on the mean and precision of a value metric. After n observations with mean xbar and
 * sum of squared deviations M2 the posterior is Normal-Gamma with
 * <pre>
 *   kappa_n = kappa0 + n
 *   mu_n    = (kappa0 * mu0 + n * xbar) / kappa_n
 *   alpha_n = alpha0 + n / 2
 *   beta_n  = beta0 + M2 / 2 + kappa0 * n * (xbar - mu0)^2 / (2 * kappa_n)
 * </pre>
 * and the marginal posterior of the mean is a Student-t with {@code 2 alpha_n} degrees of freedom, location
 * {@code mu_n} and scale {@code sqrt(beta_n / (alpha_n kappa_n))} (Murphy 2007, "Conjugate Bayesian
 * analysis of the Gaussian distribution", equations 85-89 and 110).
 *
 * @param mu0    prior mean
 * @param kappa0 prior pseudo-observations for the mean, {@code > 0}
 * @param alpha0 shape of the Gamma prior on the precision, {@code > 0}
 * @param beta0  rate of the Gamma prior on the precision, {@code > 0}
 */
public record NormalGammaPrior(double mu0, double kappa0, double alpha0, double beta0) implements Prior {

    /**
     * A weak default: centred at 0 with the weight of a thousandth of an observation on the mean and one
     * observation's worth on the variance; after a few dozen observations the data dominate.
     */
    public static final NormalGammaPrior WEAK = new NormalGammaPrior(0.0, 1e-3, 1.0, 1e-3);

    /** Validates all four parameters. */
    public NormalGammaPrior {
        Checks.finite("prior mu0", mu0);
        Checks.positive("prior kappa0", kappa0);
        Checks.positive("prior alpha0", alpha0);
        Checks.positive("prior beta0", beta0);
    }

    @Override
    public StudentTPosterior posterior(ArmStats stats) {
        if (!(stats instanceof ValueStats s)) {
            throw new IllegalArgumentException("a Normal-Gamma prior needs value statistics, got " + stats);
        }
        double n = s.count();
        double kappaN = kappa0 + n;
        double muN = (kappa0 * mu0 + n * s.mean()) / kappaN;
        double alphaN = alpha0 + n / 2.0;
        double dev = s.mean() - mu0;
        double betaN = beta0 + s.m2() / 2.0 + kappa0 * n * dev * dev / (2.0 * kappaN);
        return new StudentTPosterior(muN, Math.sqrt(betaN / (alphaN * kappaN)), 2.0 * alphaN);
    }
}
