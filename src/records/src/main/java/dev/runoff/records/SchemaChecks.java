package dev.runoff.records;

import java.util.List;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.IndexedRecord;

/**
 * Checks that hold for every field of every record, whatever the wire format: required fields present,
 * strings within the length limit and made of valid, printable Unicode, doubles finite, lists within the
 * arm limit. Walks the Avro schema beside the value.
 */
final class SchemaChecks {

    private final Limits limits;

    SchemaChecks(Limits limits) {
        this.limits = limits;
    }

    /** Adds a problem for every field of {@code record} that breaks a generic rule. */
    void check(IndexedRecord record, Problems problems) {
        checkRecord(record, record.getSchema(), null, problems);
    }

    private void checkRecord(IndexedRecord record, Schema schema, FieldPath path, Problems problems) {
        for (Schema.Field field : schema.getFields()) {
            check(record.get(field.pos()), field.schema(), FieldPath.field(path, field.name()), problems);
        }
    }

    private void check(Object value, Schema schema, FieldPath path, Problems problems) {
        if (value == null) {
            if (!schema.isNullable()) {
                problems.add(FieldPath.text(path), Reason.MISSING, "missing");
            }
            return;
        }
        switch (schema.getType()) {
            case UNION -> check(value, Unions.branch(schema, value, GenericData.get()), path, problems);
            case RECORD -> checkRecord((IndexedRecord) value, schema, path, problems);
            case ARRAY -> checkArray((List<?>) value, schema.getElementType(), path, problems);
            case STRING -> checkText(value.toString(), path, problems);
            case DOUBLE -> checkFinite((Double) value, path, problems);
            default -> {
                // enums, longs and ints carry no further generic constraint
            }
        }
    }

    private void checkArray(List<?> items, Schema itemSchema, FieldPath path, Problems problems) {
        if (items.size() > limits.maxArms()) {
            problems.add(FieldPath.text(path), Reason.TOO_MANY,
                    items.size() + " items, at most " + limits.maxArms() + " allowed");
            return;
        }
        for (int i = 0; i < items.size(); i++) {
            check(items.get(i), itemSchema, FieldPath.item(path, i), problems);
        }
    }

    private static void checkFinite(double value, FieldPath path, Problems problems) {
        if (!Double.isFinite(value)) {
            problems.add(FieldPath.text(path), Reason.NOT_FINITE, value + " is not a finite number");
        }
    }

    private void checkText(String text, FieldPath path, Problems problems) {
        if (text.length() <= limits.maxStringLength() && printableAscii(text)) {
            return;
        }
        int length = text.codePointCount(0, text.length());
        if (length > limits.maxStringLength()) {
            problems.add(FieldPath.text(path), Reason.TOO_LONG,
                    length + " characters, at most " + limits.maxStringLength() + " allowed");
            return;
        }
        String bad = firstInvalidCharacter(text);
        if (bad != null) {
            problems.add(FieldPath.text(path), Reason.INVALID_TEXT, bad + " in " + Problems.quote(text));
        }
    }

    /**
     * True when every character is printable ASCII (U+0020 to U+007E): then the text has as many code points as
     * characters, and neither control characters nor surrogates, so only its length is left to check.
     */
    private static boolean printableAscii(String text) {
        for (int i = 0; i < text.length(); i++) {
            char c = text.charAt(i);
            if (c < 0x20 || c > 0x7E) {
                return false;
            }
        }
        return true;
    }

    /** Describes the first control character or unpaired surrogate in {@code text}, or returns null. */
    static String firstInvalidCharacter(String text) {
        for (int i = 0; i < text.length(); ) {
            int cp = text.codePointAt(i);
            if (Character.isISOControl(cp)) {
                return String.format("control character U+%04X at index %d", cp, i);
            }
            if (cp < 0x10000 && Character.isSurrogate((char) cp)) {
                return String.format("unpaired surrogate U+%04X at index %d (not valid Unicode)", cp, i);
            }
            i += Character.charCount(cp);
        }
        return null;
    }
}
