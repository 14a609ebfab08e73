/**
 * Stopping rules: when an experiment may end, and with which arm.
 *
 * <p>{@link dev.runoff.engine.stopping.StoppingCheck#decide} turns arm statistics, the probability that each
 * arm is best and the experiment's timing into a {@link dev.runoff.engine.stopping.Verdict} (CONTINUE or
 * STOP, with the statistic, threshold, leader's confidence and guard state behind it), under a validated
 * {@link dev.runoff.engine.stopping.StoppingConfig}. The rules ({@link dev.runoff.engine.stopping.Rule}):
 * <ul>
 *   <li>GLR (Chernoff), the default: its threshold is proven delta-correct for a fixed truth, under any
 *       sampling rule and continuous monitoring, for rates (Garivier &amp; Kaufmann 2016); for values it plugs
 *       sample variances into a known-variance threshold and is not proven;</li>
 *   <li>GLR against a lighter threshold: NOT PROVEN;</li>
 *   <li>mixture: a per-pair mixture-martingale test for rates, proven;</li>
 *   <li>sequential t: per-arm anytime-valid t confidence sequences for values, proven for Gaussian arms;</li>
 *   <li>posterior probability: the lower confidence bound of max alpha reaches 1 - delta; calibrated only on
 *       average over the prior;</li>
 *   <li>indifference zone: P(leader within epsilon of the best) reaches 1 - delta, so near-ties end.</li>
 * </ul>
 * Time is passed in as instants ({@link dev.runoff.engine.stopping.Timing}); nothing here reads a clock.
 * Pure math, no Kafka imports.
 */
package dev.runoff.engine.stopping;
