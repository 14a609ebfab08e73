package dev.runoff.topology;

import dev.runoff.engine.core.Names;


/**
 * Why the job set a record aside, beyond the problems the records package finds while reading a record
 * (those keep their {@link dev.runoff.records.Reason}, see {@link #codeOf}). The code is the stable value of
 * the {@code runoff.reason} header of the rejected topic and the key of {@link JobCounters}: the constant's
 * name in lower case with hyphens, e.g. {@code unknown-experiment}, {@code malformed-json}.
 */
public enum RejectReason {
    /** The event names an experiment that has no accepted definition. */
    UNKNOWN_EXPERIMENT,
    /** The event names an experiment whose definition was deleted (tombstone). */
    EXPERIMENT_ENDED,
    /** The event names an arm the experiment does not have. */
    UNKNOWN_ARM,
    /** The event type is neither the metric's trial event nor its success or value event. */
    EVENT_NOT_USED,
    /** A trial event without an arm. */
    MISSING_ARM,
    /** The metric's value event without a value. */
    MISSING_VALUE,
    /** A trial event for a unit already counted on another arm of the experiment (the first arm is kept). */
    ARM_CONFLICT,
    /** A success or value event naming an arm other than the unit's. */
    ARM_MISMATCH,
    /** A success or value event with no trial event of its unit to attribute it to (within the window). */
    UNATTRIBUTED,
    /** A success beyond the unit's number of trials (successes never exceed trials; a unit converts once). */
    EXCESS_SUCCESS,
    /** Unit counting: a success within the window that arrived after the window closed and the unit was counted. */
    LATE_OUTCOME,
    /** An event whose guardrail signal no guardrail of the experiment counts. */
    UNKNOWN_SIGNAL,
    /** A definition whose record key differs from its experimentId. */
    KEY_MISMATCH,
    /** A definition that changes the metric kind or the counting mode: start a new experiment instead. */
    METRIC_CHANGE,
    /** A definition for an experiment id that has ended: ids are not reused, start one with a new id. */
    EXPERIMENT_ID_ENDED,
    /** Pre-aggregated statistics for an experiment the job no longer holds (race with a tombstone). */
    DELTA_UNKNOWN_EXPERIMENT,
    /** Pre-aggregated statistics for an arm the definition in force does not have (race with a change). */
    DELTA_UNKNOWN_ARM,
    /** Pre-aggregated statistics of the other metric kind (race with a change of metric). */
    DELTA_METRIC_MISMATCH,
    /** Pre-aggregated statistics of units first exposed before their arm was last (re-)added. */
    DELTA_STALE_ARM,
    /** The engine or the stopping rule refused to evaluate an experiment. */
    EVALUATION_ERROR,
    /** An unexpected exception while processing a record (dead-lettered by the exception handler). */
    PROCESSING_ERROR,
    /** An unexpected exception in a punctuation (dead-lettered by the exception handler). */
    PUNCTUATION_ERROR,
    /** An output the producer refused as too large (dead-lettered truncated by the production handler). */
    PRODUCTION_ERROR,
    /** Bytes the source deserializer could not read (dead-lettered by the exception handler). */
    DESERIALIZATION_ERROR;

    /** The stable code, e.g. {@code unknown-experiment}. */
    public String code() {
        return code(name());
    }

    /** The code of a problem the records package found, e.g. {@code malformed-json}, {@code bad-time}. */
    public static String codeOf(dev.runoff.records.Reason reason) {
        return code(reason.name());
    }

    private static String code(String name) {
        return Names.kebab(name);
    }
}
