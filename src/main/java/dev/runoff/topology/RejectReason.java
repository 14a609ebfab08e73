package dev.runoff.topology;

import java.util.Locale;

/**
 * Why the job set a record aside: the stable code in the {@code runoff.reason} header of the rejected topic
 * and the key of {@link JobCounters}. The code is the constant's name in lower case with hyphens, e.g.
 * {@code unknown-experiment}.
 */
public enum RejectReason {
    /** A null or empty value where a record was expected (an outcome tombstone, say). */
    EMPTY,
    /** The record exceeds a size limit (bytes, JSON depth, token length). */
    TOO_LARGE,
    /** Not a single well-formed JSON object. */
    MALFORMED_JSON,
    /** Avro single-object bytes that are truncated, corrupt or followed by extra bytes. */
    MALFORMED_AVRO,
    /** Avro single-object bytes with a schema fingerprint the job does not know. */
    UNKNOWN_SCHEMA,
    /** A required field is absent or null. */
    MISSING,
    /** A field of the wrong type. */
    WRONG_TYPE,
    /** A JSON field the definition schema does not know. */
    UNKNOWN_FIELD,
    /** A value outside an enumeration, e.g. an unknown event type. */
    UNKNOWN_VALUE,
    /** A string longer than the limit. */
    TOO_LONG,
    /** A blank string, control characters or invalid Unicode. */
    INVALID_TEXT,
    /** NaN or an infinity. */
    NOT_FINITE,
    /** A number out of range (a negative timestamp, a probability above 1...). */
    OUT_OF_RANGE,
    /** A list with too few items. */
    TOO_FEW,
    /** A list with too many items. */
    TOO_MANY,
    /** A name that appears twice. */
    DUPLICATE,
    /** A time too far in the future, or a deadline already past. */
    BAD_TIME,
    /** Fields that contradict each other. */
    INCONSISTENT,
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
    /** A success beyond the unit's number of trials (successes never exceed trials). */
    EXCESS_SUCCESS,
    /** A definition whose record key differs from its experimentId. */
    KEY_MISMATCH,
    /** Pre-aggregated statistics for an experiment the job no longer holds (race with a tombstone). */
    DELTA_UNKNOWN_EXPERIMENT,
    /** Pre-aggregated statistics for an arm the definition in force does not have (race with a change). */
    DELTA_UNKNOWN_ARM,
    /** Pre-aggregated statistics of the other metric kind (race with a change of metric). */
    DELTA_METRIC_MISMATCH,
    /** The engine or the stopping rule refused to evaluate an experiment. */
    EVALUATION_ERROR,
    /** An unexpected exception while processing a record (dead-lettered by the exception handler). */
    PROCESSING_ERROR,
    /** An unexpected exception in a punctuation (dead-lettered by the exception handler). */
    PUNCTUATION_ERROR,
    /** Bytes the source deserializer could not read (dead-lettered by the exception handler). */
    DESERIALIZATION_ERROR;

    /** The stable code, e.g. {@code unknown-experiment}. */
    public String code() {
        return name().toLowerCase(Locale.ROOT).replace('_', '-');
    }

    /** The reason for a problem the records package found. */
    public static RejectReason of(dev.runoff.records.Reason reason) {
        return valueOf(reason.name());
    }
}
