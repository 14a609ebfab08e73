package dev.runoff.client;

/** What {@link AllocationTable#apply} did with one control record. */
public enum ControlRecordOutcome {
    /** The record replaced (or created) the experiment's weights. */
    APPLIED,
    /** A tombstone: the experiment was removed (if it was there). */
    REMOVED,
    /** The record failed to decode or validate, or its key was missing or differed from its experiment id. */
    MALFORMED,
    /**
     * A valid record that is not a later record than the one the table holds: its sequence is not greater,
     * or its definitionVersion is smaller.
     */
    OUTDATED,
    /**
     * The table verifies signatures and the record is unsigned, signed by a key it does not trust, or its
     * signature does not match: skipped, never applied.
     */
    UNVERIFIED
}
