package dev.runoff.records;

import dev.runoff.records.avro.DecisionRecord;
import java.util.ArrayList;
import java.util.List;
import java.util.Objects;
import java.util.Set;
import org.apache.avro.Schema;
import org.apache.avro.generic.IndexedRecord;

/**
 * What a decision record held when its hash was computed, so that the hash can be given again without
 * writing the canonical JSON again while the record still holds exactly that.
 *
 * <p>Canonical JSON is a function of the record's schemas, of which branch each union takes, of each list's
 * length and of the leaf values (strings, enum symbols, numbers, booleans, nulls), all immutable objects. So
 * the content is kept as the sequence met in a walk of the record in field order, leaving out the top-level
 * fields the hash leaves out: for each record its schema, for each list a marker and its length, for each
 * leaf the value itself (a reference, no copy: strings, boxed numbers, booleans and enum symbols cannot change;
 * a leaf of any other type is recorded as an object that nothing equals, so that content never matches).
 * Another record, or the same one changed since, matches only
 * when its walk meets equal items ({@link Object#equals}: the same text, symbol, or the same bits of a
 * number) in the same order, in which case its canonical JSON is the same text and its hash the same.
 *
 * @param content the walk's items
 * @param hash    the hash of the record as walked
 */
record SealedContent(Object[] content, String hash) {

    /** Marks a list in the walk; its length follows. */
    private static final Object LIST = new Object();

    /** Leaf types kept by reference; any other leaf is recorded as an object nothing equals, so never matches. */
    private static final Set<Class<?>> IMMUTABLE = Set.of(String.class, Long.class, Integer.class, Double.class,
            Boolean.class);

    /** Fields left out of the walk, as out of the hash. */
    private static final Set<String> LEFT_OUT = Set.of(HashChain.HASH_FIELD, RecordSignatures.KEY_ID_FIELD,
            RecordSignatures.SIGNATURE_FIELD);

    /** The content of {@code record}, whose hash is {@code hash}. */
    static SealedContent of(DecisionRecord record, String hash) {
        List<Object> items = new ArrayList<>(256);
        Walk walk = items::add;
        top(record, walk);
        return new SealedContent(items.toArray(), hash);
    }

    /** True when a walk of {@code record} meets the same items as the one this content was taken from. */
    boolean matches(DecisionRecord record) {
        Comparing walk = new Comparing(content);
        top(record, walk);
        return walk.same();
    }

    private static void top(IndexedRecord record, Walk walk) {
        Schema schema = record.getSchema();
        walk.item(schema);
        for (Schema.Field field : schema.getFields()) {
            if (!LEFT_OUT.contains(field.name())) {
                value(record.get(field.pos()), walk);
            }
        }
    }

    private static void value(Object value, Walk walk) {
        if (!walk.going()) {
            return;
        }
        if (value instanceof IndexedRecord nested) {
            walk.item(nested.getSchema());
            for (int i = 0; i < nested.getSchema().getFields().size(); i++) {
                value(nested.get(i), walk);
            }
        } else if (value instanceof List<?> list) {
            walk.item(LIST);
            walk.item(list.size());
            for (Object item : list) {
                value(item, walk);
            }
        } else if (value == null || IMMUTABLE.contains(value.getClass()) || value instanceof Enum<?>) {
            walk.item(value);
        } else {
            walk.item(new Object());
        }
    }

    /** Receives the items of a walk. */
    private interface Walk {
        void item(Object item);

        /** False once the outcome is known (a comparison that found a difference). */
        default boolean going() {
            return true;
        }
    }

    /** Compares a walk with a recorded one, item by item. */
    private static final class Comparing implements Walk {
        private final Object[] expected;
        private int next;
        private boolean same = true;

        Comparing(Object[] expected) {
            this.expected = expected;
        }

        @Override
        public void item(Object item) {
            if (same) {
                same = next < expected.length && Objects.equals(expected[next], item);
                next++;
            }
        }

        @Override
        public boolean going() {
            return same;
        }

        boolean same() {
            return same && next == expected.length;
        }
    }
}
