package dev.runoff.topology;

import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.OutcomeEvent;
import java.nio.charset.StandardCharsets;

/**
 * A quick reader of outcome events in the plain JSON layout producers write: one flat object whose keys are
 * the schema's field names, each at most once, strings of printable ASCII without escapes, plain numbers,
 * {@code null} for the optional fields. It builds the same {@link OutcomeEvent} as the
 * records package's JSON reader does for such input, or returns {@code null} for anything else (escapes,
 * other characters, unknown or repeated keys, missing fields, numbers it does not read exactly as that reader
 * does, more than {@link #MAX_BYTES} bytes), which that reader then decodes, so that every rejection keeps its
 * reason and message. The rules that hold whatever the layout (lengths, blanks, value by type, time) are not
 * checked here: {@code RecordCodec.validate} checks them on the result, as the full decoder does after reading.
 *
 * <p>Design: the general reader builds a JSON tree and walks the Avro schema beside it, most of the cost of
 * validating an event; an event has eight known flat fields, so one pass over the bytes suffices.
 */
final class OutcomeJson {

    /** Largest input read here; below the 16 KiB the records package accepts for an event. */
    static final int MAX_BYTES = 4096;

    private static final String[] FIELDS = {"experimentId", "unitId", "eventId", "type", "timestamp", "arm",
        "value", "signal"};
    private static final int REQUIRED = 0b11111;
    private static final int EXPERIMENT = 0;
    private static final int UNIT = 1;
    private static final int EVENT = 2;
    private static final int TYPE = 3;
    private static final int TIMESTAMP = 4;
    private static final int ARM = 5;
    private static final int VALUE = 6;
    private static final int SIGNAL = 7;
    /** Longest integer read here: 18 digits always fit in a long. */
    private static final int MAX_DIGITS = 18;
    /** Longest number with a fraction or an exponent read here. */
    private static final int MAX_DECIMAL = 32;
    private static final EventType[] TYPES = EventType.values();

    private final byte[] in;
    private int pos;
    private final String[] texts = new String[FIELDS.length];
    private long timestamp;
    private Double value;
    private int present;

    private OutcomeJson(byte[] in) {
        this.in = in;
    }

    /** The event {@code bytes} hold in the plain layout, or {@code null} when they are not in it. */
    static OutcomeEvent read(byte[] bytes) {
        if (bytes == null || bytes.length == 0 || bytes.length > MAX_BYTES) {
            return null;
        }
        return new OutcomeJson(bytes).object();
    }

    private OutcomeEvent object() {
        skipSpace();
        if (!take('{')) {
            return null;
        }
        do {
            if (!field()) {
                return null;
            }
        } while (take(','));
        if (!take('}')) {
            return null;
        }
        skipSpace();
        return pos == in.length && (present & REQUIRED) == REQUIRED ? event() : null;
    }

    private OutcomeEvent event() {
        EventType type = type(texts[TYPE]);
        return type == null ? null : new OutcomeEvent(texts[EXPERIMENT], texts[UNIT], texts[EVENT], type, timestamp,
                texts[ARM], value, texts[SIGNAL]);
    }

    /** Reads one {@code "key": value} pair; false when it is not one this reader takes. */
    private boolean field() {
        skipSpace();
        int field = key();
        if (field < 0 || (present & (1 << field)) != 0) {
            return false;
        }
        present |= 1 << field;
        skipSpace();
        if (!take(':')) {
            return false;
        }
        skipSpace();
        boolean read = switch (field) {
            case TIMESTAMP -> timestamp();
            case VALUE -> value();
            case ARM, SIGNAL -> literalNull() || string(field);
            default -> string(field);
        };
        skipSpace();
        return read;
    }

    private int key() {
        int start = pos + 1;
        if (!take('"')) {
            return -1;
        }
        while (pos < in.length && in[pos] != '"') {
            pos++;
        }
        int length = pos - start;
        if (!take('"')) {
            return -1;
        }
        for (int i = 0; i < FIELDS.length; i++) {
            if (matches(FIELDS[i], start, length)) {
                return i;
            }
        }
        return -1;
    }

    private boolean matches(String name, int start, int length) {
        if (name.length() != length) {
            return false;
        }
        for (int i = 0; i < length; i++) {
            if (in[start + i] != name.charAt(i)) {
                return false;
            }
        }
        return true;
    }

    /** A string of printable ASCII without escapes. */
    private boolean string(int field) {
        if (!take('"')) {
            return false;
        }
        int start = pos;
        while (pos < in.length && in[pos] != '"') {
            byte b = in[pos];
            if (b < 0x20 || b > 0x7E || b == '\\') {
                return false;
            }
            pos++;
        }
        if (pos == in.length) {
            return false;
        }
        texts[field] = new String(in, start, pos - start, StandardCharsets.ISO_8859_1);
        pos++;
        return true;
    }

    private boolean literalNull() {
        if (pos + 4 <= in.length && in[pos] == 'n' && in[pos + 1] == 'u' && in[pos + 2] == 'l' && in[pos + 3] == 'l') {
            pos += 4;
            return true;
        }
        return false;
    }

    private boolean timestamp() {
        int end = integerEnd();
        if (end < 0) {
            return false;
        }
        timestamp = Long.parseLong(new String(in, pos, end - pos, StandardCharsets.ISO_8859_1));
        pos = end;
        return true;
    }

    /**
     * The value: {@code null}; an integer of at most 18 digits, read as a long and widened as the tree reader
     * does (so {@code -0} is 0.0); or a number with a fraction or an exponent, at most 32 characters, read by
     * {@link Double#parseDouble} as the tree reader does. A number that overflows to an infinity is left to
     * the full reader.
     */
    private boolean value() {
        if (literalNull()) {
            return true;
        }
        int end = integerEnd();
        if (end >= 0) {
            value = (double) Long.parseLong(new String(in, pos, end - pos, StandardCharsets.ISO_8859_1));
            pos = end;
            return true;
        }
        end = decimalEnd();
        if (end < 0 || end - pos > MAX_DECIMAL) {
            return false;
        }
        double parsed = Double.parseDouble(new String(in, pos, end - pos, StandardCharsets.ISO_8859_1));
        if (Double.isInfinite(parsed)) {
            return false;
        }
        value = parsed;
        pos = end;
        return true;
    }

    /**
     * The end of a JSON number with a fraction or an exponent or both starting at {@code pos} ({@code -? int
     * frac? exp?} of RFC 8259, section 6), or -1 when there is none.
     */
    private int decimalEnd() {
        int i = intPartEnd();
        if (i < 0) {
            return -1;
        }
        int plain = i;
        if (i < in.length && in[i] == '.') {
            int fraction = i + 1;
            i = digitsEnd(fraction);
            if (i == fraction) {
                return -1;
            }
        }
        if (i < in.length && (in[i] == 'e' || in[i] == 'E')) {
            int exponent = i + 1;
            if (exponent < in.length && (in[exponent] == '+' || in[exponent] == '-')) {
                exponent++;
            }
            i = digitsEnd(exponent);
            if (i == exponent) {
                return -1;
            }
        }
        return i == plain ? -1 : i;
    }

    private int digitsEnd(int from) {
        int i = from;
        while (i < in.length && in[i] >= '0' && in[i] <= '9') {
            i++;
        }
        return i;
    }

    /**
     * The end of a JSON integer starting at {@code pos}: its {@link #intPartEnd() integer part} with at most
     * {@link #MAX_DIGITS} digits, not followed by a fraction or an exponent; -1 when there is none.
     */
    private int integerEnd() {
        int end = intPartEnd();
        if (end < 0 || end - pos - (in[pos] == '-' ? 1 : 0) > MAX_DIGITS) {
            return -1;
        }
        if (end < in.length && (in[end] == '.' || in[end] == 'e' || in[end] == 'E')) {
            return -1;
        }
        return end;
    }

    /**
     * The end of the integer part of a JSON number starting at {@code pos} (RFC 8259, section 6): an optional
     * minus, then {@code 0} or a digit 1-9 followed by digits; -1 when there is none.
     */
    private int intPartEnd() {
        int i = pos;
        if (i < in.length && in[i] == '-') {
            i++;
        }
        int digits = i;
        i = digitsEnd(i);
        if (i == digits || (i - digits > 1 && in[digits] == '0')) {
            return -1;
        }
        return i;
    }

    private static EventType type(String symbol) {
        for (EventType type : TYPES) {
            if (type.name().equals(symbol)) {
                return type;
            }
        }
        return null;
    }

    private boolean take(char c) {
        if (pos < in.length && in[pos] == c) {
            pos++;
            return true;
        }
        return false;
    }

    /** Skips JSON whitespace: space, tab, line feed, carriage return. */
    private void skipSpace() {
        while (pos < in.length && (in[pos] == ' ' || in[pos] == '\t' || in[pos] == '\n' || in[pos] == '\r')) {
            pos++;
        }
    }
}
