package dev.runoff.job;

import java.util.Map;
import java.util.function.Consumer;

/** Parsing of the job's own {@code runoff.*} values, with problems reported in the words a user acts on. */
final class SettingValues {

    private SettingValues() {
    }

    /**
     * The whole number under {@code key}, or {@code fallback} when the key is absent or not a number; a value
     * outside {@code [min, max]} or not a number is reported to {@code problems}, naming the key.
     */
    static long whole(Map<String, String> values, String key, long fallback, long min, long max,
                      Consumer<String> problems) {
        String text = values.get(key);
        if (text == null) {
            return fallback;
        }
        try {
            long value = Long.parseLong(text.trim());
            if (value < min || value > max) {
                String range = max == Long.MAX_VALUE ? ">= " + min : "in [" + min + ", " + max + "]";
                problems.accept(key + " must be " + range + ", got " + value);
            }
            return value;
        } catch (NumberFormatException e) {
            problems.accept(key + " must be a whole number, got '" + text + "'");
            return fallback;
        }
    }
}
