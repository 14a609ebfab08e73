package dev.runoff.topology;

import java.util.Objects;

/**
 * Output of a processor that either passes a value on to the next step or sends a record to an output
 * topic (a rejection, usually). Exactly one of the two is set.
 *
 * @param <V> type of the value passed on
 */
final class Routed<V> {

    private final V payload;
    private final Emit emit;

    private Routed(V payload, Emit emit) {
        this.payload = payload;
        this.emit = emit;
    }

    static <V> Routed<V> pass(V payload) {
        return new Routed<>(Objects.requireNonNull(payload, "payload"), null);
    }

    static <V> Routed<V> emit(Emit emit) {
        return new Routed<>(null, Objects.requireNonNull(emit, "emit"));
    }

    boolean isEmit() {
        return emit != null;
    }

    V payload() {
        return payload;
    }

    Emit emit() {
        return emit;
    }
}
