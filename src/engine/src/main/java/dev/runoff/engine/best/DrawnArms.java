package dev.runoff.engine.best;

/**
 * Which arms {@link AdaptiveMonteCarlo} draws, and from which random streams. Each engine version names one.
 */
public enum DrawnArms {
    /** Every arm, all from one stream seeded with the evaluation's seed, arm by arm (engine 1.2 to 1.4). */
    ALL_ONE_STREAM,
    /**
     * Every arm, each from its own stream: the seed's stream gives one seed per arm, in arm order, whatever is
     * drawn, so an arm's draws do not depend on which other arms are drawn.
     */
    ALL_OWN_STREAMS,
    /**
     * Own streams as {@link #ALL_OWN_STREAMS}, without the arms {@link CertainLosers} finds unable to win a draw
     * (engine 1.5): every winner equals that of {@link #ALL_OWN_STREAMS} except with probability at most
     * {@value CertainLosers#CHANGE}.
     */
    LEAVE_OUT_CERTAIN_LOSERS
}
