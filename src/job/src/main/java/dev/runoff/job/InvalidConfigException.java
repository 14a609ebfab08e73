package dev.runoff.job;

import java.util.List;

/**
 * The configuration has problems: every one of them, each a line a user can act on (naming the key, the
 * value unless secret, and where it came from).
 */
public final class InvalidConfigException extends IllegalArgumentException {
    private static final long serialVersionUID = 1L;

    /** The problems, in the order found. */
    private final transient List<String> problems;

    /** An exception listing {@code problems} (at least one). */
    public InvalidConfigException(List<String> problems) {
        super(problems.size() + " configuration problem(s): " + String.join("; ", problems));
        if (problems.isEmpty()) {
            throw new IllegalArgumentException("problems must not be empty");
        }
        this.problems = List.copyOf(problems);
    }

    /** The problems, one message each. */
    public List<String> problems() {
        return problems;
    }
}
