package dev.runoff.records;

import com.fasterxml.jackson.core.JsonFactory;
import com.fasterxml.jackson.core.JsonLocation;
import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.core.StreamReadConstraints;
import com.fasterxml.jackson.core.StreamReadFeature;
import com.fasterxml.jackson.core.exc.StreamConstraintsException;
import com.fasterxml.jackson.core.json.JsonReadFeature;
import com.fasterxml.jackson.databind.DeserializationFeature;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.json.JsonMapper;
import java.io.IOException;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.List;
import java.util.Locale;
import java.util.stream.Collectors;
import org.apache.avro.Schema;
import org.apache.avro.generic.IndexedRecord;
import org.apache.avro.specific.SpecificData;

/**
 * Reads the documented JSON layout into generated Avro classes, walking the schema beside the JSON tree.
 * Layout: one JSON object per record with the schema's field names; enums as their symbol strings;
 * {@code long}/{@code int} fields as JSON integers (no fraction, no exponent); {@code double} fields as any
 * JSON number (and the non-standard tokens NaN and Infinity, so they can be rejected by name); a field with a
 * default may be omitted; a nullable field may be null or omitted; a union of several record types (priors,
 * posteriors) is written as the chosen record's object, recognised by its field names.
 */
final class JsonRecordReader {

    private static final int MAX_NUMBER_LENGTH = 64;
    private static final SpecificData DATA = SpecificData.get();

    private final ObjectMapper mapper;

    JsonRecordReader(Limits limits) {
        JsonFactory factory = JsonFactory.builder()
                .streamReadConstraints(StreamReadConstraints.builder()
                        .maxNestingDepth(limits.maxDepth())
                        .maxDocumentLength(limits.maxBytes())
                        .maxStringLength(limits.maxBytes())
                        .maxNameLength(limits.maxStringLength())
                        .maxNumberLength(MAX_NUMBER_LENGTH)
                        .build())
                .enable(JsonReadFeature.ALLOW_NON_NUMERIC_NUMBERS)
                .enable(StreamReadFeature.STRICT_DUPLICATE_DETECTION)
                .build();
        this.mapper = JsonMapper.builder(factory).enable(DeserializationFeature.FAIL_ON_TRAILING_TOKENS).build();
    }

    /**
     * Parses {@code bytes} as a record of {@code schema}; returns null after adding at least one problem.
     *
     * @param strict reject fields the schema does not know (else ignore them, for forward compatibility)
     */
    IndexedRecord read(byte[] bytes, Schema schema, boolean strict, Problems problems) {
        JsonNode root = parse(bytes, problems);
        if (root == null) {
            return null;
        }
        if (!root.isObject()) {
            problems.add(Problem.WHOLE_RECORD, Reason.MALFORMED_JSON, "expected a JSON object, got " + root.getNodeType());
            return null;
        }
        return (IndexedRecord) new Walk(strict, problems).record(root, schema, "");
    }

    private JsonNode parse(byte[] bytes, Problems problems) {
        try {
            return mapper.readTree(bytes);
        } catch (StreamConstraintsException e) {
            problems.add(Problem.WHOLE_RECORD, Reason.TOO_LARGE, describe(e));
        } catch (JsonProcessingException e) {
            problems.add(Problem.WHOLE_RECORD, Reason.MALFORMED_JSON, describe(e));
        } catch (IOException e) {
            problems.add(Problem.WHOLE_RECORD, Reason.MALFORMED_JSON, "unreadable JSON: " + e.getClass().getSimpleName());
        }
        return null;
    }

    private static String describe(JsonProcessingException e) {
        String message = e.getOriginalMessage() == null ? e.getClass().getSimpleName() : e.getOriginalMessage();
        String firstLine = message.lines().findFirst().orElse("");
        JsonLocation at = e.getLocation();
        String where = at == null ? "" : " at line " + at.getLineNr() + ", column " + at.getColumnNr();
        return "invalid JSON" + where + ": " + Problems.quote(firstLine);
    }

    /** One walk over one document, adding problems as it goes and continuing past them. */
    private static final class Walk {
        private final boolean strict;
        private final Problems problems;

        Walk(boolean strict, Problems problems) {
            this.strict = strict;
            this.problems = problems;
        }

        /** Reads every field first and builds the record only when none had a problem. */
        Object record(JsonNode node, Schema schema, String path) {
            if (!node.isObject()) {
                return wrongType(path, "an object", node);
            }
            int before = problems.size();
            List<Schema.Field> fields = schema.getFields();
            Object[] values = new Object[fields.size()];
            for (Schema.Field field : fields) {
                String fieldPath = Problems.path(path, field.name());
                JsonNode child = node.get(field.name());
                values[field.pos()] = child == null ? defaultOrMissing(field, fieldPath)
                        : value(child, field.schema(), fieldPath);
            }
            if (strict) {
                rejectUnknownFields(node, schema, path);
            }
            if (problems.size() != before) {
                return null;
            }
            IndexedRecord record = (IndexedRecord) DATA.newRecord(null, schema);
            for (int i = 0; i < values.length; i++) {
                record.put(i, values[i]);
            }
            return record;
        }

        private Object defaultOrMissing(Schema.Field field, String path) {
            if (field.hasDefaultValue()) {
                return DATA.deepCopy(field.schema(), DATA.getDefaultValue(field));
            }
            problems.add(path, Reason.MISSING, "missing");
            return null;
        }

        private void rejectUnknownFields(JsonNode node, Schema schema, String path) {
            for (Iterator<String> names = node.fieldNames(); names.hasNext(); ) {
                String name = names.next();
                if (schema.getField(name) == null) {
                    problems.add(Problems.path(path, name), Reason.UNKNOWN_FIELD, "unknown field (expected one of "
                            + schema.getFields().stream().map(Schema.Field::name).collect(Collectors.joining(", "))
                            + ")");
                }
            }
        }

        private Object value(JsonNode node, Schema schema, String path) {
            if (node.isNull()) {
                if (!schema.isNullable()) {
                    problems.add(path, Reason.MISSING, "must not be null");
                }
                return null;
            }
            return switch (schema.getType()) {
                case UNION -> union(node, schema, path);
                case RECORD -> record(node, schema, path);
                case ARRAY -> array(node, schema.getElementType(), path);
                case ENUM -> enumSymbol(node, schema, path);
                case STRING -> node.isTextual() ? node.textValue() : wrongType(path, "a string", node);
                case LONG -> integer(node, path, Long.MIN_VALUE, Long.MAX_VALUE);
                case INT -> {
                    Object v = integer(node, path, Integer.MIN_VALUE, Integer.MAX_VALUE);
                    yield v == null ? null : ((Long) v).intValue();
                }
                case DOUBLE -> node.isNumber() ? node.doubleValue() : wrongType(path, "a number", node);
                case BOOLEAN -> node.isBoolean() ? node.booleanValue() : wrongType(path, "true or false", node);
                default -> throw new IllegalStateException("schema type " + schema.getType() + " is not supported");
            };
        }

        private Object union(JsonNode node, Schema union, String path) {
            List<Schema> branches = new ArrayList<>();
            for (Schema branch : union.getTypes()) {
                if (branch.getType() != Schema.Type.NULL) {
                    branches.add(branch);
                }
            }
            if (branches.size() == 1) {
                return value(node, branches.get(0), path);
            }
            if (!node.isObject()) {
                return wrongType(path, "an object", node);
            }
            List<Schema> matching = branches.stream().filter(b -> fitsRecord(node, b)).toList();
            if (matching.size() == 1) {
                return record(node, matching.get(0), path);
            }
            problems.add(path, Reason.WRONG_TYPE, "fields " + names(node) + " match "
                    + (matching.isEmpty() ? "none" : "more than one") + " of " + shapes(branches));
            return null;
        }

        private static boolean fitsRecord(JsonNode node, Schema branch) {
            if (branch.getType() != Schema.Type.RECORD) {
                throw new IllegalStateException("unions of several non-null types must hold records: " + branch);
            }
            for (Iterator<String> names = node.fieldNames(); names.hasNext(); ) {
                if (branch.getField(names.next()) == null) {
                    return false;
                }
            }
            return true;
        }

        private static String names(JsonNode node) {
            List<String> names = new ArrayList<>();
            node.fieldNames().forEachRemaining(n -> names.add(Problems.quote(n)));
            return "{" + String.join(", ", names) + "}";
        }

        private static String shapes(List<Schema> branches) {
            return branches.stream().map(b -> b.getName() + " {" + b.getFields().stream().map(Schema.Field::name)
                    .collect(Collectors.joining(", ")) + "}").collect(Collectors.joining(", "));
        }

        private Object array(JsonNode node, Schema itemSchema, String path) {
            if (!node.isArray()) {
                return wrongType(path, "an array", node);
            }
            List<Object> items = new ArrayList<>(node.size());
            for (int i = 0; i < node.size(); i++) {
                items.add(value(node.get(i), itemSchema, path + "[" + i + "]"));
            }
            return items;
        }

        private Object enumSymbol(JsonNode node, Schema schema, String path) {
            if (!node.isTextual()) {
                return wrongType(path, "one of " + schema.getEnumSymbols(), node);
            }
            String symbol = node.textValue();
            if (!schema.hasEnumSymbol(symbol)) {
                problems.add(path, Reason.UNKNOWN_VALUE, "unknown value " + Problems.quote(symbol)
                        + " (expected one of " + String.join(", ", schema.getEnumSymbols()) + ")");
                return null;
            }
            return DATA.createEnum(symbol, schema);
        }

        private Object integer(JsonNode node, String path, long min, long max) {
            if (!node.isIntegralNumber()) {
                return wrongType(path, "an integer", node);
            }
            if (!node.canConvertToLong() || node.longValue() < min || node.longValue() > max) {
                problems.add(path, Reason.OUT_OF_RANGE, Problems.quote(node.asText()) + " does not fit in "
                        + (max == Long.MAX_VALUE ? 64 : 32) + " bits");
                return null;
            }
            return node.longValue();
        }

        private Object wrongType(String path, String expected, JsonNode node) {
            String got = node.isNumber() ? "the number " + node.asText()
                    : node.getNodeType().toString().toLowerCase(Locale.ROOT);
            problems.add(path, Reason.WRONG_TYPE, "expected " + expected + ", got " + got);
            return null;
        }
    }
}
