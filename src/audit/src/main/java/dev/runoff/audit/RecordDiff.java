package dev.runoff.audit;

import java.util.List;
import java.util.Objects;
import java.util.Optional;
import org.apache.avro.Schema;
import org.apache.avro.generic.IndexedRecord;

/**
 * The first field, in schema order, where two records of the same Avro schema differ, with its path (e.g.
 * {@code arms[1].posterior.a}). Doubles are equal when they are the same number: {@code ==}, so that 0 and -0,
 * which canonical JSON cannot tell apart, compare equal; every other double must match bit for bit.
 */
final class RecordDiff {

    private RecordDiff() {
    }

    /**
     * The first difference between {@code recorded} and {@code recomputed}, ignoring the top-level fields named
     * in {@code ignored}.
     */
    static Optional<Difference> first(IndexedRecord recorded, IndexedRecord recomputed, List<String> ignored) {
        return record(recorded, recomputed, "", ignored);
    }

    private static Optional<Difference> record(IndexedRecord a, IndexedRecord b, String prefix, List<String> ignored) {
        if (!a.getSchema().equals(b.getSchema())) {
            return Optional.of(new Difference(prefix.isEmpty() ? "record" : prefix.substring(0, prefix.length() - 1),
                    a, b));
        }
        for (Schema.Field field : a.getSchema().getFields()) {
            if (ignored.contains(field.name())) {
                continue;
            }
            Optional<Difference> d = value(a.get(field.pos()), b.get(field.pos()), prefix + field.name());
            if (d.isPresent()) {
                return d;
            }
        }
        return Optional.empty();
    }

    private static Optional<Difference> value(Object a, Object b, String path) {
        if (a instanceof IndexedRecord ra && b instanceof IndexedRecord rb) {
            return record(ra, rb, path + ".", List.of());
        }
        if (a instanceof List<?> la && b instanceof List<?> lb) {
            if (la.size() != lb.size()) {
                return Optional.of(new Difference(path, a, b));
            }
            for (int i = 0; i < la.size(); i++) {
                Optional<Difference> d = value(la.get(i), lb.get(i), path + "[" + i + "]");
                if (d.isPresent()) {
                    return d;
                }
            }
            return Optional.empty();
        }
        boolean same = a instanceof Double x && b instanceof Double y ? x.doubleValue() == y.doubleValue()
                : Objects.equals(a, b);
        return same ? Optional.empty() : Optional.of(new Difference(path, a, b));
    }

    /**
     * One difference.
     *
     * @param field      path of the field
     * @param recorded   the value in the record
     * @param recomputed the value recomputed
     */
    record Difference(String field, Object recorded, Object recomputed) {

        /** The top-level field name: {@code arms} for {@code arms[1].alpha}. */
        String topLevel() {
            int end = field.length();
            for (char c : new char[] {'.', '['}) {
                int i = field.indexOf(c);
                if (i >= 0) {
                    end = Math.min(end, i);
                }
            }
            return field.substring(0, end);
        }
    }
}
