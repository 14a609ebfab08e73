package dev.runoff.engine.best;

import java.util.function.UnaryOperator;

/**
 * What an evaluation reads from the Monte Carlo alphas, so that a draw policy ({@link DecisionPrecision}) can
 * draw until those readings are precise enough.
 *
 * @param weights      the allocation rule's weights as a function of the alphas when they vary smoothly with
 *                     them (top-two Thompson sampling and its adaptive form), else {@code null}
 * @param orderedRanks how many leading ranks must be ordered: 1 when only the leader's identity is read
 *                     (guardrail reference, indifference rule, budget winner), 2 when the runner-up's is read
 *                     too (top-two probability sampling)
 * @param threshold    a stopping threshold on the leader's alpha, or {@code null}
 */
public record AlphaReaders(UnaryOperator<double[]> weights, int orderedRanks, LeaderThreshold threshold) {

    /** Readers of the leader's identity only. */
    public static final AlphaReaders LEADER = new AlphaReaders(null, 1, null);

    /** Checks {@code orderedRanks}. */
    public AlphaReaders {
        if (orderedRanks < 1 || orderedRanks > 2) {
            throw new IllegalArgumentException("orderedRanks must be 1 or 2, got " + orderedRanks);
        }
    }
}
