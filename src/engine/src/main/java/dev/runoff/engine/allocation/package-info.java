/**
 * Allocation rules and guards: how the probability that each arm is best becomes the traffic split that
 * serving tiers follow for one period.
 *
 * <p>{@link dev.runoff.engine.allocation.AllocationMethod} names the rules (top-two Thompson sampling in
 * closed form, top-two probability, value and expected-improvement sampling, uniform, and top-two Thompson
 * sampling with an adaptive leader share); {@link dev.runoff.engine.allocation.TopTwo} and
 * {@link dev.runoff.engine.allocation.InformationDirected} compute them as pure functions;
 * {@link dev.runoff.engine.allocation.Guards} describes warm-up, floor, control share and the per-period
 * cap, applied in a fixed, documented order. Every weight vector that leaves this package is non-negative
 * and sums to 1.
 */
package dev.runoff.engine.allocation;
