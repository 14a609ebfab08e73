package dev.runoff.records;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.OutcomeEvent;
import java.io.ByteArrayOutputStream;
import java.nio.ByteBuffer;
import java.util.List;
import org.apache.avro.Schema;
import org.apache.avro.SchemaNormalization;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.GenericDatumReader;
import org.apache.avro.generic.GenericDatumWriter;
import org.apache.avro.generic.GenericRecord;
import org.apache.avro.io.DecoderFactory;
import org.apache.avro.io.EncoderFactory;
import org.apache.avro.message.BinaryMessageEncoder;
import org.apache.avro.specific.SpecificDatumWriter;
import org.junit.jupiter.api.Test;

/** Records written by the previous schema version still decode, and keep their canonical text and hash. */
class SchemaCompatibilityTest {

    private static Schema writer(String name) {
        return WriterSchemas.previous(name).get(0);
    }

    /** {@code record} as a writer of {@code schema} (the previous version) would have encoded it. */
    private static byte[] writtenBy(Schema schema, org.apache.avro.specific.SpecificRecord record) throws Exception {
        ByteArrayOutputStream bytes = new ByteArrayOutputStream();
        var encoder = EncoderFactory.get().binaryEncoder(bytes, null);
        new SpecificDatumWriter<>(record.getSchema()).write(record, encoder);
        encoder.flush();
        GenericRecord old = new GenericDatumReader<GenericRecord>(record.getSchema(), schema)
                .read(null, DecoderFactory.get().binaryDecoder(bytes.toByteArray(), null));
        ByteBuffer buffer = new BinaryMessageEncoder<GenericRecord>(GenericData.get(), schema).encode(old);
        byte[] out = new byte[buffer.remaining()];
        buffer.get(out);
        return out;
    }

    @Test
    void thePreviousWriterSchemasAreThoseWithoutTheSignatureFields() {
        for (String name : List.of("DecisionRecord", "AllocationUpdate")) {
            Schema previous = writer(name);
            assertNull(previous.getField("signature"), name);
            assertNull(previous.getField("keyId"), name);
            assertNotEquals(SchemaNormalization.parsingFingerprint64(previous), SchemaNormalization
                    .parsingFingerprint64(name.equals("DecisionRecord") ? DecisionRecord.getClassSchema()
                            : AllocationUpdate.getClassSchema()), name);
        }
    }

    @Test
    void aDecisionRecordWrittenByThePreviousSchemaDecodesAndKeepsItsHash() throws Exception {
        DecisionRecord original = Samples.decision();
        byte[] old = writtenBy(writer("DecisionRecord"), original);
        Decoded<DecisionRecord> decoded = RecordCodec.decisionRecords().decode(old, Samples.NOW);
        assertTrue(decoded.isValid(), decoded.problems().toString());
        DecisionRecord read = decoded.orThrow();
        assertNull(read.getKeyId());
        assertNull(read.getSignature());
        assertEquals(original, read);
        // the golden hash of HashChainTest, computed outside Java before the signature fields existed
        assertEquals("5a49ef7b537fb6faefc8bca0f7a0cb5e743f24b29763b6d93a2321fa59a18472", HashChain.hashOf(read));
        assertFalse(CanonicalJson.of(read).contains("signature"), "unset later fields stay out of the text");
        assertFalse(CanonicalJson.of(read).contains("keyId"));
    }

    @Test
    void aDecisionRecordWrittenByEveryEarlierSchemaDecodesAndKeepsItsHash() throws Exception {
        DecisionRecord original = Samples.decision();
        List<Schema> writers = WriterSchemas.previous("DecisionRecord");
        assertEquals(4, writers.size(), "DecisionRecord-1 (first release), -2 (signature and counting fields),"
                + " -3 (adaptive rule and estimator field) and -4 (guardrail fields)");
        for (Schema writer : writers) {
            Decoded<DecisionRecord> decoded = RecordCodec.decisionRecords().decode(writtenBy(writer, original),
                    Samples.NOW);
            assertTrue(decoded.isValid(), decoded.problems().toString());
            assertEquals(original, decoded.orThrow());
            // the golden hash of HashChainTest, computed outside Java
            assertEquals("5a49ef7b537fb6faefc8bca0f7a0cb5e743f24b29763b6d93a2321fa59a18472",
                    HashChain.hashOf(decoded.orThrow()));
        }
    }

    @Test
    void aControlRecordWrittenByThePreviousSchemaDecodes() throws Exception {
        AllocationUpdate original = Samples.update();
        Decoded<AllocationUpdate> decoded = RecordCodec.allocationUpdates()
                .decode(writtenBy(writer("AllocationUpdate"), original), Samples.NOW);
        assertTrue(decoded.isValid(), decoded.problems().toString());
        assertEquals(original, decoded.orThrow());
    }

    @Test
    void theLastWriterSchemaIsTheOneBeforeTheGuardrailFields() {
        Schema last = WriterSchemas.previous("DecisionRecord").get(2);
        assertNull(last.getField("arms").schema().getElementType().getField("guardrails"));
        assertNull(last.getField("arms").schema().getElementType().getField("suspendedBy"));
    }

    @Test
    void anOutcomeEventWrittenByAClientBeforeTheSignalFieldDecodes() throws Exception {
        OutcomeEvent original = OutcomeEvent.newBuilder().setExperimentId("ferry-layout").setUnitId("u-1")
                .setEventId("e-1").setType(EventType.CONVERSION).setTimestamp(Samples.NOW).setArm("a").build();
        Schema writer = WriterSchemas.previous("OutcomeEvent").get(0);
        assertNull(writer.getField("signal"));
        Decoded<OutcomeEvent> decoded = RecordCodec.outcomeEvents().decode(writtenBy(writer, original), Samples.NOW);
        assertTrue(decoded.isValid(), decoded.problems().toString());
        assertEquals(original, decoded.orThrow());
        assertAddedFieldsAreWhenSet(OutcomeEvent.getClassSchema(), writer, "OutcomeEvent");
    }

    @Test
    void aDefinitionWrittenBeforeValuePerUnitDecodesAndTheFieldsAddedSinceAreWhenSet() throws Exception {
        List<Schema> writers = WriterSchemas.previous("ExperimentDefinition");
        Schema last = writers.get(writers.size() - 1);
        Schema kind = last.getField("metric").schema().getField("kind").schema();
        assertFalse(kind.getEnumSymbols().contains("VALUE_PER_UNIT"));
        assertNull(last.getField("metric").schema().getField("valueCap"));
        ExperimentDefinition original = Samples.valueMetric();
        Decoded<ExperimentDefinition> decoded = RecordCodec.definitions().decode(writtenBy(last, original),
                Samples.NOW);
        assertTrue(decoded.isValid(), decoded.problems().toString());
        assertEquals(original, decoded.orThrow());
        assertAddedFieldsAreWhenSet(ExperimentDefinition.getClassSchema(), last, "ExperimentDefinition");
        assertFalse(CanonicalJson.of(original).contains("valueCap"), "an unset cap stays out of the canonical text");
    }

    @Test
    void everyFieldAddedLaterIsNullableWithANullDefaultAndMarkedWhenSet() {
        for (Schema current : List.of(DecisionRecord.getClassSchema(), AllocationUpdate.getClassSchema())) {
            assertAddedFieldsAreWhenSet(current, writer(current.getName()), current.getName());
        }
    }

    /** Walks nested records too: a field added inside ArmState or the embedded definition changes hashes as well. */
    private static void assertAddedFieldsAreWhenSet(Schema current, Schema previous, String path) {
        for (Schema.Field field : current.getFields()) {
            Schema.Field before = previous.getField(field.name());
            String where = path + "." + field.name();
            if (before == null) {
                assertEquals(CanonicalJson.WHEN_SET, field.getProp(CanonicalJson.CANONICAL_PROPERTY), where);
                assertTrue(field.schema().isNullable() && field.defaultVal() == org.apache.avro.JsonProperties.NULL_VALUE,
                        where);
                continue;
            }
            Schema now = record(field.schema());
            Schema then = record(before.schema());
            if (now != null && then != null) {
                assertAddedFieldsAreWhenSet(now, then, where);
            }
        }
    }

    /** The record inside a field's schema (itself, a union branch, or array items), or null. */
    private static Schema record(Schema schema) {
        return switch (schema.getType()) {
            case RECORD -> schema;
            case ARRAY -> record(schema.getElementType());
            case UNION -> schema.getTypes().stream().map(SchemaCompatibilityTest::record)
                    .filter(java.util.Objects::nonNull).findFirst().orElse(null);
            default -> null;
        };
    }
}
