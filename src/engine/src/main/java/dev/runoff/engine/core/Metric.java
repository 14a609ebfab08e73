package dev.runoff.engine.core;

/** The kind of outcome an experiment optimises. */
public enum Metric {
    /** Success per trial (click per exposure, conversion per exposed unit): Beta-Bernoulli posteriors. */
    BERNOULLI,
    /** A real value per trial (revenue per exposure): Normal-Gamma posteriors, Student-t marginals. */
    VALUE
}
