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
}
