package dev.runoff.topology;

import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.runoff.decision.ExperimentState;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.GuardrailDirection;
import dev.runoff.records.avro.GuardrailSpec;
import dev.runoff.testkit.TestDefinitions;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/**
 * Value guardrails in the internal encodings: unit entries (format 5), pre-aggregated sums, delta envelopes
 * (format 4) and experiment states (format 4) carry the sums and totals, and the formats before them are still
 * read, without any.
 */
class ValueGuardrailEncodingTest {

    @Test
    void aUnitEntryKeepsItsSignalValuesAndTheFormatBeforeReadsWithoutThem() {
        UnitState unit = new UnitState("a", 1, true, 10, 12, 1, 0, 60_000, false, 99, List.of(), Double.NaN, 0)
                .withSignal("refund-issued", 100).withSignalValue("refund-issued", 150, 40, 100)
                .withSignalValue("refund-issued", 150, 130, 101);
        UnitState back = UnitEntryCodec.roundTrip(unit);
        assertEquals(unit, back);
        assertEquals(List.of(new UnitState.SignalValue("refund-issued", 150, 170)), back.signalValues());
        assertEquals(Map.of("refund-issued", 1.0), back.signalObservations(), "170 is capped at 150: 150 / 150");
        byte[] format4 = new BinaryOut().writeByte(4).writeString("a").writeLong(1).writeBoolean(true).writeLong(10)
                .writeLong(12).writeLong(2).writeLong(1).writeLong(60_000).writeBoolean(false).writeLong(99)
                .writeInt(1).writeString("payment-failed").writeDouble(250.0).writeDouble(27.5).toByteArray();
        UnitState earlier = UnitEntryCodec.read(format4);
        assertEquals(new UnitState("a", 1, true, 10, 12, 2, 1, 60_000, false, 99, List.of("payment-failed"), 250.0,
                27.5), earlier);
        assertEquals(List.of(), earlier.signalValues());
    }

    @Test
    void aNetNegativeSignalSumCountsZero() {
        UnitState unit = new UnitState("a", 1, true, 10, 12, 1, 0, 60_000, false, 99)
                .withSignalValue("refund-issued", 150, -20, 100).withSignalValue("refund-issued", 150, 5, 101);
        assertEquals(Map.of("refund-issued", 0.0), unit.signalObservations());
    }

    @Test
    void sumsAndEnvelopesCarryTotalsAndTheFormatsBeforeReadWithoutThem() {
        PreAggregate.Sum sum = new PreAggregate.Sum(new BernoulliStats(5, 2), -5, Map.of("refund-issued", 2L),
                Map.of("refund-issued", 1.25));
        assertEquals(sum, PreAggregate.Sum.SERDE.deserializer().deserialize("t",
                PreAggregate.Sum.SERDE.serializer().serialize("t", sum)));
        BinaryOut signalsOnly = new BinaryOut();
        Stats.write(signalsOnly, new BernoulliStats(5, 2));
        signalsOnly.writeLong(-5);
        ArmDelta.writeSignals(signalsOnly, Map.of("refund-issued", 2L));
        assertEquals(new PreAggregate.Sum(new BernoulliStats(5, 2), -5, Map.of("refund-issued", 2L)),
                PreAggregate.Sum.SERDE.deserializer().deserialize("t", signalsOnly.toByteArray()));

        StageTwo delta = StageTwo.delta(new ArmDelta("e", "a", 1, new BernoulliStats(5, 2), -5,
                Map.of("refund-issued", 2L), Map.of("refund-issued", 1.25)));
        assertEquals(delta, StageTwo.SERDE.deserializer().deserialize("t", StageTwo.SERDE.serializer().serialize("t",
                delta)));
        BinaryOut format3 = new BinaryOut().writeByte(3).writeByte(StageTwo.Kind.DELTA.ordinal()).writeString("e")
                .writeString("a").writeLong(1);
        Stats.write(format3, new BernoulliStats(5, 2));
        format3.writeLong(-5);
        ArmDelta.writeSignals(format3, Map.of("refund-issued", 2L));
        assertEquals(StageTwo.delta(new ArmDelta("e", "a", 1, new BernoulliStats(5, 2), -5,
                Map.of("refund-issued", 2L))), StageTwo.SERDE.deserializer().deserialize("t", format3.toByteArray()));
    }

    @Test
    void anExperimentStateKeepsItsValueGuardrailTotals() {
        ExperimentDefinition def = TestDefinitions.bernoulli("e", "a", "b");
        def.setGuardrails(List.of(new GuardrailSpec("refunds", "refund-issued", GuardrailDirection.HIGHER_IS_WORSE,
                0.1, 0.05, 150.0)));
        ExperimentState state = ExperimentState.start(def).withGuardrailUnits(1, 40, Map.of("refund-issued", 3L),
                Map.of("refund-issued", 2.75));
        ExperimentState back = ExperimentStateSerde.decode(ExperimentStateSerde.encode(state));
        assertEquals(state, back);
        assertEquals(2.75, back.guardrails().total(1, 0));
        assertEquals(0.0, back.guardrails().total(0, 0));
    }
}
