package dev.runoff.audit;

import java.util.LinkedHashMap;
import java.util.Map;

/**
 * Where a record was read: a partition and offset of the decisions topic, or a line of an exported file.
 *
 * @param partition topic partition, or {@link #FILE} for a line of a file
 * @param offset    offset in the partition, or the 1-based line number in a file
 */
public record Position(int partition, long offset) {

    /** Partition value marking a line of a file. */
    public static final int FILE = -1;

    /** Validates the values. */
    public Position {
        if (partition < FILE) {
            throw new IllegalArgumentException("partition must be >= 0 (or " + FILE + " for a file), got "
                    + partition);
        }
        if (offset < 0) {
            throw new IllegalArgumentException("offset must be >= 0, got " + offset);
        }
    }

    /** Line {@code number} (1-based) of a file. */
    public static Position line(long number) {
        return new Position(FILE, number);
    }

    /** Whether this is a line of a file. */
    public boolean isLine() {
        return partition == FILE;
    }

    /** The fields for JSON output: {@code line}, or {@code partition} and {@code offset}. */
    public Map<String, Object> toMap() {
        Map<String, Object> map = new LinkedHashMap<>();
        if (isLine()) {
            map.put("line", offset);
        } else {
            map.put("partition", partition);
            map.put("offset", offset);
        }
        return map;
    }

    /** {@code line 12} or {@code partition 0 offset 11}. */
    @Override
    public String toString() {
        return isLine() ? "line " + offset : "partition " + partition + " offset " + offset;
    }
}
