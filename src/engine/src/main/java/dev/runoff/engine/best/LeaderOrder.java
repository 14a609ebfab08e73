package dev.runoff.engine.best;

import java.util.function.Supplier;

/**
 * The draw policy of engine version 1.2, frozen: drawing stops when the leader and the runner-up (the two arms
 * with the most wins, ties to the lower index) are ordered at {@value #Z} standard errors of their difference,
 * or when that standard error is at most {@value #RESOLUTION}, too close for their order to move the weights by
 * more than about a quarter of a percent ({@link DrawPolicy#ordered}).
 */
public final class LeaderOrder implements DrawPolicy {

    /** Standard errors of the leader-runner-up difference that count as ordered. */
    public static final double Z = 3.0;
    /** Standard error of the leader-runner-up difference below which their order no longer matters. */
    public static final double RESOLUTION = 0.0025;

    private final int firstStage;

    /**
     * The policy with a first stage of {@code firstStage} draws (engine 1.2: {@link AdaptiveMonteCarlo#FIRST_STAGE}).
     *
     * @throws IllegalArgumentException if {@code firstStage < 1}
     */
    public LeaderOrder(int firstStage) {
        if (firstStage < 1) {
            throw new IllegalArgumentException("firstStage must be >= 1, got " + firstStage);
        }
        this.firstStage = firstStage;
    }

    @Override
    public int firstStage() {
        return firstStage;
    }

    @Override
    public boolean settled(long[] wins, int draws, Supplier<double[]> integrated) {
        return DrawPolicy.ordered(wins, draws, 0, Z, RESOLUTION);
    }

    @Override
    public String toString() {
        return "LeaderOrder[firstStage=" + firstStage + "]";
    }
}
