package dev.runoff.client;

/** How {@link AllocationTable#pick} turns weights into one arm. */
public enum Assignment {
    /**
     * Deterministic and sticky: the arm is a function of (experiment, unit key, current weights) through
     * {@link UnitHash} and an exponential race between the arms, so a unit gets the same arm on every replica
     * and after every restart while the weights stay the same, heartbeats included. When the weights change,
     * a unit moves only to an arm whose weight grew relatively more than its own arm's, and the expected share
     * of units that move lies between the total variation distance of the two weight vectors and twice it
     * (exactly the distance for two arms, for an arm switched off, for one arm raised).
     */
    HASHED,
    /** A fresh draw on every call from the policy's uniform source; the unit key is not used. */
    RANDOM
}
