package dev.runoff.engine.stopping;

import dev.runoff.engine.core.Names;



/** Why a decision was taken; each reason implies the action. */
public enum VerdictReason {
    /** STOP: the GLR statistic exceeded its threshold. */
    GLR(Verdict.Action.STOP),
    /** STOP: the posterior probability rule fired. */
    POSTERIOR(Verdict.Action.STOP),
    /** STOP: the indifference-zone rule fired. */
    INDIFFERENCE(Verdict.Action.STOP),
    /** STOP: the trial budget or the deadline is spent; the winner is the current best by alpha. */
    BUDGET(Verdict.Action.STOP),
    /** CONTINUE: the rule's statistic has not reached its threshold. */
    BELOW_THRESHOLD(Verdict.Action.CONTINUE),
    /** CONTINUE: the rule fired but some arm has fewer trials than the configured minimum. */
    MIN_TRIALS(Verdict.Action.CONTINUE),
    /** CONTINUE: the rule fired but the experiment has run for less than the configured minimum duration. */
    MIN_DURATION(Verdict.Action.CONTINUE),
    /** STOP: the GLR statistic exceeded the lighter, NOT PROVEN threshold. */
    GLR_HEURISTIC(Verdict.Action.STOP),
    /** STOP: the mixture-martingale test fired. */
    MIXTURE(Verdict.Action.STOP),
    /** STOP: the leader's t confidence sequence lies above every other arm's. */
    SEQUENTIAL_T(Verdict.Action.STOP);

    private final Verdict.Action action;

    VerdictReason(Verdict.Action action) {
        this.action = action;
    }

    /** The action this reason leads to. */
    public Verdict.Action action() {
        return action;
    }

    /** Lower-case label for records and logs: "glr", "posterior", "indifference", "budget", "min-trials"... */
    public String label() {
        return Names.kebab(this);
    }

    /** The reason a rule gives when it fires. */
    static VerdictReason firing(Rule rule) {
        return switch (rule) {
            case GLR -> GLR;
            case POSTERIOR -> POSTERIOR;
            case INDIFFERENCE -> INDIFFERENCE;
            case GLR_HEURISTIC -> GLR_HEURISTIC;
            case MIXTURE -> MIXTURE;
            case SEQUENTIAL_T -> SEQUENTIAL_T;
        };
    }
}
