package dev.runoff.engine.stopping;

import dev.runoff.engine.best.ExactProbabilityBest;
import dev.runoff.engine.posterior.Posterior;
import java.util.List;

/**
 * The indifference-zone confidence {@code P(theta_leader >= max_{j != leader} theta_j - epsilon)} for
 * independent posteriors, computed exactly by {@link ExactProbabilityBest#probabilityWithin}, which integrates
 * {@code f_leader(x) prod_{j != leader} F_j(x + epsilon)} for the leader's arm only.
 */
public final class LeaderWithin {

    private LeaderWithin() {
    }

    /** A {@link LeaderConfidence} bound to {@code posteriors} (in arm order). */
    public static LeaderConfidence of(List<? extends Posterior> posteriors) {
        List<Posterior> fixed = List.copyOf(posteriors);
        return (leader, epsilon) -> probability(fixed, leader, epsilon);
    }

    /**
     * {@code P(theta_leader >= max_{j != leader} theta_j - epsilon)}.
     *
     * @param posteriors at least two independent posteriors
     * @param leader     index of the leading arm
     * @param epsilon    indifference zone, finite and {@code >= 0}
     * @return the probability, in {@code [0, 1]}
     */
    public static double probability(List<? extends Posterior> posteriors, int leader, double epsilon) {
        if (leader < 0 || leader >= posteriors.size()) {
            throw new IllegalArgumentException("leader must be an arm index in [0, " + posteriors.size()
                    + "), got " + leader);
        }
        if (!(epsilon >= 0) || !Double.isFinite(epsilon)) {
            throw new IllegalArgumentException("epsilon must be finite and >= 0, got " + epsilon);
        }
        return ExactProbabilityBest.probabilityWithin(posteriors, leader, epsilon);
    }
}
