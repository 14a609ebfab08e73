package dev.runoff.records;

import java.util.ArrayList;
import java.util.List;
import java.util.Objects;

/**
 * Collects the problems of one record; the checks name the field and the value in each message. A view
 * {@link #under} a parent field makes the text of its path only when it records a problem, so checking a
 * valid record joins no strings.
 */
final class Problems {

    private static final int MAX_QUOTED = 64;

    private static final double SUM_TOLERANCE = 1e-9;

    private final List<Problem> list;
    private final Problems outer;
    private final String parent;
    private final int item;
    private String prefix;

    Problems() {
        this(new ArrayList<>(), null, null, -1);
        prefix = "";
    }

    private Problems(List<Problem> list, Problems outer, String parent, int item) {
        this.list = list;
        this.outer = outer;
        this.parent = parent;
        this.item = item;
    }

    /** A view that adds to the same list with {@code parent.} in front of every field path. */
    Problems under(String parent) {
        return new Problems(list, this, parent, -1);
    }

    /** A view that adds to the same list with {@code items[index].} in front of every field path. */
    Problems under(String items, int index) {
        return new Problems(list, this, items, index);
    }

    /** Records one problem. */
    void add(String field, Reason reason, String message) {
        list.add(new Problem(prefix() + field, reason, message));
    }

    private String prefix() {
        if (prefix == null) {
            prefix = outer.prefix() + parent + (item >= 0 ? "[" + item + "]" : "") + ".";
        }
        return prefix;
    }

    boolean isEmpty() {
        return list.isEmpty();
    }

    int size() {
        return list.size();
    }

    List<Problem> list() {
        return List.copyOf(list);
    }

    /** Adds a MISSING problem when {@code value} is null; returns whether it was present. */
    boolean present(String field, Object value) {
        if (value == null) {
            add(field, Reason.MISSING, "missing");
        }
        return value != null;
    }

    /** Requires {@code value > 0} (NaN fails; finiteness is checked for every double by SchemaChecks). */
    void positive(String field, double value) {
        if (!(value > 0)) {
            add(field, Reason.OUT_OF_RANGE, "must be > 0, got " + value);
        }
    }

    /** Requires {@code value >= min}. */
    void atLeast(String field, long value, long min) {
        if (value < min) {
            add(field, Reason.OUT_OF_RANGE, "must be >= " + min + ", got " + value);
        }
    }

    /** Requires {@code lo <= value <= hi}. */
    void closed(String field, double value, double lo, double hi) {
        if (!(value >= lo && value <= hi)) {
            add(field, Reason.OUT_OF_RANGE, "must be in [" + lo + ", " + hi + "], got " + value);
        }
    }

    /** Requires {@code lo < value < hi}. */
    void open(String field, double value, double lo, double hi) {
        if (!(value > lo && value < hi)) {
            add(field, Reason.OUT_OF_RANGE, "must be in (" + lo + ", " + hi + "), got " + value);
        }
    }

    /**
     * Requires a string that is not blank, when present (null passes: presence is the schema's business;
     * length and characters are checked for every string by SchemaChecks).
     */
    void notBlank(String field, String value) {
        if (value != null && value.isBlank()) {
            add(field, Reason.INVALID_TEXT, "must not be blank");
        }
    }

    /**
     * Requires names that are not blank and appear once each; {@code items} is the path of the list. Lists are
     * short (at most {@link Limits#maxArms()} items), so each name is compared with those before it.
     */
    void uniqueNames(String items, List<String> names, String suffix) {
        for (int i = 0; i < names.size(); i++) {
            String name = names.get(i);
            if (name != null && name.isBlank()) {
                add(items + "[" + i + "]" + suffix, Reason.INVALID_TEXT, "must not be blank");
            }
            int first = firstIndexOf(names, name, i);
            if (first < i) {
                add(items + "[" + i + "]" + suffix, Reason.DUPLICATE, quote(name) + " appears twice (also at index "
                        + first + ")");
            }
        }
    }

    /** The first index below {@code end} holding {@code name}, or {@code end}. */
    private static int firstIndexOf(List<String> names, String name, int end) {
        for (int j = 0; j < end; j++) {
            if (Objects.equals(names.get(j), name)) {
                return j;
            }
        }
        return end;
    }

    /** Requires a list of at least {@code min} items. */
    void atLeastItems(String field, int size, int min) {
        if (size < min) {
            add(field, Reason.TOO_FEW, size + " items, at least " + min + " required");
        }
    }

    /** Requires weights that sum to 1 within 1e-9. */
    void sumsToOne(String field, double sum) {
        if (!(Math.abs(sum - 1.0) <= SUM_TOLERANCE)) {
            add(field, Reason.INCONSISTENT, "sum to " + sum + ", not 1 (tolerance " + SUM_TOLERANCE + ")");
        }
    }

    /** Joins a parent path and a field name: {@code metric} + {@code kind} = {@code metric.kind}. */
    static String path(String parent, String child) {
        return parent.isEmpty() ? child : parent + "." + child;
    }

    /**
     * {@code text} in single quotes, cut to 64 code points and with control characters escaped, so that a
     * hostile value cannot flood or forge a log line or a dead-letter header.
     */
    static String quote(String text) {
        StringBuilder out = new StringBuilder("'");
        int shown = 0;
        for (int i = 0; i < text.length() && shown < MAX_QUOTED; shown++) {
            int cp = text.codePointAt(i);
            i += Character.charCount(cp);
            if (Character.isISOControl(cp) || Character.isSurrogate((char) cp) && cp < 0x10000) {
                out.append(String.format("\\u%04x", cp));
            } else {
                out.appendCodePoint(cp);
            }
        }
        if (text.codePointCount(0, text.length()) > MAX_QUOTED) {
            out.append("...");
        }
        return out.append('\'').toString();
    }
}
