package dev.runoff.records;

import java.util.List;
import java.util.stream.Collectors;

/**
 * A record that failed decoding or validation. The message lists every problem as {@code field: message};
 * {@link #problems()} keeps them typed.
 */
public final class RecordRejectedException extends IllegalArgumentException {

    private final transient List<Problem> problems;

    /** Creates the exception; {@code problems} must not be empty. */
    public RecordRejectedException(List<Problem> problems) {
        super(describe(problems));
        this.problems = List.copyOf(problems);
    }

    /** Every problem found, in the order found; never empty. */
    public List<Problem> problems() {
        return problems;
    }

    /** Reason code of the first problem. */
    public Reason reason() {
        return problems.get(0).reason();
    }

    private static String describe(List<Problem> problems) {
        if (problems.isEmpty()) {
            throw new IllegalArgumentException("a rejected record needs at least one problem");
        }
        return problems.stream().map(Problem::toString).collect(Collectors.joining("; "));
    }
}
