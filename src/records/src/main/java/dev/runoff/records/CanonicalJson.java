package dev.runoff.records;

import java.math.BigDecimal;
import java.math.MathContext;
import java.math.RoundingMode;
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

    private static final int MAX_SIGNIFICANT_DIGITS = 17;
    private static final int PLAIN_UPPER_EXPONENT = 21;
    private static final int PLAIN_LOWER_EXPONENT = -6;
    private static final SpecificData DATA = SpecificData.get();
    /** The keys of each record schema in canonical order; schemas are few (one per record type and version). */
    private static final Map<Schema, List<Key>> KEYS = new ConcurrentHashMap<>();
    /** Doubles with an integer value below this are written as that integer (see {@link #number(String, double)}). */
    private static final double EXACT_INTEGERS = 0x1p53;

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
        writer.record(record, record.getSchema(), null, excluded);
        return writer.out.toString();
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
        private final StringBuilder out = new StringBuilder(1024);
        private long lastBits = Double.doubleToRawLongBits(0.0);
        private String lastNumber = "0";

        void record(IndexedRecord record, Schema schema, FieldPath where, Set<String> excluded) {
            out.append('{');
            boolean first = true;
            for (Key key : KEYS.computeIfAbsent(schema, Key::of)) {
                Schema.Field field = key.field();
                Object value = record.get(field.pos());
                if (value == null && key.whenSet() || !excluded.isEmpty() && excluded.contains(field.name())) {
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
                case UNION -> value(value, schema.getTypes().get(DATA.resolveUnion(schema, value)), where);
                case RECORD -> record((IndexedRecord) value, schema, where, Set.of());
                case ARRAY -> array((List<?>) value, schema.getElementType(), where);
                case ENUM, STRING -> string(value.toString(), where, out);
                case LONG, INT, BOOLEAN -> out.append(value);
                case DOUBLE -> out.append(number((Double) value, where));
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

        private String number(double value, FieldPath where) {
            long bits = Double.doubleToRawLongBits(value);
            if (bits != lastBits) {
                if (!Double.isFinite(value)) {
                    throw new IllegalArgumentException(FieldPath.text(where) + ": " + value
                            + " cannot be written in JSON");
                }
                lastNumber = CanonicalJson.number("number", value);
                lastBits = bits;
            }
            return lastNumber;
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
     * 0.000001 for 1e-6, 1e-7 for 1e-7, 1e+21 for 1e21, 5e-324 for the smallest subnormal.
     *
     * @throws IllegalArgumentException for NaN and infinities
     */
    public static String number(double value) {
        return number("number", value);
    }

    /**
     * Why an integer value below 2^53 is written as its digits: the reals that round to it lie within half a
     * unit of it (its neighbours are at most 1 away), while a decimal with fewer significant digits than the
     * integer's, once its trailing zeros are dropped, is a multiple of a power of ten that the integer is not,
     * so at least 1 away; and of the decimals with as many digits the integer itself is the closest. Written in
     * plain notation, since it is below 1e21.
     */
    private static String number(String path, double value) {
        if (!Double.isFinite(value)) {
            throw new IllegalArgumentException(path + ": " + value + " cannot be written in JSON");
        }
        if (value == 0) {
            return "0";
        }
        if (value < 0) {
            return "-" + number(path, -value);
        }
        if (value < EXACT_INTEGERS && value == Math.rint(value)) {
            return Long.toString((long) value);
        }
        String fast = JavaDigits.canonical(value);
        return fast != null ? fast : exactNumber(value);
    }

    /** The canonical text of a positive finite {@code value} by the exact search of {@link #shortestDecimal}. */
    static String exactNumber(double value) {
        BigDecimal shortest = shortestDecimal(value).stripTrailingZeros();
        String digits = shortest.unscaledValue().toString();
        return layout(digits, digits.length() - shortest.scale());
    }

    /**
     * The canonical text of a positive finite {@code value} from the digits of {@link Double#toString(double)}
     * when exact comparisons prove them to be the ones {@link #shortestDecimal} would choose, else null.
     *
     * <p>Why the proof holds: let D be Java's digits without trailing zeros, L of them, with step u between
     * L-digit decimals at D's exponent. If D reads back and the exact value lies strictly within u/2 of D,
     * D is the unique nearest L-digit decimal, so the nearest of those that read back. The exact value then
     * also lies strictly between T (D cut to L - 1 digits) and T + 10u, the two (L - 1)-digit decimals around
     * it; any other (L - 1)-digit decimal lies farther away, outside the interval that reads back if those two
     * lie outside it. So when neither reads back, no decimal of fewer than L digits does (whether p digits
     * suffice is monotone in p), and D is the answer. Otherwise the exact search decides.
     */
    static String fastNumber(double value) {
        return JavaDigits.canonical(value);
    }

    /**
     * The digits of {@link Double#toString(double)} and the exact comparisons that prove them canonical. A
     * positive finite double is {@code m 2^e} with integer m; decimals are {@code N 10^p} with integer N; the
     * bounds of the interval that reads back are {@code (2m - 1) 2^(e-1)} (or {@code (4m - 1) 2^(e-2)} when the
     * value is a power of two, where the gap below is half the gap above) and {@code (2m + 1) 2^(e-1)}, included
     * when m is even (IEEE 754 round-half-even), as in {@link RoundingInterval}.
     */
    private static final class JavaDigits {
        private static final long MAX_DIGITS = 100_000_000_000_000_000L;
        private static final int MAX_EXPONENT = BinaryDecimalSign.maxDecimalExponent() - 2;

        private final long m;
        private final int e;
        private final long lowM;
        private final int lowE;

        private JavaDigits(double value) {
            long bits = Double.doubleToRawLongBits(value);
            int biased = (int) (bits >>> 52);
            long fraction = bits & ((1L << 52) - 1);
            m = biased == 0 ? fraction : fraction | (1L << 52);
            e = biased == 0 ? -1074 : biased - 1075;
            boolean narrowBelow = fraction == 0 && biased > 1;
            lowM = narrowBelow ? 4 * m - 1 : 2 * m - 1;
            lowE = narrowBelow ? e - 2 : e - 1;
        }

        static String canonical(double value) {
            String text = Double.toString(value);
            long digits = 0;
            int exponent = 0;
            boolean fraction = false;
            for (int i = 0; i < text.length(); i++) {
                char c = text.charAt(i);
                if (c == '.') {
                    fraction = true;
                } else if (c == 'E') {
                    exponent += Integer.parseInt(text, i + 1, text.length(), 10);
                    break;
                } else {
                    digits = digits * 10 + (c - '0');
                    if (digits >= MAX_DIGITS) {
                        return null;
                    }
                    exponent -= fraction ? 1 : 0;
                }
            }
            while (digits % 10 == 0) {
                digits /= 10;
                exponent++;
            }
            if (exponent < -MAX_EXPONENT || exponent > MAX_EXPONENT) {
                return null;
            }
            return new JavaDigits(value).isCanonical(digits, exponent)
                    ? layout(Long.toString(digits), length(digits) + exponent) : null;
        }

        private boolean isCanonical(long digits, int exponent) {
            boolean nearest = BinaryDecimalSign.of(m, e, 10 * digits - 5, exponent - 1) > 0
                    && BinaryDecimalSign.of(m, e, 10 * digits + 5, exponent - 1) < 0;
            return nearest && readsBack(digits, exponent) && (digits < 10
                    || !readsBack(digits / 10, exponent + 1) && !readsBack(digits / 10 + 1, exponent + 1));
        }

        private boolean readsBack(long digits, int exponent) {
            int vsLow = -BinaryDecimalSign.of(lowM, lowE, digits, exponent);
            int vsHigh = -BinaryDecimalSign.of(2 * m + 1, e - 1, digits, exponent);
            return vsLow > 0 && vsHigh < 0 || (m & 1) == 0 && (vsLow == 0 || vsHigh == 0);
        }

        private static int length(long digits) {
            int n = 1;
            for (long d = digits; d >= 10; d /= 10) {
                n++;
            }
            return n;
        }
    }

    /**
     * Lays out digits {@code s} (k of them) with decimal exponent {@code n}, meaning s * 10^(n - k), following
     * ECMAScript Number::toString steps 6 to 10.
     */
    private static String layout(String s, int n) {
        int k = s.length();
        if (k <= n && n <= PLAIN_UPPER_EXPONENT) {
            return s + "0".repeat(n - k);
        }
        if (0 < n && n <= PLAIN_UPPER_EXPONENT) {
            return s.substring(0, n) + "." + s.substring(n);
        }
        if (PLAIN_LOWER_EXPONENT < n && n <= 0) {
            return "0." + "0".repeat(-n) + s;
        }
        int e = n - 1;
        String exponent = "e" + (e < 0 ? "-" : "+") + Math.abs(e);
        return k == 1 ? s + exponent : s.charAt(0) + "." + s.substring(1) + exponent;
    }

    /**
     * The decimal with the fewest significant digits that rounds back to {@code value} (positive, finite),
     * the closer one when two such decimals of that length exist, the even one on an exact tie: the choice
     * ECMAScript Number::toString step 5 prescribes. Whether p digits suffice is monotone in p (every p-digit
     * decimal is also a (p + 1)-digit one). {@link Double#toString(double)} gives a decimal that reads back
     * exactly, usually (but on Java 17 not always) of the fewest digits: its length is tried first and one
     * digit fewer; a binary search below it runs only when that shorter length suffices.
     */
    static BigDecimal shortestDecimal(double value) {
        RoundingInterval interval = new RoundingInterval(value);
        int hi = new BigDecimal(Double.toString(value)).stripTrailingZeros().precision();
        BigDecimal best = interval.nearestReadingBack(hi);
        if (hi == 1 || interval.nearestReadingBack(hi - 1) == null) {
            return best;
        }
        int lo = 1;
        hi--;
        best = interval.nearestReadingBack(hi);
        while (lo < hi) {
            int mid = (lo + hi) >>> 1;
            BigDecimal candidate = interval.nearestReadingBack(mid);
            if (candidate != null) {
                best = candidate;
                hi = mid;
            } else {
                lo = mid + 1;
            }
        }
        return best;
    }

    /**
     * The exact value of a positive finite double and the bounds of the reals that round to it under IEEE 754
     * round-half-even: half the gap to each neighbour (the gap above is {@link Math#ulp(double)}, also for
     * the largest double, whose upper bound is where rounding overflows to infinity).
     */
    private static final class RoundingInterval {
        private static final BigDecimal HALF = new BigDecimal("0.5");

        private final BigDecimal exact;
        private final BigDecimal low;
        private final BigDecimal high;
        private final boolean boundsReadBack;

        RoundingInterval(double value) {
            exact = new BigDecimal(value);
            low = exact.subtract(new BigDecimal(value - Math.nextDown(value)).multiply(HALF));
            high = exact.add(new BigDecimal(Math.ulp(value)).multiply(HALF));
            boundsReadBack = (Double.doubleToRawLongBits(value) & 1) == 0;
        }

        /** The p-digit decimal nearest to the value among those that read back as it, or null if none does. */
        BigDecimal nearestReadingBack(int p) {
            BigDecimal down = exact.round(new MathContext(p, RoundingMode.FLOOR));
            BigDecimal up = exact.round(new MathContext(p, RoundingMode.CEILING));
            boolean downOk = readsBack(down);
            boolean upOk = readsBack(up);
            if (downOk && upOk) {
                int cmp = exact.subtract(down).compareTo(up.subtract(exact));
                if (cmp != 0) {
                    return cmp < 0 ? down : up;
                }
                return exact.round(new MathContext(p, RoundingMode.HALF_EVEN));
            }
            return downOk ? down : upOk ? up : null;
        }

        private boolean readsBack(BigDecimal decimal) {
            int vsLow = decimal.compareTo(low);
            int vsHigh = decimal.compareTo(high);
            return vsLow > 0 && vsHigh < 0 || boundsReadBack && (vsLow == 0 || vsHigh == 0);
        }
    }
}
