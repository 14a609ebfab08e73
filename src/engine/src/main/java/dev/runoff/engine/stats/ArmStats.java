package dev.runoff.engine.stats;

/**
 * Sufficient statistics of one arm. Implementations are immutable values whose {@code merge} is
 * associative and commutative, so partial aggregates from different partitions combine in any order.
 */
public sealed interface ArmStats permits BernoulliStats, ValueStats {

    /** Number of trials (exposures, or observed values) folded into these statistics. */
    long trials();

    /**
     * Throws an {@link IllegalArgumentException} naming {@code arm} when these statistics are impossible
     * (negative counts, successes above trials, NaN). Called by every public entry point of the engine.
     */
    void validate(String arm);

    /**
     * {@code a} merged with {@code b}: exact counts, and Chan et al. (1979) for means and M2.
     *
     * @throws IllegalArgumentException when the two are of different kinds
     */
    static ArmStats merge(ArmStats a, ArmStats b) {
        if (a instanceof BernoulliStats x && b instanceof BernoulliStats y) {
            return x.merge(y);
        }
        if (a instanceof ValueStats x && b instanceof ValueStats y) {
            return x.merge(y);
        }
        throw new IllegalArgumentException("cannot merge " + b + " into " + a + ": metric kinds differ");
    }
}
