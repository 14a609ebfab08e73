package dev.runoff.records;

/** Why a record was rejected: a stable code for dead-letter headers and metrics, beside a readable message. */
public enum Reason {
    /** No bytes at all (an empty value, or a null value that should have been handled as a tombstone). */
    EMPTY,
    /** The input exceeds a size limit: total bytes, JSON nesting depth or the length of one JSON token. */
    TOO_LARGE,
    /** Not syntactically valid JSON, or a JSON document that is not a single object. */
    MALFORMED_JSON,
    /** Avro single-object bytes whose body is truncated, corrupt or followed by extra bytes. */
    MALFORMED_AVRO,
    /** Avro single-object bytes whose schema fingerprint is neither the current schema nor a registered one. */
    UNKNOWN_SCHEMA,
    /** A required field is absent or null. */
    MISSING,
    /** A field has the wrong JSON type (a string where a number is expected, a fraction for an integer...). */
    WRONG_TYPE,
    /** A JSON field the schema does not know (rejected for definitions, where it is most likely a typo). */
    UNKNOWN_FIELD,
    /** A value outside an enumeration, e.g. an event type the schema does not define. */
    UNKNOWN_VALUE,
    /** A string longer than the limit. */
    TOO_LONG,
    /** A string that is blank, holds control characters or is not valid Unicode. */
    INVALID_TEXT,
    /** NaN or an infinity where a finite number is required. */
    NOT_FINITE,
    /** A number outside its allowed range (negative count, probability above 1, overflowing integer...). */
    OUT_OF_RANGE,
    /** A list with fewer items than required (e.g. fewer than two arms). */
    TOO_FEW,
    /** A list with more items than allowed. */
    TOO_MANY,
    /** A name that appears twice where names must be unique. */
    DUPLICATE,
    /** A time too far after the reader's current time, or a deadline already past. */
    BAD_TIME,
    /** Fields that contradict each other (a control share without a control arm, weights not summing to 1...). */
    INCONSISTENT
}
