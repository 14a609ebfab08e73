package dev.runoff.client;

import java.time.Duration;

/** Argument checks of the serving builders, with messages that name the parameter and value. */
final class Args {
    private Args() {
    }

    /** Returns {@code value}, or throws when it is null or blank. */
    static String notBlank(String name, String value) {
        if (value == null || value.isBlank()) {
            throw new IllegalArgumentException(name + " must not be blank, got "
                    + (value == null ? "null" : "'" + value + "'"));
        }
        return value;
    }

    /** Returns {@code value}, or throws when it is null, zero or negative. */
    static Duration positive(String name, Duration value) {
        if (value == null || value.isNegative() || value.isZero()) {
            throw new IllegalArgumentException(name + " must be a positive duration, got " + value);
        }
        return value;
    }
}
