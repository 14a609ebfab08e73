package dev.runoff.engine.stopping;

import java.util.Locale;

/** Why a decision was taken; each reason implies the action. */
public enum Reason {
    /** STOP: the GLR statistic exceeded its threshold. */
    GLR(Decision.Action.STOP),
    /** STOP: the posterior probability rule fired. */
    POSTERIOR(Decision.Action.STOP),
    /** STOP: the indifference-zone rule fired. */
    INDIFFERENCE(Decision.Action.STOP),
    /** STOP: the trial budget or the deadline is spent; the winner is the current best by alpha. */
    BUDGET(Decision.Action.STOP),
    /** CONTINUE: the rule's statistic has not reached its threshold. */
    BELOW_THRESHOLD(Decision.Action.CONTINUE),
    /** CONTINUE: the rule fired but some arm has fewer trials than the configured minimum. */
    MIN_TRIALS(Decision.Action.CONTINUE),
    /** CONTINUE: the rule fired but the experiment has run for less than the configured minimum duration. */
    MIN_DURATION(Decision.Action.CONTINUE);

    private final Decision.Action action;

    Reason(Decision.Action action) {
        this.action = action;
    }

    /** The action this reason leads to. */
    public Decision.Action action() {
        return action;
    }

    /** Lower-case label for records and logs: "glr", "posterior", "indifference", "budget", "min-trials"... */
    public String label() {
        return name().toLowerCase(Locale.ROOT).replace('_', '-');
    }

    /** The reason a rule gives when it fires. */
    static Reason firing(Rule rule) {
        return switch (rule) {
            case GLR -> GLR;
            case POSTERIOR -> POSTERIOR;
            case INDIFFERENCE -> INDIFFERENCE;
        };
    }
}
