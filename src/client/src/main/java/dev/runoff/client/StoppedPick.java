package dev.runoff.client;


/** What {@link AllocationTable#pick} returns once the control record says the experiment is STOPPED. */
public enum StoppedPick {
    /** Draw from the weights of the STOPPED record, which follow the definition's {@code afterStop} policy. */
    RECORD_WEIGHTS,
    /** Always the record's winner, whatever its weights say. */
    WINNER
}
