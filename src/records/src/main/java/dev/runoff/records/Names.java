package dev.runoff.records;

import java.util.AbstractList;
import java.util.List;
import java.util.function.Function;

/**
 * The names of a record's list items (arms of weights or states, guardrails) as a read-only view: each name
 * is read from its item when asked for, so rules compare and search names without copying them into a new
 * list. Equality, hash and text are those of any {@link List} ({@link AbstractList}).
 */
final class Names {

    private Names() {
    }

    /** The view of {@code name} applied to each of {@code items}, in order. */
    static <T> List<String> of(List<T> items, Function<? super T, String> name) {
        return new AbstractList<>() {
            @Override
            public String get(int index) {
                return name.apply(items.get(index));
            }

            @Override
            public int size() {
                return items.size();
            }
        };
    }
}
