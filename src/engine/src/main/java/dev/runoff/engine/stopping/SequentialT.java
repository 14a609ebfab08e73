package dev.runoff.engine.stopping;

import dev.runoff.engine.core.Arm;
import dev.runoff.engine.core.Checks;
import dev.runoff.engine.core.Metric;
import dev.runoff.engine.stats.ValueStats;
import java.util.List;

/**
 * Anytime-valid t confidence sequences for each value arm's mean, with the variance unknown, behind
 * {@link Rule#SEQUENTIAL_T}.
 *
 * <p>Design (the construction Wang &amp; Ramdas 2024, "Anytime-valid t-tests and confidence sequences for
 * Gaussian means with unknown variance", arXiv 2310.03722, build from Lai 1976, with a Gaussian instead of a
 * flat mixture over the standardised mean): for observations {@code x_1..x_n} of one arm and a candidate mean
 * m, let {@code S = sum (x_i - m)} and {@code V = sum (x_i - m)^2}. Mixing the likelihood ratio of
 * {@code theta = (mean - m) / sigma} against {@code theta = 0} over sigma with the right Haar measure
 * {@code d sigma / sigma} (which makes it a function of the scale-invariant part of the data only) and over
 * {@code theta ~ N(0, 1 / c^2)} gives
 * <pre>G_n(m) = sqrt(c^2 / (n + c^2)) ((n + c^2) V / ((n + c^2) V - S^2))^(n / 2),</pre>
 * a nonnegative martingale with mean 1 under every N(m, sigma^2), whatever sigma, with respect to the
 * scale-invariant data (the derivation is written out in src/docs/planning-and-stopping.md). By Ville's
 * inequality {@code P(exists n: G_n(m) >= 1 / alpha) <= alpha}, so {@code C_n = {m : G_n(m) < 1 / alpha}} is a
 * confidence sequence: it holds at every n at once with probability at least {@code 1 - alpha}. In terms of
 * the sufficient statistics, with {@code d = mean - m} and M2 the sum of squared deviations,
 * {@code log G_n(m) = log(c^2 / (n + c^2)) / 2 + (n / 2) log(1 + n^2 d^2 / ((n + c^2) M2 + n c^2 d^2))}; it
 * grows with |d| towards {@code ((n + c^2) / c^2)^((n - 1) / 2)}, so {@code C_n} is the whole line until that
 * bound passes {@code 1 / alpha} (from 9 observations at alpha = 0.001 / 4), and then the interval
 * {@code mean +- r} with {@code r^2 = (1 - p)(n + c^2) M2 / (n (p (n + c^2) - c^2))},
 * {@code p = (alpha^2 c^2 / (n + c^2))^(1 / n)}.
 *
 * <p>The rule: each of the K arms gets such a sequence at level {@code alpha = delta / K}. The empirical
 * leader a is named when its sequence lies above every other arm's. The statistic is
 * {@code min_{b != a} min_m max(log G_a(m), log G_b(m))} (the two sequences are disjoint exactly when no m is
 * in both, i.e. when this reaches {@code log(1 / alpha)}); the threshold is {@code log(K / delta)}.
 *
 * <p>Why the error probability is at most delta for Gaussian arms and every fixed truth, under any adaptive
 * sampling and a check after every observation: each arm's own observations, in the order that arm receives
 * them, are i.i.d. N(mu, sigma^2) whatever rule chose when to sample it (the "stack of rewards" model,
 * Lattimore &amp; Szepesvari 2020, "Bandit Algorithms", section 4.6, numbering from memory), and each sequence
 * holds at every n of its own arm at once, so it holds at whatever count the arm has when the rule looks. With
 * probability at least {@code 1 - delta} all K sequences hold (union bound); then the named arm's mean is above
 * every other mean.
 * Not proven for values that are not Gaussian (the martingale property needs the Gaussian likelihood).
 */
public final class SequentialT {
    /**
     * {@code c^2}, the precision of the Gaussian mixture over the standardised mean {@code (mean - m) / sigma}:
     * 1, a prior that puts standardised effects of order 1 at the centre. A fixed constant, so the threshold
     * does not depend on the data (a choice, not tuned to the instances measured in the docs).
     */
    public static final double PRIOR_PRECISION = 1.0;
    private static final int BISECTIONS = 200;

    private SequentialT() {
    }

    /**
     * {@code log G_n(m)} for one arm's statistics and a candidate mean.
     *
     * @param s the arm's count, mean and M2; count {@code >= 1}
     * @param m the candidate mean, finite
     */
    public static double logMartingale(ValueStats s, double m) {
        if (s.count() < 1) {
            throw new IllegalArgumentException("the t confidence sequence needs at least 1 observation, got "
                    + s.count());
        }
        Checks.finite("candidate mean", m);
        double n = s.count();
        double c2 = PRIOR_PRECISION;
        double d = s.mean() - m;
        // n^2 d^2 / ((n + c^2) M2 + n c^2 d^2), divided through by d^2 so that no square of d overflows
        double growth = d == 0 ? 0.0 : n * n / ((n + c2) * (s.m2() / d / d) + n * c2);
        return 0.5 * StrictMath.log(c2 / (n + c2)) + 0.5 * n * StrictMath.log1p(growth);
    }

    /**
     * The half-width r of the sequence at level alpha: {@code C_n = [mean - r, mean + r]}, or positive
     * infinity while {@code C_n} is the whole line.
     *
     * @param s     the arm's count, mean and M2; count {@code >= 1}
     * @param alpha error probability of this sequence, in (0, 1)
     */
    public static double radius(ValueStats s, double alpha) {
        Checks.inOpenRange("alpha", alpha, 0, 1);
        if (s.count() < 1) {
            throw new IllegalArgumentException("the t confidence sequence needs at least 1 observation, got "
                    + s.count());
        }
        double n = s.count();
        double c2 = PRIOR_PRECISION;
        double p = StrictMath.exp((2 * StrictMath.log(alpha) + StrictMath.log(c2 / (n + c2))) / n);
        double denominator = p * (n + c2) - c2;
        if (!(denominator > 0)) {
            return Double.POSITIVE_INFINITY;
        }
        return StrictMath.sqrt((1 - p) * (n + c2) * s.m2() / (n * denominator));
    }

    /**
     * The statistic for these arms: {@code min_{b != a} min_m max(log G_a(m), log G_b(m))} for the empirical
     * leader a (largest mean among arms with observations, lowest index on ties; arm 0 if none has any). A
     * pair with an arm without observations contributes {@code 0} ({@code G = 1}: no evidence).
     *
     * @param arms at least two arms with value statistics
     * @throws IllegalArgumentException for Bernoulli statistics
     */
    public static Glr.Statistic statistic(List<Arm> arms) {
        if (Glr.metricOf(arms) != Metric.VALUE) {
            throw new IllegalArgumentException("the sequential-t rule is defined for value arms only, got "
                    + Metric.BERNOULLI + " statistics");
        }
        return Glr.minOverChallengers(arms, Metric.VALUE, Glr.empiricalLeader(arms, Metric.VALUE),
                (a, b) -> separation((ValueStats) a, (ValueStats) b));
    }

    /**
     * {@code min_m max(log G_a(m), log G_b(m))} for arms with {@code mean_a >= mean_b}: the largest
     * {@code log(1 / alpha)} at which the two sequences are disjoint. Between the means {@code log G_a}
     * falls and {@code log G_b} rises with m, and outside both rise, so the minimum of the larger one is where
     * they cross (or at an end of {@code [mean_b, mean_a]}); found by bisection.
     */
    static double separation(ValueStats a, ValueStats b) {
        if (a.count() == 0 || b.count() == 0) {
            return 0.0;
        }
        double lo = b.mean();
        double hi = a.mean();
        if (logMartingale(a, lo) <= logMartingale(b, lo)) {
            return logMartingale(b, lo);
        }
        if (logMartingale(a, hi) >= logMartingale(b, hi)) {
            return logMartingale(a, hi);
        }
        for (int i = 0; i < BISECTIONS; i++) {
            double mid = lo + (hi - lo) / 2;
            if (mid <= lo || mid >= hi) {
                break;
            }
            if (logMartingale(a, mid) > logMartingale(b, mid)) {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        return Math.min(Math.max(logMartingale(a, lo), logMartingale(b, lo)),
                Math.max(logMartingale(a, hi), logMartingale(b, hi)));
    }

    /**
     * The threshold {@code log(K / delta)}: each of the K sequences at level {@code delta / K}.
     *
     * @param arms  number of arms K, {@code >= 2}
     * @param delta error probability, in (0, 1)
     */
    public static double threshold(int arms, double delta) {
        if (arms < 2) {
            throw new IllegalArgumentException("number of arms must be >= 2, got " + arms);
        }
        Checks.inOpenRange("delta", delta, 0, 1);
        return StrictMath.log(arms / delta);
    }
}
