package dev.runoff.engine.guardrail;

import dev.runoff.engine.core.Checks;
import org.apache.commons.math3.special.Beta;

/**
 * A time-uniform confidence sequence for a Bernoulli rate p from {@code units} independent units of which
 * {@code hits} had the event: the set of p at which the Beta(1, 1) mixture martingale stays below 1/alpha.
 *
 * <p>Design: for a fixed p the statistic
 * {@code M_n(p) = B(h + 1, n - h + 1) / (p^h (1 - p)^(n - h))} (the marginal likelihood of the outcomes under
 * a uniform prior on the rate, over their likelihood at p) is a nonnegative martingale with mean 1 under p,
 * the method of mixtures of Robbins (1970, "Statistical methods related to the law of the iterated
 * logarithm", Ann. Math. Statist. 41). Equivalently it is the prior-to-posterior density ratio at p, the
 * construction of Waudby-Smith and Ramdas (2020, "Confidence sequences for sampling without replacement",
 * NeurIPS, Section 2) in the with-replacement case. Ville's inequality bounds the probability that it ever
 * reaches 1/alpha by alpha, so {@code C_n = {p : M_n(p) < 1/alpha}} contains the true rate at every n at
 * once with probability at least 1 - alpha: a confidence sequence in the sense of Howard, Ramdas, McAuliffe
 * and Sekhon (2021, "Time-uniform, nonparametric, nonasymptotic confidence sequences", Ann. Statist. 49(2)).
 * {@code log M_n} is convex in p with its minimum (at most 0) at h / n, so C_n is an interval around h / n;
 * its ends are found by bisection in log space (deterministic, StrictMath only).
 */
public final class RateSequence {

    private static final int BISECTIONS = 200;

    private RateSequence() {
    }

    /**
     * The interval {@code [lower, upper]} of the confidence sequence at level {@code 1 - alpha}.
     *
     * @throws IllegalArgumentException when {@code units < 0}, {@code hits} is outside [0, units] or
     *                                  {@code alpha} is outside (0, 1)
     */
    public static Bounds bounds(long units, long hits, double alpha) {
        if (hits < 0 || hits > units) {
            Checks.nonNegative("units", units);
            throw new IllegalArgumentException("hits must be in [0, units=" + units + "], got " + hits);
        }
        return meanBounds(units, hits, alpha);
    }

    /**
     * The interval of the confidence sequence at level {@code 1 - alpha} for the mean of observations in
     * [0, 1] whose sum over {@code units} observations is {@code total}; for 0/1 observations it is
     * {@link #bounds(long, long, double)} with {@code hits = total}.
     *
     * <p>Why the same set covers the mean of any observations in [0, 1], not only 0/1 ones: for x in [0, 1]
     * and a, b > 0, {@code a^x b^(1 - x) = exp(x log a + (1 - x) log b)} is convex in x, so it lies below its
     * chord {@code x a + (1 - x) b} (the convexity step of the proof of Hoeffding's lemma, as read in the
     * Wikipedia article "Hoeffding's lemma"; the lemma is Hoeffding's, 1963, JASA 58, not read). With a = p / m and
     * b = (1 - p) / (1 - m), for an observation X in [0, 1] of mean m the likelihood-ratio factor
     * {@code (p / m)^X ((1 - p) / (1 - m))^(1 - X)} therefore has expectation at most
     * {@code m p / m + (1 - m) (1 - p) / (1 - m) = 1}, given the past. The product of the factors is
     * {@code p^s (1 - p)^(n - s) / (m^s (1 - m)^(n - s))} with s the running sum, a nonnegative
     * supermartingale for every p with initial value 1; its mixture over p ~ Beta(1, 1) is
     * {@code M_n(m) = B(s + 1, n - s + 1) / (m^s (1 - m)^(n - s))}, the statistic above with s in place of h,
     * again a nonnegative supermartingale with initial value 1 (by Fubini, the mixture of supermartingales is
     * one). Ville's inequality bounds by alpha the chance that it ever reaches
     * 1/alpha, so {p : M_n(p) < 1/alpha} covers m at every n at once with probability at least 1 - alpha.
     * The Beta function and the likelihood take non-integer s as they are; nothing is rounded.
     *
     * @throws IllegalArgumentException when {@code units < 0}, {@code total} is not a finite number in
     *                                  [0, units] or {@code alpha} is outside (0, 1)
     */
    public static Bounds meanBounds(long units, double total, double alpha) {
        Checks.nonNegative("units", units);
        if (!(total >= 0 && total <= units)) {
            throw new IllegalArgumentException("total must be in [0, units=" + units + "], got " + total);
        }
        Checks.inOpenRange("alpha", alpha, 0, 1);
        if (units == 0) {
            return new Bounds(0, 1);
        }
        double threshold = -StrictMath.log(alpha);
        double logMarginal = Beta.logBeta(total + 1.0, units - total + 1.0);
        double centre = total / units;
        double lower = total == 0 ? 0 : root(units, total, logMarginal, threshold, 0, centre);
        double upper = total == units ? 1 : root(units, total, logMarginal, threshold, 1, centre);
        return new Bounds(lower, upper);
    }

    /** {@code log M_n(p)}; +infinity at an end where the likelihood is 0. */
    static double logMartingale(long units, double hits, double logMarginal, double p) {
        double logLikelihood = (hits == 0 ? 0 : hits * StrictMath.log(p))
                + (hits == units ? 0 : (units - hits) * StrictMath.log1p(-p));
        return logMarginal - logLikelihood;
    }

    /** Bisection between {@code outside} (where log M is above the threshold) and {@code inside}. */
    private static double root(long units, double hits, double logMarginal, double threshold, double outside,
                               double inside) {
        double out = outside;
        double in = inside;
        for (int i = 0; i < BISECTIONS; i++) {
            double mid = 0.5 * (out + in);
            if (mid == out || mid == in) {
                break;
            }
            if (logMartingale(units, hits, logMarginal, mid) >= threshold) {
                out = mid;
            } else {
                in = mid;
            }
        }
        return in;
    }

    /**
     * Ends of the interval, {@code 0 <= lower <= upper <= 1}.
     *
     * @param lower the smallest rate in the interval
     * @param upper the largest rate in the interval
     */
    public record Bounds(double lower, double upper) {
    }
}
