package dev.runoff.records;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** Assertions on rejected records. */
final class Rejections {

    private Rejections() {
    }

    /** The record was rejected and its first problem has this field, reason and message fragment. */
    static void assertFirstProblem(Decoded<?> decoded, String field, Reason reason, String message) {
        assertFalse(decoded.isValid(), "accepted: " + decoded);
        Problem first = decoded.problems().get(0);
        assertEquals(field, first.field(), decoded.problems().toString());
        assertEquals(reason, first.reason(), decoded.problems().toString());
        assertTrue(first.message().contains(message), first.message());
    }
}
