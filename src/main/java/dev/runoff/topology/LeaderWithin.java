package dev.runoff.topology;

import dev.runoff.engine.best.ExactProbabilityBest;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.stopping.LeaderConfidence;
import java.util.ArrayList;
import java.util.List;

/**
 * The indifference-zone confidence {@code P(theta_leader >= max_{j != leader} theta_j - epsilon)} for
 * independent posteriors, computed exactly: it is the probability that arm {@code leader} is best once its
 * posterior is shifted up by epsilon, {@code P(theta_leader + epsilon > max_{j != leader} theta_j)} (equal for
 * continuous posteriors), which {@link ExactProbabilityBest} integrates as
 * {@code integral f_leader(x - epsilon) prod_{j != leader} F_j(x) dx}.
 *
 * <p>The estimator integrates every arm's alpha, so this costs one full exact evaluation; the engine's
 * dedicated {@code probabilityWithin}, when it is available, computes the leader's integral only.
 */
public final class LeaderWithin {

    private static final ExactProbabilityBest EXACT = new ExactProbabilityBest();

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
     * @return the probability; an integral that rounding puts a few ulps above 1 is returned as 1
     */
    public static double probability(List<? extends Posterior> posteriors, int leader, double epsilon) {
        if (leader < 0 || leader >= posteriors.size()) {
            throw new IllegalArgumentException("leader must be an arm index in [0, " + posteriors.size()
                    + "), got " + leader);
        }
        if (!(epsilon >= 0) || !Double.isFinite(epsilon)) {
            throw new IllegalArgumentException("epsilon must be finite and >= 0, got " + epsilon);
        }
        List<Posterior> shifted = new ArrayList<>(posteriors);
        shifted.set(leader, new ShiftedPosterior(posteriors.get(leader), epsilon));
        return Math.min(1.0, EXACT.estimate(shifted, 0L).alpha(leader));
    }
}
