/**
 * The allocation engine: plain Java, no Kafka imports.
 *
 * <p>Sub-packages, from the bottom up:
 * <ul>
 *   <li>{@code stats}: per-arm sufficient statistics that merge associatively;</li>
 *   <li>{@code special}: special functions (log incomplete beta and friends) in log space;</li>
 *   <li>{@code posterior}: priors and the marginal posterior of each arm's mean;</li>
 *   <li>{@code best}: the probability that each arm is best, exact or by Monte Carlo;</li>
 *   <li>{@code allocation}: top-two rules and the guards that turn them into serving weights.</li>
 * </ul>
 * {@link dev.runoff.engine.AllocationEngine} ties them together: every evaluation is a pure function of
 * (statistics, configuration, seed).
 */
package dev.runoff.engine;
