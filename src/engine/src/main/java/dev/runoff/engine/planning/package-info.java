/**
 * Planning before an experiment starts: how traffic should ideally be split between arms and how many
 * trials identifying the best arm will take.
 *
 * <p>{@link dev.runoff.engine.planning.ArmModel} holds assumed arm means (Bernoulli rates, or Gaussian means
 * with known variances); {@link dev.runoff.engine.planning.OptimalAllocation} computes the optimal weights
 * w*(mu) and the characteristic time T*(mu) of Garivier &amp; Kaufmann (2016), the beta-optimal weights of
 * Russo (2020) and the uniform split, each as a {@link dev.runoff.engine.planning.TargetAllocation};
 * {@link dev.runoff.engine.planning.PosteriorRates} the rates at which a split rules out the losing arms
 * (Gamma*_beta of Russo 2020, the uniform split's). Pure math, no Kafka imports.
 */
package dev.runoff.engine.planning;
