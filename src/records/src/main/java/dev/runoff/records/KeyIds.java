package dev.runoff.records;

import java.util.regex.Pattern;

/** The form of a key id: 1 to 64 characters among {@code A-Z a-z 0-9 . _ -}, e.g. {@code runoff-2026-12}. */
public final class KeyIds {

    private static final Pattern FORM = Pattern.compile("[A-Za-z0-9._-]{1,64}");

    private KeyIds() {
    }

    /** True when {@code keyId} has the form of a key id. */
    public static boolean valid(String keyId) {
        return keyId != null && FORM.matcher(keyId).matches();
    }

    /**
     * Returns {@code keyId} when it has the form of a key id.
     *
     * @throws IllegalArgumentException naming the value otherwise
     */
    public static String check(String keyId) {
        if (!valid(keyId)) {
            throw new IllegalArgumentException(describe(keyId));
        }
        return keyId;
    }

    /** The message for a value that is not a key id. */
    static String describe(String keyId) {
        return "key id must be 1 to 64 of A-Z a-z 0-9 . _ -, got " + (keyId == null ? "null" : "'" + keyId + "'");
    }
}
