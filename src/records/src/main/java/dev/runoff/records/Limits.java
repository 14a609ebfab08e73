package dev.runoff.records;

import dev.runoff.engine.core.Checks;

/**
 * Bounds that protect the job from hostile or broken input. Every record is checked against them after
 * decoding, whatever the wire format.
 *
 * @param maxBytes        largest accepted input, in bytes
 * @param maxDepth        deepest accepted JSON nesting (objects and arrays)
 * @param maxStringLength longest accepted string, in Unicode code points (ids, arm names, reasons)
 * @param minArms         fewest arms an experiment may have
 * @param maxArms         most arms an experiment may have; also the bound on every list in a record
 * @param maxFutureSkewMs how far after the reader's current time an event timestamp may lie
 * @param maxAbsValue     largest accepted magnitude of an event value, so that squared deviations stay finite
 */
public record Limits(int maxBytes, int maxDepth, int maxStringLength, int minArms, int maxArms,
                     long maxFutureSkewMs, double maxAbsValue) {

    /**
     * Defaults: 1 MiB, nesting depth 16, strings of 256 code points, 2 to 100 arms, events up to 1 day in
     * the future, values up to 1e15 in magnitude.
     */
    public static final Limits DEFAULT = new Limits(1 << 20, 16, 256, 2, 100, 86_400_000L, 1e15);

    /** Validates every bound. */
    public Limits {
        Checks.positive("maxBytes", maxBytes);
        Checks.positive("maxDepth", maxDepth);
        Checks.positive("maxStringLength", maxStringLength);
        Checks.inClosedRange("minArms", minArms, 1, maxArms);
        Checks.nonNegative("maxFutureSkewMs", maxFutureSkewMs);
        Checks.positive("maxAbsValue", maxAbsValue);
    }

    /** These limits with another byte bound. */
    public Limits withMaxBytes(int bytes) {
        return new Limits(bytes, maxDepth, maxStringLength, minArms, maxArms, maxFutureSkewMs, maxAbsValue);
    }
}
