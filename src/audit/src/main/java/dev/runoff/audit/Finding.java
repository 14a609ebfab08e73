package dev.runoff.audit;

import java.util.Comparator;
import java.util.LinkedHashMap;
import java.util.Map;
import java.util.Objects;

/**
 * One failed check of one record.
 *
 * @param index    the record's index in the order read (0 for the first record of the experiment)
 * @param sequence the record's sequence number, or {@code null} when it could not be read
 * @param position where the record was read
 * @param check    the check that failed
 * @param field    path of the field at fault, e.g. {@code previousHash}, {@code arms[1].alpha}
 * @param message  what is wrong, with the values involved
 */
public record Finding(int index, Long sequence, Position position, Check check, String field, String message) {

    /** Record order first, then the order of {@link Check}. */
    public static final Comparator<Finding> ORDER = Comparator.comparingInt(Finding::index)
            .thenComparing(Finding::check);

    /** Checks that nothing but the sequence is missing. */
    public Finding {
        Objects.requireNonNull(position, "position");
        Objects.requireNonNull(check, "check");
        Objects.requireNonNull(field, "field");
        Objects.requireNonNull(message, "message");
    }

    /** A finding about {@code entry}, the {@code index}-th record read. */
    public static Finding of(int index, Entry entry, Check check, String field, String message) {
        return new Finding(index, entry.sequence(), entry.position(), check, field, message);
    }

    /** The fields for JSON output. */
    public Map<String, Object> toMap() {
        Map<String, Object> map = new LinkedHashMap<>();
        map.put("sequence", sequence);
        map.putAll(position.toMap());
        map.put("check", check.label());
        map.put("field", field);
        map.put("message", message);
        return map;
    }

    /** {@code sequence 7 (line 7): chain: previousHash: ...}. */
    @Override
    public String toString() {
        String where = sequence == null ? position.toString() : "sequence " + sequence + " (" + position + ")";
        return where + ": " + check.label() + ": " + field + ": " + message;
    }
}
