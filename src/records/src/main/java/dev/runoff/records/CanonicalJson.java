package dev.runoff.records;

import java.util.Comparator;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.concurrent.ConcurrentHashMap;
import org.apache.avro.Schema;
import org.apache.avro.generic.IndexedRecord;
import org.apache.avro.specific.SpecificData;

/**
 * Canonical JSON of a record: one exact text per value, so that a hash over it can be recomputed outside
 * Java. It follows the JSON Canonicalization Scheme (RFC 8785, Rundgren, Jordan and Erdtman 2020) except for
 * 64-bit integers, which are written in full:
 * <ol>
 *   <li>UTF-8, no whitespace between tokens.</li>
 *   <li>A record is an object holding every field of its schema, none omitted, absent values as
 *       {@code null}; keys sorted by their UTF-16 code units (all keys are ASCII field names, so this is
 *       plain byte order). Nested records likewise. The one exception is the compatibility rule below.</li>
 *   <li>A union holding a record is written as that record's object, without a type wrapper.</li>
 *   <li>Arrays keep their order. Enum values are their symbol as a string.</li>
 *   <li>{@code int} and {@code long} fields: decimal digits, {@code -} for negatives, no leading zeros, no
 *       fraction or exponent, every digit kept even beyond 2^53 (seeds are full 64-bit values; this is the
 *       one departure from RFC 8785).</li>
 *   <li>{@code double} fields: ECMAScript {@code Number.prototype.toString} (RFC 8785 section 3.2.2.3), i.e.
 *       the shortest decimal that reads back as the same double, closest to it on a tie of length; plain
 *       notation for magnitudes in [1e-6, 1e21), otherwise {@code d.ddde+x} / {@code d.ddde-x}; {@code -0}
 *       as {@code 0}. NaN and infinities cannot be written.</li>
 *   <li>Strings (RFC 8785 section 3.2.2.2): {@code "} and {@code \} escaped as {@code \"} and {@code \\};
 *       U+0008, U+0009, U+000A, U+000C, U+000D as {@code \b \t \n \f \r}; other characters below U+0020 as
 *       {@code \}{@code u00xx} with lowercase hex; every other character as itself in UTF-8 ({@code /} and
 *       non-ASCII are not escaped). Unpaired surrogates cannot be written.</li>
 * </ol>
 * <p>Compatibility rule: a field added to a schema after its first release carries the schema property
 * {@code "canonical": "when-set"} (see {@link #WHEN_SET}), must be nullable with a null default, and enters
 * the canonical JSON only when its value is not null. A record written before the field existed therefore
 * keeps its canonical text, its hash and its signature. Fields of the first release are always written.
 *
 * <p>In JavaScript, {@code JSON.stringify} of the same value with keys sorted produces the same text as long
 * as no integer exceeds 2^53 in magnitude.
 */
public final class CanonicalJson {

    /** Schema property of a field added after the first release; its value {@value #WHEN_SET}. */
    public static final String CANONICAL_PROPERTY = "canonical";
    /** Value of {@link #CANONICAL_PROPERTY}: the field is written only when it is not null. */
    public static final String WHEN_SET = "when-set";

    private static final SpecificData DATA = SpecificData.get();
    /** The keys of each record schema in canonical order; schemas are few (one per record type and version). */
    private static final Map<Schema, Keys> KEYS = new ConcurrentHashMap<>();

    private CanonicalJson() {
    }

    /**
     * The canonical JSON text of {@code record}.
     *
     * @throws IllegalArgumentException naming the field when a value cannot be written (NaN, an infinity,
     *                                  an unpaired surrogate, a null in a field that is not nullable)
     */
    public static String of(IndexedRecord record) {
        return without(record, Set.<String>of());
    }

    /**
     * The canonical JSON text of {@code record} with the top-level field {@code excluded} left out entirely
     * (not written as null); {@code null} leaves nothing out.
     *
     * @throws IllegalArgumentException as {@link #of(IndexedRecord)}
     */
    public static String without(IndexedRecord record, String excluded) {
        return without(record, excluded == null ? Set.of() : Set.of(excluded));
    }

    /**
     * The canonical JSON text of {@code record} with the top-level fields named in {@code excluded} left out
     * entirely.
     *
     * @throws IllegalArgumentException as {@link #of(IndexedRecord)}
     */
    public static String without(IndexedRecord record, Set<String> excluded) {
        Writer writer = new Writer();
        writer.record(record, keys(record.getSchema()).without(excluded), null);
        return writer.out.toString();
    }

    private static Keys keys(Schema schema) {
        return KEYS.computeIfAbsent(schema, Keys::of);
    }

    /**
     * The keys of one record schema in key order, and those left when some top-level fields are left out, kept
     * for the last set of names asked for (a caller leaving fields out passes the same set each time).
     */
    private static final class Keys {
        private final List<Key> all;
        private volatile Filtered last;

        private Keys(List<Key> all) {
            this.all = all;
            this.last = new Filtered(Set.of(), all);
        }

        static Keys of(Schema schema) {
            return new Keys(Key.of(schema));
        }

        List<Key> without(Set<String> excluded) {
            Filtered filtered = last;
            if (filtered.excluded() != excluded) {
                filtered = new Filtered(excluded, all.stream().filter(key -> !excluded.contains(key.field().name()))
                        .toList());
                last = filtered;
            }
            return filtered.keys();
        }

        /** The keys left when the fields named in {@code excluded} are left out. */
        private record Filtered(Set<String> excluded, List<Key> keys) {
        }
    }

    /**
     * One field of a record schema as it is written: the field, its key already quoted and followed by the
     * colon, and whether the compatibility rule leaves it out when null.
     */
    private record Key(Schema.Field field, String text, boolean whenSet) {

        /** The record's keys in key order (by name); the same for every record of a schema, so computed once. */
        static List<Key> of(Schema schema) {
            return schema.getFields().stream().sorted(Comparator.comparing(Schema.Field::name))
                    .map(Key::of).toList();
        }

        private static Key of(Schema.Field field) {
            StringBuilder text = new StringBuilder();
            string(field.name(), null, text);
            return new Key(field, text.append(':').toString(), WHEN_SET.equals(field.getProp(CANONICAL_PROPERTY)));
        }
    }

    /** Writes one text; remembers the last double written, since adjacent fields often hold the same one. */
    private static final class Writer {
        private final StringBuilder out = new StringBuilder(4096);
        private final char[] lastNumber = new char[CanonicalNumber.MAX_LENGTH];
        private long lastBits = Double.doubleToRawLongBits(0.0);
        private int lastLength = 1;

        Writer() {
            lastNumber[0] = '0';
        }

        void record(IndexedRecord record, List<Key> keys, FieldPath where) {
            out.append('{');
            boolean first = true;
            for (Key key : keys) {
                Schema.Field field = key.field();
                Object value = record.get(field.pos());
                if (value == null && key.whenSet()) {
                    continue;
                }
                if (!first) {
                    out.append(',');
                }
                first = false;
                out.append(key.text());
                value(value, field.schema(), FieldPath.field(where, field.name()));
            }
            out.append('}');
        }

        private void value(Object value, Schema schema, FieldPath where) {
            if (value == null) {
                if (!schema.isNullable()) {
                    throw new IllegalArgumentException(FieldPath.text(where)
                            + ": null in a field that is not nullable");
                }
                out.append("null");
                return;
            }
            switch (schema.getType()) {
                case UNION -> value(value, Unions.branch(schema, value, DATA), where);
                case RECORD -> record((IndexedRecord) value, keys(schema).all, where);
                case ARRAY -> array((List<?>) value, schema.getElementType(), where);
                case ENUM, STRING -> string(value.toString(), where, out);
                case LONG, INT -> out.append(((Number) value).longValue());
                case BOOLEAN -> out.append(((Boolean) value).booleanValue());
                case DOUBLE -> number((Double) value, where);
                default -> throw new IllegalStateException("schema type " + schema.getType() + " is not supported");
            }
        }

        private void array(List<?> items, Schema itemSchema, FieldPath where) {
            out.append('[');
            for (int i = 0; i < items.size(); i++) {
                if (i > 0) {
                    out.append(',');
                }
                value(items.get(i), itemSchema, FieldPath.item(where, i));
            }
            out.append(']');
        }

        private void number(double value, FieldPath where) {
            long bits = Double.doubleToRawLongBits(value);
            if (bits != lastBits) {
                if (!Double.isFinite(value)) {
                    throw new IllegalArgumentException(FieldPath.text(where) + ": " + value
                            + " cannot be written in JSON");
                }
                lastLength = CanonicalNumber.write(value, lastNumber);
                lastBits = bits;
            }
            out.append(lastNumber, 0, lastLength);
        }
    }

    /**
     * Appends {@code text} as a JSON string; {@code where} names it in the error about an unpaired surrogate.
     * Text with nothing to escape (the usual case) is appended as it is.
     */
    private static void string(String text, FieldPath where, StringBuilder out) {
        out.append('"');
        if (plain(text)) {
            out.append(text);
        } else {
            escaped(text, where, out);
        }
        out.append('"');
    }

    /** True when no character of {@code text} is escaped or checked: none below U+0020, quote, backslash, surrogate. */
    private static boolean plain(String text) {
        for (int i = 0; i < text.length(); i++) {
            char c = text.charAt(i);
            if (c < 0x20 || c == '"' || c == '\\' || Character.isSurrogate(c)) {
                return false;
            }
        }
        return true;
    }

    private static void escaped(String text, FieldPath where, StringBuilder out) {
        for (int i = 0; i < text.length(); i++) {
            char c = text.charAt(i);
            switch (c) {
                case '"' -> out.append("\\\"");
                case '\\' -> out.append("\\\\");
                case '\b' -> out.append("\\b");
                case '\t' -> out.append("\\t");
                case '\n' -> out.append("\\n");
                case '\f' -> out.append("\\f");
                case '\r' -> out.append("\\r");
                default -> {
                    if (c < 0x20) {
                        out.append(String.format("\\u%04x", (int) c));
                    } else if (Character.isSurrogate(c) && !pairedAt(text, i)) {
                        throw new IllegalArgumentException(FieldPath.text(where) + ": unpaired surrogate at index " + i
                                + " cannot be written as UTF-8");
                    } else {
                        out.append(c);
                    }
                }
            }
        }
    }

    private static boolean pairedAt(String text, int i) {
        char c = text.charAt(i);
        if (Character.isHighSurrogate(c)) {
            return i + 1 < text.length() && Character.isLowSurrogate(text.charAt(i + 1));
        }
        return i > 0 && Character.isHighSurrogate(text.charAt(i - 1));
    }

    /**
     * ECMAScript {@code Number.prototype.toString} of a finite double, as used by RFC 8785: e.g. 1 for 1.0,
     * 0.000001 for 1e-6, 1e-7 for 1e-7, 1e+21 for 1e21, 5e-324 for the smallest subnormal (see
     * {@link CanonicalNumber}).
     *
     * @throws IllegalArgumentException for NaN and infinities
     */
    public static String number(double value) {
        char[] text = new char[CanonicalNumber.MAX_LENGTH];
        return new String(text, 0, CanonicalNumber.write(value, text));
    }
}
