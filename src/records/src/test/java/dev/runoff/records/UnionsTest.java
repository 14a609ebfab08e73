package dev.runoff.records;

import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.IndexedRecord;
import org.apache.avro.specific.SpecificData;
import org.junit.jupiter.api.Test;

/** {@link Unions#branch} against Avro's own resolution ({@link GenericData#resolveUnion}) on every union value. */
class UnionsTest {

    @Test
    void everyUnionValueOfTheSamplesTakesAvrosBranch() {
        int[] unions = {0, 0};
        for (IndexedRecord record : List.<IndexedRecord>of(Samples.decision(), Samples.valueDecision(),
                Samples.update(), Samples.bernoulli(), Samples.valueMetric(), Samples.valuePerUnit(), Samples.click(),
                Samples.value())) {
            walk(record, record.getSchema(), unions);
        }
        assertTrue(unions[0] >= 40, unions[0] + " union values");
        assertTrue(unions[1] >= 2, unions[1] + " values of unions of records (posteriors, priors)");
    }

    private static void walk(Object value, Schema schema, int[] unions) {
        if (value == null) {
            return;
        }
        switch (schema.getType()) {
            case UNION -> {
                Schema avro = schema.getTypes().get(GenericData.get().resolveUnion(schema, value));
                assertSame(avro, Unions.branch(schema, value, GenericData.get()), schema + " " + value);
                assertSame(schema.getTypes().get(SpecificData.get().resolveUnion(schema, value)),
                        Unions.branch(schema, value, SpecificData.get()));
                unions[0]++;
                unions[1] += value instanceof IndexedRecord && !schema.isNullable() ? 1 : 0;
                walk(value, avro, unions);
            }
            case RECORD -> {
                for (Schema.Field field : schema.getFields()) {
                    walk(((IndexedRecord) value).get(field.pos()), field.schema(), unions);
                }
            }
            case ARRAY -> ((List<?>) value).forEach(item -> walk(item, schema.getElementType(), unions));
            default -> {
                // leaves hold no unions
            }
        }
    }
}
