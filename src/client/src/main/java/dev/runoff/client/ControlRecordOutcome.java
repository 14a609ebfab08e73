package dev.runoff.client;

/** What {@link AllocationTable#apply} did with one control record. */
public enum ControlRecordOutcome {
    /** The record replaced (or created) the experiment's weights. */
    APPLIED,
    /** A tombstone: the experiment was removed (if it was there). */
    REMOVED,
    /** The record failed to decode or validate, or its key was missing or differed from its experiment id. */
    MALFORMED,
    /** A valid record not newer, by (definitionVersion, sequence), than the one the table holds. */
    OUTDATED
}
