package dev.runoff.records;

import java.util.List;
import java.util.Objects;

/**
 * Outcome of reading or validating a record: either a complete, valid record or the list of problems, never
 * a half-filled record.
 *
 * @param <T> record type
 */
public final class Decoded<T> {

    private final T value;
    private final List<Problem> problems;

    private Decoded(T value, List<Problem> problems) {
        this.value = value;
        this.problems = problems;
    }

    /** A valid record. */
    public static <T> Decoded<T> valid(T value) {
        return new Decoded<>(Objects.requireNonNull(value, "value"), List.of());
    }

    /** A rejection; {@code problems} must not be empty. */
    public static <T> Decoded<T> rejected(List<Problem> problems) {
        if (problems.isEmpty()) {
            throw new IllegalArgumentException("a rejection needs at least one problem");
        }
        return new Decoded<>(null, List.copyOf(problems));
    }

    /** True when the record is valid. */
    public boolean isValid() {
        return value != null;
    }

    /** The problems found; empty when valid. */
    public List<Problem> problems() {
        return problems;
    }

    /** Reason code of the first problem, or null when valid. */
    public Reason reason() {
        return problems.isEmpty() ? null : problems.get(0).reason();
    }

    /**
     * The valid record.
     *
     * @throws RecordRejectedException when the record was rejected
     */
    public T orThrow() {
        if (value == null) {
            throw new RecordRejectedException(problems);
        }
        return value;
    }

    @Override
    public String toString() {
        return value != null ? "Decoded[valid " + value + "]" : "Decoded[rejected " + problems + "]";
    }
}
