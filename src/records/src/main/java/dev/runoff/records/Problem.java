package dev.runoff.records;

import java.util.Objects;

/**
 * One reason a record was rejected.
 *
 * @param field   path of the offending field, e.g. {@code unitId}, {@code metric.prior.a}, {@code arms[3]};
 *                {@code record} when the problem concerns the input as a whole
 * @param reason  stable reason code
 * @param message what is wrong, without the field name, e.g. {@code unknown value 'PURCHASE'}
 */
public record Problem(String field, Reason reason, String message) {

    /** Path used for problems that concern the whole input rather than one field. */
    public static final String WHOLE_RECORD = "record";

    /** Checks that no component is null. */
    public Problem {
        Objects.requireNonNull(field, "field");
        Objects.requireNonNull(reason, "reason");
        Objects.requireNonNull(message, "message");
    }

    /** {@code field: message}, e.g. {@code type: unknown value 'PURCHASE'}. */
    @Override
    public String toString() {
        return field + ": " + message;
    }
}
