package dev.runoff.engine.stopping;

import dev.runoff.engine.core.Metric;
import java.util.Objects;

/** The configured stopping rule. */
public enum Rule {
    /**
     * GLR (Chernoff) rule: stop when the GLR statistic exceeds a threshold (Garivier &amp; Kaufmann 2016,
     * section 3). Statistic: {@code Z(t)}; threshold: {@code beta(t, delta)}. With a
     * {@link GlrThreshold#PROVEN} threshold its error probability is at most delta for every fixed truth.
     */
    GLR,
    /**
     * Posterior probability rule: stop when a lower confidence bound of the largest probability of being
     * best reaches {@code 1 - delta} (Monte Carlo: the Wilson score bound with quantile z over the draws;
     * exact: alpha itself). Statistic: that bound; threshold:
     * {@code 1 - delta}. Its error rate is calibrated on average over the prior, NOT for a fixed truth: if
     * the prior is wrong, or for some particular true means, the error rate can exceed delta.
     */
    POSTERIOR,
    /**
     * Indifference zone: stop when {@code P(theta_leader >= max_{j != leader} theta_j - epsilon)} reaches
     * {@code 1 - delta}, so that arms within epsilon of each other cannot keep an experiment running forever.
     * Statistic: that probability; threshold: {@code 1 - delta}. Like {@link #POSTERIOR}, a posterior
     * statement: calibrated on average over the prior.
     */
    INDIFFERENCE,
    /**
     * NOT PROVEN: the GLR statistic against the lighter threshold {@code log((1 + log t) / delta)}
     * ({@link GlrThreshold#LIGHTER_NOT_PROVEN}), which Garivier &amp; Kaufmann (2016, section 6) used in their
     * experiments. It stops earlier than {@link #GLR}; no error guarantee is proven for it.
     */
    GLR_HEURISTIC,
    /**
     * Per-pair mixture-martingale test, Bernoulli arms only ({@link Mixture}): stop when, for the empirical
     * leader a and every other arm b, the Beta(1, 1) marginal likelihood of the pair over its maximum
     * likelihood under {@code mu_a <= mu_b} reaches {@code (K - 1) / delta}. Proven delta-correct for a
     * fixed truth under adaptive sampling and continuous monitoring (Ville's inequality; see {@link Mixture}).
     */
    MIXTURE,
    /**
     * Anytime-valid t confidence sequences per arm, value arms only ({@link SequentialT}): each arm's mean gets
     * a confidence sequence at level {@code delta / K} that needs no known variance; stop when the empirical
     * leader's sequence lies above every other arm's. Statistic: {@code min_b min_m max(log G_a(m),
     * log G_b(m))}; threshold: {@code log(K / delta)}. Proven delta-correct for Gaussian arms and a fixed
     * truth under adaptive sampling and continuous monitoring; not for values that are not Gaussian.
     */
    SEQUENTIAL_T;

    /**
     * Whether the rule's error probability is proven to be at most delta for every fixed truth, under
     * adaptive sampling and continuous monitoring, for arms of this metric. GLR on value arms uses a threshold
     * proven for known variances with sample variances plugged in, so it is not counted as proven there.
     */
    public boolean provenFor(Metric metric) {
        Objects.requireNonNull(metric, "metric");
        return switch (this) {
            case GLR -> metric == Metric.BERNOULLI;
            case MIXTURE -> metric == Metric.BERNOULLI;
            case SEQUENTIAL_T -> metric == Metric.VALUE;
            case POSTERIOR, INDIFFERENCE, GLR_HEURISTIC -> false;
        };
    }

    /**
     * Whether the rule accepts arms of this metric ({@link #MIXTURE} is for Bernoulli arms only,
     * {@link #SEQUENTIAL_T} for value arms only).
     */
    public boolean supports(Metric metric) {
        Objects.requireNonNull(metric, "metric");
        return switch (this) {
            case MIXTURE -> metric == Metric.BERNOULLI;
            case SEQUENTIAL_T -> metric == Metric.VALUE;
            case GLR, POSTERIOR, INDIFFERENCE, GLR_HEURISTIC -> true;
        };
    }
}
