package dev.runoff.engine.stopping;

/**
 * The posterior probability that the leader is within epsilon of the best arm,
 * {@code P(theta_leader >= max_{j != leader} theta_j - epsilon)}, for the indifference-zone rule.
 *
 * <p>Injected by the caller, which binds it to the current posteriors, for example
 * {@code (leader, eps) -> ExactProbabilityBest.probabilityWithin(posteriors, leader, eps)}.
 */
@FunctionalInterface
public interface LeaderConfidence {

    /**
     * The probability, in [0, 1].
     *
     * @param leader  index of the leading arm
     * @param epsilon indifference zone, {@code >= 0}
     */
    double probabilityWithin(int leader, double epsilon);
}
