package dev.runoff.engine.allocation;

import java.util.Arrays;
import java.util.Collections;
import java.util.EnumSet;
import java.util.Set;

/**
 * Weights after the guards, with the guards that changed them.
 *
 * @param weights non-negative weights in arm order, summing to 1
 * @param flags   the guards that were active
 */
public record GuardedWeights(double[] weights, Set<GuardFlag> flags) {

    /** Copies both components. */
    public GuardedWeights {
        weights = weights.clone();
        flags = flags.isEmpty() ? Set.of() : Collections.unmodifiableSet(EnumSet.copyOf(flags));
    }

    @Override
    public double[] weights() {
        return weights.clone();
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof GuardedWeights g && Arrays.equals(weights, g.weights) && flags.equals(g.flags);
    }

    @Override
    public int hashCode() {
        return 31 * Arrays.hashCode(weights) + flags.hashCode();
    }

    @Override
    public String toString() {
        return "GuardedWeights[weights=" + Arrays.toString(weights) + ", flags=" + flags + "]";
    }
}
