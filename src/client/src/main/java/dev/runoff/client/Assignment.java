package dev.runoff.client;

/** How {@link AllocationTable#pick} turns weights into one arm. */
public enum Assignment {
    /**
     * Deterministic: the arm is a function of (experiment, unit key, current weights) through
     * {@link UnitHash}, so a unit keeps its arm on every replica for as long as the weights stay the same,
     * heartbeats included. Across a change of weights each unit is drawn afresh.
     */
    HASHED,
    /** A fresh draw on every call from the policy's uniform source; the unit key is not used. */
    RANDOM
}
