package dev.runoff.records;

/**
 * The checks of one record type beyond what its schema and {@link SchemaChecks} enforce: ranges, required
 * combinations, references between fields.
 *
 * @param <T> record type
 */
interface RecordRules<T> {

    /** Adds a problem for every rule {@code record} breaks that does not depend on the current time. */
    void check(T record, Limits limits, Problems problems);

    /** Adds a problem for every rule that depends on the reader's current time; none by default. */
    default void checkAt(T record, long nowMillis, Limits limits, Problems problems) {
    }
}
