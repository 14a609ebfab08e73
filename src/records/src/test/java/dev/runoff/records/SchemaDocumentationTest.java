package dev.runoff.records;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Set;
import java.util.stream.Stream;
import org.apache.avro.Schema;
import org.apache.avro.SchemaNormalization;
import org.junit.jupiter.api.Test;

class SchemaDocumentationTest {

    private static final List<Schema> TOP_LEVEL = List.of(
            RecordCodec.outcomeEvents().schema(), RecordCodec.definitions().schema(),
            RecordCodec.allocationUpdates().schema(), RecordCodec.decisionRecords().schema());

    @Test
    void everyTypeAndFieldIsDocumented() {
        List<String> undocumented = new ArrayList<>();
        Set<String> seen = new HashSet<>();
        for (Schema schema : TOP_LEVEL) {
            collectUndocumented(schema, seen, undocumented);
        }
        assertEquals(List.of(), undocumented);
        assertTrue(seen.size() >= 20, "walked only " + seen);
    }

    @Test
    void outputRecordsHoldNoUnitIds() {
        for (Schema schema : List.of(RecordCodec.allocationUpdates().schema(), RecordCodec.decisionRecords().schema())) {
            List<String> names = new ArrayList<>();
            collectFieldNames(schema, new HashSet<>(), names);
            assertFalse(names.stream().anyMatch(n -> n.toLowerCase(java.util.Locale.ROOT).contains("unit")), names.toString());
        }
    }

    @Test
    void recordTypesHaveDistinctFingerprints() {
        assertEquals(TOP_LEVEL.size(),
                TOP_LEVEL.stream().mapToLong(SchemaNormalization::parsingFingerprint64).distinct().count());
    }

    private static void collectUndocumented(Schema schema, Set<String> seen, List<String> undocumented) {
        switch (schema.getType()) {
            case UNION -> schema.getTypes().forEach(t -> collectUndocumented(t, seen, undocumented));
            case ARRAY -> collectUndocumented(schema.getElementType(), seen, undocumented);
            case RECORD, ENUM -> {
                if (!seen.add(schema.getFullName())) {
                    return;
                }
                if (isBlank(schema.getDoc())) {
                    undocumented.add(schema.getFullName());
                }
                if (schema.getType() == Schema.Type.RECORD) {
                    for (Schema.Field field : schema.getFields()) {
                        if (isBlank(field.doc())) {
                            undocumented.add(schema.getName() + "." + field.name());
                        }
                        collectUndocumented(field.schema(), seen, undocumented);
                    }
                }
            }
            default -> {
                // primitive types carry no documentation of their own
            }
        }
    }

    private static void collectFieldNames(Schema schema, Set<String> seen, List<String> names) {
        Stream<Schema> children = switch (schema.getType()) {
            case UNION -> schema.getTypes().stream();
            case ARRAY -> Stream.of(schema.getElementType());
            case RECORD -> seen.add(schema.getFullName()) ? schema.getFields().stream().map(f -> {
                names.add(f.name());
                return f.schema();
            }).toList().stream() : Stream.empty();
            default -> Stream.empty();
        };
        children.forEach(child -> collectFieldNames(child, seen, names));
    }

    private static boolean isBlank(String text) {
        return text == null || text.isBlank();
    }
}
