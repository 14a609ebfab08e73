package dev.runoff.engine.planning;

import dev.runoff.engine.stopping.Divergence;

import dev.runoff.engine.core.Checks;
import java.util.Arrays;
import java.util.Objects;

/**
 * A split of traffic between arms and the characteristic time it achieves.
 *
 * <p>The characteristic time {@code T_w} is the number of trials per unit of {@code log(1/delta)} needed to
 * identify the best arm when sampling with weights w: as delta goes to 0 an asymptotically optimal stopping
 * rule needs about {@code T_w log(1/delta)} trials (Garivier &amp; Kaufmann 2016, Theorem 1 for the lower
 * bound, Theorem 14 for its attainment with the optimal weights).
 *
 * @param kind               how the weights were chosen
 * @param best               index of the best arm
 * @param weights            one weight per arm, summing to 1
 * @param characteristicTime {@code T_w}, trials per unit of {@code log(1/delta)}
 */
public record TargetAllocation(Kind kind, int best, double[] weights, double characteristicTime) {

    /** Copies the weights so the value stays immutable. */
    public TargetAllocation {
        Objects.requireNonNull(kind, "kind");
        weights = weights.clone();
        Checks.positive("characteristic time", characteristicTime);
    }

    /** Weight of arm {@code a}. */
    public double weight(int a) {
        return weights[a];
    }

    @Override
    public double[] weights() {
        return weights.clone();
    }

    /**
     * Predicted number of trials {@code T_w log(1/delta)}: the leading term as delta goes to 0 (Garivier &amp;
     * Kaufmann 2016, Theorem 1); the finite-delta cost of a real stopping threshold comes on top.
     *
     * @param delta error probability, in (0, 1)
     */
    public double predictedTrials(double delta) {
        Checks.inOpenRange("delta", delta, 0, 1);
        return characteristicTime * -StrictMath.log(delta);
    }

    /**
     * The non-asymptotic lower bound {@code T_w kl(delta, 1 - delta)} on the expected number of trials of any
     * delta-correct strategy when {@code T_w} is the optimal T* (Garivier &amp; Kaufmann 2016, Theorem 1),
     * with kl the Bernoulli KL divergence.
     *
     * @param delta error probability, in (0, 1/2)
     */
    public double lowerBoundTrials(double delta) {
        Checks.inOpenRange("delta", delta, 0, 0.5);
        return characteristicTime * Divergence.bernoulli(delta, 1 - delta);
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof TargetAllocation t && kind == t.kind && best == t.best
                && Double.compare(characteristicTime, t.characteristicTime) == 0 && Arrays.equals(weights, t.weights);
    }

    @Override
    public int hashCode() {
        return Objects.hash(kind, best, Double.hashCode(characteristicTime)) * 31 + Arrays.hashCode(weights);
    }

    @Override
    public String toString() {
        return "TargetAllocation[" + kind + ", best=" + best + ", weights=" + Arrays.toString(weights)
                + ", characteristicTime=" + characteristicTime + "]";
    }

    /** How the weights were chosen. */
    public enum Kind {
        /** w*(mu), maximising the smallest pairwise cost (Garivier &amp; Kaufmann 2016). */
        OPTIMAL,
        /** Best arm fixed at beta, the others equalising the pairwise costs (Russo 2020). */
        BETA_OPTIMAL,
        /** 1/K on every arm. */
        UNIFORM
    }
}
