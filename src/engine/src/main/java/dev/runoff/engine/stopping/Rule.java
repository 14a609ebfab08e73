package dev.runoff.engine.stopping;

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
    INDIFFERENCE
}
