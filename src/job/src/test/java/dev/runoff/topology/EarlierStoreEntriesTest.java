package dev.runoff.topology;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.decision.ExperimentState;
import dev.runoff.decision.GuardrailCounts;
import dev.runoff.engine.core.Metric;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.testkit.TestDefinitions;
import java.io.ByteArrayOutputStream;
import java.io.InputStream;
import java.nio.ByteBuffer;
import java.util.List;
import java.util.Map;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.GenericDatumReader;
import org.apache.avro.generic.GenericRecord;
import org.apache.avro.io.DecoderFactory;
import org.apache.avro.io.EncoderFactory;
import org.apache.avro.message.BinaryMessageEncoder;
import org.apache.avro.specific.SpecificDatumWriter;
import org.junit.jupiter.api.Test;

/**
 * Entries that a job of the version before guardrails left in its stores and repartition topics (internal
 * format 2, definitions in the definition schema of that version) are still read after the upgrade, with no
 * guardrail signals or counts. The bytes are written here field by field as that version wrote them.
 */
class EarlierStoreEntriesTest {

    @Test
    void aUnitEntryOfTheEarlierFormatReadsWithoutSignals() {
        byte[] bytes = new BinaryOut().writeByte(2).writeString("a").writeLong(1).writeBoolean(true).writeLong(10)
                .writeLong(12).writeLong(2).writeLong(1).writeLong(60_000).writeBoolean(false).writeLong(99)
                .toByteArray();
        UnitState unit = UnitEntryCodec.read(bytes);
        assertEquals(new UnitState("a", 1, true, 10, 12, 2, 1, 60_000, false, 99), unit);
        assertEquals(List.of(), unit.signals());
        UnitState signalled = unit.withSignal("payment-failed", 100);
        assertEquals(signalled, UnitEntryCodec.roundTrip(signalled));
    }

    @Test
    void aUnitEntryOfTheFormatBeforeValuesPerUnitReadsWithoutCapOrSum() {
        byte[] bytes = new BinaryOut().writeByte(3).writeString("a").writeLong(1).writeBoolean(true).writeLong(10)
                .writeLong(12).writeLong(2).writeLong(1).writeLong(60_000).writeBoolean(false).writeLong(99)
                .writeInt(1).writeString("payment-failed").toByteArray();
        UnitState unit = UnitEntryCodec.read(bytes);
        assertEquals(new UnitState("a", 1, true, 10, 12, 2, 1, 60_000, false, 99, List.of("payment-failed")), unit);
        assertEquals(false, unit.valuePerUnit());
        assertEquals(0.0, unit.valueSum());
        UnitState valued = new UnitState("a", 1, true, 10, 12, 1, 0, 60_000, false, 99, List.of(), 250.0, 0)
                .withValue(-12.5, 100).withValue(40, 101);
        UnitState back = UnitEntryCodec.roundTrip(valued);
        assertEquals(valued, back);
        assertEquals(27.5, back.valueSum());
        assertEquals(250.0, back.valueCap());
    }

    @Test
    void aUnitEventOfTheFormatBeforeValuesPerUnitReadsWithoutCap() {
        BinaryOut out = new BinaryOut().writeByte(3).writeString("e").writeString("u").writeString("ev")
                .writeByte(UnitEvent.Role.GUARDRAIL.ordinal()).writeByte(Metric.BERNOULLI.ordinal())
                .writeNullableString("a").writeDouble(Double.NaN).writeLong(7).writeLong(60_000).writeLong(3)
                .writeBoolean(true).writeLong(500);
        new Source("in", 3, 99L).write(out);
        byte[] bytes = out.writeNullableBytes(null).writeBytes(new byte[] {1}).writeNullableString("payment-failed")
                .toByteArray();
        UnitEvent event = UnitEvent.SERDE.deserializer().deserialize("t", bytes);
        assertEquals("payment-failed", event.signal());
        assertTrue(Double.isNaN(event.valueCap()));
    }

    @Test
    void aUnitEventOfTheEarlierFormatReadsWithoutSignal() {
        BinaryOut out = new BinaryOut().writeByte(2).writeString("e").writeString("u").writeString("ev")
                .writeByte(UnitEvent.Role.SUCCESS.ordinal()).writeByte(Metric.BERNOULLI.ordinal())
                .writeNullableString("a").writeDouble(Double.NaN).writeLong(7).writeLong(60_000).writeLong(3)
                .writeBoolean(true).writeLong(500);
        new Source("in", 3, 99L).write(out);
        byte[] bytes = out.writeNullableBytes(null).writeBytes(new byte[] {1}).toByteArray();
        UnitEvent event = UnitEvent.SERDE.deserializer().deserialize("t", bytes);
        assertEquals(UnitEvent.Role.SUCCESS, event.role());
        assertEquals(null, event.signal());
    }

    @Test
    void aPreAggregatedSumAndADeltaEnvelopeOfTheEarlierFormatReadWithoutSignals() {
        BinaryOut sum = new BinaryOut();
        Stats.write(sum, new BernoulliStats(5, 2));
        PreAggregate.Sum read = PreAggregate.Sum.SERDE.deserializer().deserialize("t", sum.writeLong(-5).toByteArray());
        assertEquals(new PreAggregate.Sum(new BernoulliStats(5, 2), -5, Map.of()), read);
        BinaryOut envelope = new BinaryOut().writeByte(2).writeByte(StageTwo.Kind.DELTA.ordinal()).writeString("e")
                .writeString("a").writeLong(1);
        Stats.write(envelope, new BernoulliStats(5, 2));
        StageTwo delta = StageTwo.SERDE.deserializer().deserialize("t", envelope.writeLong(-5).toByteArray());
        assertEquals(StageTwo.delta(new ArmDelta("e", "a", 1, new BernoulliStats(5, 2), -5)), delta);
    }

    @Test
    void anExperimentStateOfTheEarlierFormatWithADefinitionOfTheEarlierSchemaReads() throws Exception {
        ExperimentDefinition def = TestDefinitions.bernoulli("e", "a", "b");
        def.setVersion(1);
        BinaryOut out = new BinaryOut().writeByte(2).writeBytes(earlierDefinitionBytes(def)).writeInt(2);
        Stats.write(out, new BernoulliStats(10, 3));
        Stats.write(out, new BernoulliStats(12, 4));
        out.writeBoolean(false).writeLong(4).writeLong(5).writeString("ab".repeat(32)).writeBoolean(false)
                .writeLong(1).writeLong(2).writeLong(3).writeBoolean(true).writeBoolean(false).writeBoolean(false)
                .writeLong(1).writeLong(1);
        ExperimentState state = ExperimentStateSerde.decode(out.toByteArray());
        assertEquals(def, state.definition());
        assertEquals(List.of(new BernoulliStats(10, 3), new BernoulliStats(12, 4)), state.stats());
        assertEquals(GuardrailCounts.empty(def), state.guardrails());
    }

    /** {@code def} as Avro single-object bytes of the definition schema before guardrails. */
    private static byte[] earlierDefinitionBytes(ExperimentDefinition def) throws Exception {
        Schema earlier;
        try (InputStream in = ExperimentDefinition.class.getResourceAsStream(
                "/dev/runoff/records/writers/ExperimentDefinition-1.avsc")) {
            earlier = new Schema.Parser().parse(in);
        }
        ByteArrayOutputStream bytes = new ByteArrayOutputStream();
        var encoder = EncoderFactory.get().binaryEncoder(bytes, null);
        new SpecificDatumWriter<>(def.getSchema()).write(def, encoder);
        encoder.flush();
        GenericRecord old = new GenericDatumReader<GenericRecord>(def.getSchema(), earlier)
                .read(null, DecoderFactory.get().binaryDecoder(bytes.toByteArray(), null));
        ByteBuffer buffer = new BinaryMessageEncoder<GenericRecord>(GenericData.get(), earlier).encode(old);
        byte[] out = new byte[buffer.remaining()];
        buffer.get(out);
        return out;
    }
}
