package dev.runoff.engine.stopping;

import dev.runoff.engine.core.Arm;
import dev.runoff.engine.core.Checks;
import dev.runoff.engine.core.Metric;
import dev.runoff.engine.stats.BernoulliStats;
import java.util.List;
import org.apache.commons.math3.special.Beta;

/**
 * The per-pair mixture-martingale test for Bernoulli arms, behind {@link Rule#MIXTURE}.
 *
 * <p>For arms a and b with s successes and f failures each, the log statistic is
 * {@code log M_ab = log B(s_a + 1, f_a + 1) + log B(s_b + 1, f_b + 1) - log L_ab}: the marginal likelihood of
 * the two arms' outcome sequences under independent uniform Beta(1, 1) priors, over their largest likelihood
 * {@code L_ab} under the null hypothesis {@code mu_a <= mu_b} (the unconstrained maximum when the empirical
 * rates already satisfy it, else the likelihood at the pooled rate {@code (s_a + s_b) / (n_a + n_b)}).
 * The rule stops when {@code min_{b != a} log M_ab >= log((K - 1) / delta)} for the empirical leader a.
 *
 * <p>Why the error probability is at most delta, for every fixed truth, any adaptive sampling rule and a
 * check after every trial (the design is the mixture-martingale construction discussed by Kaufmann &amp;
 * Koolen 2021, "Mixture Martingales Revisited with Applications to Sequential Tests and Confidence Intervals",
 * JMLR 22(246); the argument is written out in src/docs/planning-and-stopping.md): let b* be the true best
 * arm and a any other arm, so the truth (mu_a, mu_b*) lies in the null of the pair (a, b*). The marginal
 * likelihood over the likelihood at the true means is a nonnegative martingale with mean 1 (the sampling
 * probabilities are the same in both and cancel), and the denominator {@code L_ab*} is at least the
 * likelihood at the truth, so {@code M_ab*} stays below that martingale. By Ville's inequality it ever
 * reaches {@code (K - 1) / delta} with probability at most {@code delta / (K - 1)}; naming a wrong arm needs
 * one of the K - 1 pairs (a, b*) to reach it, so the error probability is at most delta.
 *
 * <p>Only the empirical leader can fire: when {@code rate_a <= rate_b} the null's maximum is the unconstrained
 * one and the marginal likelihood is below it, so {@code log M_ab <= 0}.
 */
public final class Mixture {
    private Mixture() {
    }

    /**
     * The statistic for these arms: {@code min_{b != a} log M_ab} for the empirical leader a (the largest
     * rate among arms with trials, lowest index on ties; arm 0 if none has trials).
     *
     * @param arms at least two arms with Bernoulli statistics
     * @throws IllegalArgumentException for value statistics
     */
    public static Glr.Statistic statistic(List<Arm> arms) {
        if (Glr.metricOf(arms) != Metric.BERNOULLI) {
            throw new IllegalArgumentException("the mixture rule is defined for Bernoulli arms only, got "
                    + Metric.VALUE + " statistics");
        }
        return Glr.minOverChallengers(arms, Metric.BERNOULLI, Glr.empiricalLeader(arms, Metric.BERNOULLI),
                (a, b) -> logRatio((BernoulliStats) a, (BernoulliStats) b));
    }

    /**
     * {@code log M_ab}: the log of the Beta(1, 1) marginal likelihood of both arms over their largest
     * likelihood under {@code mu_a <= mu_b}.
     */
    public static double logRatio(BernoulliStats a, BernoulliStats b) {
        double marginal = logMarginal(a) + logMarginal(b);
        long sa = a.successes();
        long fa = a.trials() - sa;
        long sb = b.successes();
        long fb = b.trials() - sb;
        double constrained = a.rate() <= b.rate() || a.trials() == 0 || b.trials() == 0
                ? logMaxLikelihood(sa, fa) + logMaxLikelihood(sb, fb)
                : logMaxLikelihood(sa + sb, fa + fb);
        return marginal - constrained;
    }

    /**
     * The threshold {@code log((K - 1) / delta)}, the same at every t.
     *
     * @param arms  number of arms K, {@code >= 2}
     * @param delta error probability, in (0, 1)
     */
    public static double threshold(int arms, double delta) {
        if (arms < 2) {
            throw new IllegalArgumentException("number of arms must be >= 2, got " + arms);
        }
        Checks.inOpenRange("delta", delta, 0, 1);
        return StrictMath.log((arms - 1) / delta);
    }

    /** {@code log B(s + 1, f + 1)}: the probability of one sequence with s successes and f failures under Beta(1, 1). */
    private static double logMarginal(BernoulliStats s) {
        return Beta.logBeta(s.successes() + 1.0, s.trials() - s.successes() + 1.0);
    }

    /** {@code s log(s / n) + f log(f / n)}, with {@code 0 log 0 = 0}. */
    private static double logMaxLikelihood(long s, long f) {
        double n = (double) s + f;
        return xLogRatio(s, n) + xLogRatio(f, n);
    }

    private static double xLogRatio(long x, double n) {
        return x == 0 ? 0.0 : x * StrictMath.log(x / n);
    }
}
