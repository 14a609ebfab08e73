package dev.runoff.engine.allocation;

/** Which guards changed the rule's weights in one evaluation. */
public enum GuardFlag {
    /** Some arm has fewer trials than the warm-up minimum: the rule's weights were replaced by equal ones. */
    WARM_UP,
    /** The control arm was given its fixed share. */
    CONTROL_SHARE,
    /** At least one arm was raised to the floor. */
    FLOOR,
    /** The per-period cap limited how far the weights moved from the previous ones. */
    CAP
}
