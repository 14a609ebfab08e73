package dev.runoff.engine.stopping;

import dev.runoff.engine.core.Checks;

/**
 * Kullback-Leibler divergences of the one-parameter families used by the engine, and the pairwise
 * "transportation" cost built from them.
 *
 * <p>The pairwise cost of arms a and b with weights (or counts) w_a, w_b is
 * {@code inf_m [w_a d(mu_a, m) + w_b d(mu_b, m)]}: the price of moving both means to a common value m. With
 * counts as weights it is the GLR statistic Z_{a,b} of Garivier &amp; Kaufmann (2016), section 3; with
 * weights it is the term inside the characteristic time T*(mu) of their Theorem 1. For Bernoulli arms the
 * minimiser is the weighted mean; for Gaussian arms with known variances it is the precision-weighted mean,
 * and the cost has the closed form {@code (mu_a - mu_b)^2 / (2 (var_a / w_a + var_b / w_b))}.
 */
public final class Divergence {
    private Divergence() {
    }

    /**
     * {@code KL(Bernoulli(p), Bernoulli(q)) = p log(p/q) + (1-p) log((1-p)/(1-q))}, with {@code 0 log 0 = 0};
     * infinite when q is 0 or 1 and differs from p.
     *
     * @param p first rate, in [0, 1]
     * @param q second rate, in [0, 1]
     */
    public static double bernoulli(double p, double q) {
        Checks.inClosedRange("Bernoulli rate p", p, 0, 1);
        Checks.inClosedRange("Bernoulli rate q", q, 0, 1);
        if (p == q) {
            return 0.0;
        }
        return xLogXOverY(p, q) + xLogXOverY(1 - p, 1 - q);
    }

    private static double xLogXOverY(double x, double y) {
        if (x == 0) {
            return 0.0;
        }
        return y == 0 ? Double.POSITIVE_INFINITY : x * StrictMath.log(x / y);
    }

    /**
     * {@code KL(N(mu, variance), N(lambda, variance)) = (mu - lambda)^2 / (2 variance)}.
     *
     * @param mu       first mean
     * @param lambda   second mean
     * @param variance common variance, {@code > 0}
     */
    public static double gaussian(double mu, double lambda, double variance) {
        Checks.finite("Gaussian mean mu", mu);
        Checks.finite("Gaussian mean lambda", lambda);
        Checks.positive("Gaussian variance", variance);
        double diff = mu - lambda;
        return diff * diff / (2 * variance);
    }

    /** The weighted mean {@code (w_a mu_a + w_b mu_b) / (w_a + w_b)} minimising the Bernoulli pairwise cost. */
    public static double bernoulliPairMean(double muA, double wA, double muB, double wB) {
        return (wA * muA + wB * muB) / (wA + wB);
    }

    /**
     * The precision-weighted mean {@code (w_a mu_a / var_a + w_b mu_b / var_b) / (w_a / var_a + w_b / var_b)}
     * minimising the Gaussian pairwise cost.
     */
    public static double gaussianPairMean(double muA, double varA, double wA, double muB, double varB, double wB) {
        double pa = wA / varA;
        double pb = wB / varB;
        return (pa * muA + pb * muB) / (pa + pb);
    }

    /**
     * Bernoulli pairwise cost {@code w_a d(mu_a, m) + w_b d(mu_b, m)} at the weighted mean m; 0 when either
     * weight is 0.
     *
     * @param muA rate of a, in [0, 1]
     * @param wA  weight or count of a, {@code >= 0}
     * @param muB rate of b, in [0, 1]
     * @param wB  weight or count of b, {@code >= 0}
     */
    public static double bernoulliPairCost(double muA, double wA, double muB, double wB) {
        Checks.nonNegative("weight of a", wA);
        Checks.nonNegative("weight of b", wB);
        if (wA == 0 || wB == 0) {
            return 0.0;
        }
        double m = bernoulliPairMean(muA, wA, muB, wB);
        return wA * bernoulli(muA, m) + wB * bernoulli(muB, m);
    }

    /**
     * Gaussian pairwise cost with known variances,
     * {@code (mu_a - mu_b)^2 / (2 (var_a / w_a + var_b / w_b))}; 0 when either weight is 0.
     *
     * @param muA  mean of a
     * @param varA variance of a, {@code >= 0}
     * @param wA   weight or count of a, {@code >= 0}
     * @param muB  mean of b
     * @param varB variance of b, {@code >= 0}, not 0 together with varA
     * @param wB   weight or count of b, {@code >= 0}
     */
    public static double gaussianPairCost(double muA, double varA, double wA, double muB, double varB, double wB) {
        Checks.finite("mean of a", muA);
        Checks.finite("mean of b", muB);
        Checks.nonNegative("variance of a", varA);
        Checks.nonNegative("variance of b", varB);
        Checks.nonNegative("weight of a", wA);
        Checks.nonNegative("weight of b", wB);
        if (varA == 0 && varB == 0) {
            throw new IllegalArgumentException("variances of a and b must not both be 0");
        }
        if (wA == 0 || wB == 0) {
            return 0.0;
        }
        double diff = muA - muB;
        return diff * diff / (2 * (varA / wA + varB / wB));
    }
}
