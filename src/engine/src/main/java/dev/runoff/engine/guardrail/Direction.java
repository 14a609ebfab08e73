package dev.runoff.engine.guardrail;

/** Which way a guardrail rate is bad. */
public enum Direction {
    /** A higher rate is worse (failed payments, errors). */
    HIGHER_IS_WORSE,
    /** A lower rate is worse (completed checkouts, pages that loaded). */
    LOWER_IS_WORSE
}
