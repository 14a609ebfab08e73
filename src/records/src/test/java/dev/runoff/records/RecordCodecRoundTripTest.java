package dev.runoff.records;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.records.avro.AfterStopPolicy;
import dev.runoff.records.avro.AllocationRule;
import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.OutcomeEvent;
import dev.runoff.records.avro.StoppingRule;
import java.nio.charset.StandardCharsets;
import java.util.List;
import java.util.function.Supplier;
import java.util.stream.Stream;
import org.apache.avro.Schema;
import org.apache.avro.SchemaNormalization;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.GenericRecord;
import org.apache.avro.message.BinaryMessageEncoder;
import org.apache.avro.specific.SpecificData;
import org.apache.avro.specific.SpecificRecord;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.Arguments;
import org.junit.jupiter.params.provider.MethodSource;

class RecordCodecRoundTripTest {

    static Stream<Arguments> everyRecord() {
        return Stream.of(
                Arguments.of("click event", RecordCodec.outcomeEvents(), (Supplier<?>) Samples::click),
                Arguments.of("value event", RecordCodec.outcomeEvents(), (Supplier<?>) Samples::value),
                Arguments.of("bernoulli definition", RecordCodec.definitions(), (Supplier<?>) Samples::bernoulli),
                Arguments.of("value definition", RecordCodec.definitions(), (Supplier<?>) Samples::valueMetric),
                Arguments.of("allocation update", RecordCodec.allocationUpdates(), (Supplier<?>) Samples::update),
                Arguments.of("bernoulli decision", RecordCodec.decisionRecords(), (Supplier<?>) Samples::decision),
                Arguments.of("value decision", RecordCodec.decisionRecords(), (Supplier<?>) Samples::valueDecision));
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("everyRecord")
    <T extends SpecificRecord> void avroRoundTripGivesAnEqualRecord(String name, RecordCodec<T> codec,
                                                                     Supplier<T> sample) {
        T record = sample.get();
        byte[] bytes = codec.encode(record);
        assertEquals(Format.AVRO, Format.detect(bytes));
        assertEquals(record, codec.decode(bytes, Samples.NOW).orThrow());
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("everyRecord")
    <T extends SpecificRecord> void jsonRoundTripGivesAnEqualRecord(String name, RecordCodec<T> codec,
                                                                     Supplier<T> sample) {
        T record = sample.get();
        byte[] bytes = codec.encode(record, Format.JSON);
        assertEquals(Format.JSON, Format.detect(bytes));
        assertEquals(record, codec.decode(bytes, Samples.NOW).orThrow());
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("everyRecord")
    <T extends SpecificRecord> void avroBytesStartWithTheSingleObjectHeaderAndTheSchemaFingerprint(
            String name, RecordCodec<T> codec, Supplier<T> sample) {
        byte[] bytes = codec.encode(sample.get());
        // Avro specification, "Single-object encoding": 0xC3 0x01, then the 8-byte little-endian
        // CRC-64-AVRO fingerprint of the schema's parsing canonical form.
        assertEquals((byte) 0xC3, bytes[0]);
        assertEquals((byte) 0x01, bytes[1]);
        long fingerprint = SchemaNormalization.parsingFingerprint64(codec.schema());
        for (int i = 0; i < 8; i++) {
            assertEquals((byte) (fingerprint >>> (8 * i)), bytes[2 + i], "fingerprint byte " + i);
        }
    }

    @Test
    void avroEncodingIsTheGeneratedClassEncoding() throws Exception {
        OutcomeEvent event = Samples.click();
        byte[] ours = RecordCodec.outcomeEvents().encode(event);
        byte[] generated = OutcomeEvent.getEncoder().encode(event).array();
        assertArrayEquals(generated, ours);
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("everyRecord")
    <T extends SpecificRecord> void avroEncodingIsAvrosMessageEncoding(String name, RecordCodec<T> codec,
                                                                       Supplier<T> sample) throws Exception {
        // Avro's own BinaryMessageEncoder is the reference; the codec's encoder is reused between records.
        T record = sample.get();
        BinaryMessageEncoder<T> avro = new BinaryMessageEncoder<>(SpecificData.get(), codec.schema());
        byte[] expected = avro.encode(record).array();
        assertArrayEquals(expected, codec.encode(record));
        codec.encode(sample.get(), Format.JSON);
        assertArrayEquals(expected, codec.encode(record));
    }

    @Test
    void formatDetectionLooksOnlyAtTheTwoMagicBytes() {
        assertEquals(Format.AVRO, Format.detect(new byte[] {(byte) 0xC3, 0x01}));
        assertEquals(Format.JSON, Format.detect(new byte[] {(byte) 0xC3, 0x02}));
        assertEquals(Format.JSON, Format.detect(new byte[] {(byte) 0xC3}));
        assertEquals(Format.JSON, Format.detect(new byte[0]));
        assertEquals(Format.JSON, Format.detect("{\"a\":1}".getBytes(StandardCharsets.UTF_8)));
    }

    @Test
    void jsonOmittingDefaultedFieldsGetsTheSchemaDefaults() {
        String json = """
                {"experimentId":"exp-1","arms":["a","b"],
                 "metric":{"kind":"BERNOULLI","successEvent":"CLICK"}}""";
        ExperimentDefinition def = RecordCodec.definitions().decode(utf8(json), Samples.NOW).orThrow();
        assertEquals(0, def.getVersion());
        assertNull(def.getControlArm());
        assertEquals(EventType.EXPOSURE, def.getMetric().getTrialEvent());
        assertNull(def.getMetric().getPrior());
        assertEquals(AllocationRule.TOP_TWO_THOMPSON, def.getAllocation().getRule());
        assertEquals(0.5, def.getAllocation().getBeta());
        assertEquals(0.0, def.getAllocation().getFloor());
        assertEquals(100, def.getAllocation().getWarmUpTrials());
        assertEquals(StoppingRule.GLR, def.getStopping().getRule());
        assertEquals(0.05, def.getStopping().getDelta());
        assertEquals(AfterStopPolicy.ALL_TO_WINNER, def.getAfterStop());
        assertEquals(60_000, def.getRecomputePeriodMs());
        assertEquals(300_000, def.getHeartbeatMs());
        assertEquals(86_400_000L, def.getAttributionWindowMs());
        assertEquals(900_000, def.getValidForMs());
    }

    @Test
    void jsonEventWithUnknownFieldsIsAcceptedForForwardCompatibility() {
        String json = """
                {"experimentId":"e","unitId":"u","eventId":"x","type":"CLICK","timestamp":1,"sessionId":"s"}""";
        OutcomeEvent event = RecordCodec.outcomeEvents().decode(utf8(json), Samples.NOW).orThrow();
        assertEquals("u", event.getUnitId());
        assertNull(event.getArm());
    }

    @Test
    void jsonPriorIsRecognisedByItsFieldNames() {
        String json = """
                {"experimentId":"e","arms":["a","b"],"metric":{"kind":"VALUE","valueEvent":"VALUE",
                 "prior":{"mu0":1.5,"kappa0":1,"alpha0":2,"beta0":3}},"allocation":{"rule":"UNIFORM"}}""";
        ExperimentDefinition def = RecordCodec.definitions().decode(utf8(json), Samples.NOW).orThrow();
        assertEquals(1.5, Definitions.prior(def) instanceof dev.runoff.engine.posterior.NormalGammaPrior p
                ? p.mu0() : Double.NaN);
    }

    @Test
    void olderWriterSchemaIsReadThroughTheSchemaStore() throws Exception {
        // An earlier OutcomeEvent without the "value" field, written by a producer that still has it.
        Schema older = new Schema.Parser().parse("""
                {"type":"record","name":"OutcomeEvent","namespace":"dev.runoff.records.avro","fields":[
                 {"name":"experimentId","type":"string"},{"name":"unitId","type":"string"},
                 {"name":"eventId","type":"string"},
                 {"name":"type","type":{"type":"enum","name":"EventType",
                   "symbols":["EXPOSURE","CLICK","CONVERSION","VALUE"]}},
                 {"name":"timestamp","type":"long"},{"name":"arm","type":["null","string"],"default":null}]}""");
        GenericRecord old = new GenericData.Record(older);
        old.put("experimentId", "e");
        old.put("unitId", "u");
        old.put("eventId", "x");
        old.put("type", new GenericData.EnumSymbol(older.getField("type").schema(), "EXPOSURE"));
        old.put("timestamp", 5L);
        old.put("arm", "a");
        byte[] bytes = new BinaryMessageEncoder<GenericRecord>(GenericData.get(), older).encode(old).array();

        Decoded<OutcomeEvent> unknown = RecordCodec.outcomeEvents().decode(bytes, Samples.NOW);
        assertEquals(Reason.UNKNOWN_SCHEMA, unknown.reason());

        OutcomeEvent event = RecordCodec.outcomeEvents().withWriterSchema(older).decode(bytes, Samples.NOW).orThrow();
        assertEquals("a", event.getArm());
        assertEquals(EventType.EXPOSURE, event.getType());
        assertNull(event.getValue());
    }

    @Test
    void encodingAnInvalidRecordIsRefusedWithEveryProblem() {
        AllocationUpdate update = Samples.update();
        update.setSequence(0);
        update.setValidUntil(update.getComputedAt());
        RecordRejectedException e = assertThrows(RecordRejectedException.class,
                () -> RecordCodec.allocationUpdates().encode(update, Format.JSON));
        assertEquals(List.of("sequence", "validUntil"), e.problems().stream().map(Problem::field).toList());
        assertTrue(e.getMessage().startsWith("sequence: must be >= 1, got 0; validUntil: "), e.getMessage());
    }

    @Test
    void encodingAnUnsealedDecisionRecordIsRefused() {
        DecisionRecord unsealed = Samples.decisionUnsealed();
        RecordRejectedException e = assertThrows(RecordRejectedException.class,
                () -> RecordCodec.decisionRecords().encode(unsealed));
        assertEquals("hash", e.problems().get(0).field());
        assertEquals(Reason.INVALID_TEXT, e.reason());
    }

    @Test
    void encodingARecordWithANullRequiredFieldNamesTheField() {
        OutcomeEvent event = Samples.click();
        event.setUnitId(null);
        RecordRejectedException e = assertThrows(RecordRejectedException.class,
                () -> RecordCodec.outcomeEvents().encode(event));
        assertEquals("unitId: missing", e.getMessage());
    }

    @Test
    void encodingLargerThanTheByteLimitIsRefused() {
        RecordCodec<DecisionRecord> small = RecordCodec.decisionRecords()
                .withLimits(Limits.DEFAULT.withMaxBytes(200));
        RecordRejectedException e = assertThrows(RecordRejectedException.class,
                () -> small.encode(Samples.decision()));
        assertEquals(Reason.TOO_LARGE, e.reason());
    }

    @Test
    void jsonOutputIsTheCanonicalJson() {
        DecisionRecord record = Samples.decision();
        String json = new String(RecordCodec.decisionRecords().encode(record, Format.JSON), StandardCharsets.UTF_8);
        assertEquals(CanonicalJson.of(record), json);
    }

    static byte[] utf8(String text) {
        return text.getBytes(StandardCharsets.UTF_8);
    }
}
