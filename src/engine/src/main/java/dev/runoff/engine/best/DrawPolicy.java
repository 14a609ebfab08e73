package dev.runoff.engine.best;

import java.util.function.Supplier;

/**
 * When {@link AdaptiveMonteCarlo} stops drawing: the size of its first stage and the check made after each
 * stage on the joint draws' win counts. Each engine version names its policy, and a policy's decisions must
 * never change once records carry its version: a different draw count is a different decision record.
 */
public interface DrawPolicy {

    /** Joint draws of the first stage (the estimator caps it at its own maximum), at least 1. */
    int firstStage();

    /**
     * Whether the draws made so far answer every question the evaluation asks of the alphas. A pure function of
     * its arguments.
     *
     * @param wins       per arm, the joint draws it won
     * @param draws      the joint draws made, the sum of {@code wins}
     * @param integrated the alphas the estimator would give the arms that won no draw (the leader aside) if it
     *                   stopped now, 0 for the others: integrated when first asked for, and not again for the
     *                   final estimate when no arm has won a draw since
     */
    boolean settled(long[] wins, int draws, Supplier<double[]> integrated);

    /**
     * Whether the arms ranked {@code rank} and {@code rank + 1} by wins (ties to the lower index) are ordered:
     * with {@code d} the difference of their shares of the draws, {@code d >= z * s}, where
     * {@code s = sqrt((p_a + p_b - d^2) / draws)} is the standard error of a difference of two multinomial cell
     * proportions (common practice); or whether {@code s <= resolution}, the two being too close for their order
     * to matter.
     */
    static boolean ordered(long[] wins, int draws, int rank, double z, double resolution) {
        int[] order = Ranking.byWins(wins, rank + 2);
        double pa = (double) wins[order[rank]] / draws;
        double pb = (double) wins[order[rank + 1]] / draws;
        double d = pa - pb;
        double s = Math.sqrt(Math.max(0, pa + pb - d * d) / draws);
        return d >= z * s || s <= resolution;
    }
}
