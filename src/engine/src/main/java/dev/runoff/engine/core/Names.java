package dev.runoff.engine.core;

import java.util.Locale;

/** The one spelling of constant names outside Java: lower case with hyphens ({@code MIN_TRIALS} is {@code min-trials}). */
public final class Names {

    private Names() {
    }

    /** {@code value}'s name in lower case with hyphens, as printed, logged and typed on the command line. */
    public static String kebab(Enum<?> value) {
        return kebab(value.name());
    }

    /** {@code constantName} (upper case with underscores) in lower case with hyphens. */
    public static String kebab(String constantName) {
        return constantName.toLowerCase(Locale.ROOT).replace('_', '-');
    }
}
