package dev.runoff.topology;

import dev.runoff.testkit.TestDefinitions;

import dev.runoff.decision.ExperimentState;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import dev.runoff.engine.core.Metric;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.stats.ValueStats;
import java.util.Arrays;
import java.util.List;
import org.junit.jupiter.api.Test;

/** The internal values survive their encodings, and corrupt bytes fail with a clear exception. */
class InternalEncodingTest {

    @Test
    void experimentStateRoundTrips() {
        ExperimentState state = ExperimentState.start(TestDefinitions.bernoulli("e", "a", "b"))
                .withDelta(1, new BernoulliStats(10, 3), 4, 5L);
        ExperimentState stopped = new ExperimentState(state.definition(), state.stats(),
                new ExperimentState.Stop("b", 1, List.of("a", "b"), new double[] {0, 1}), 4, 6, "ab".repeat(32),
                new double[] {0.25, 0.75}, 5, 9, 9, true, false, null, new long[] {1, 3});
        for (ExperimentState s : List.of(state, stopped)) {
            assertEquals(s, ExperimentStateSerde.decode(ExperimentStateSerde.encode(s)));
        }
    }

    @Test
    void envelopesRoundTrip() {
        UnitEvent event = new UnitEvent("e", "u", "ev", UnitEvent.Role.VALUE, Metric.VALUE, null, -2.5, 7L, 60_000L,
                3L, true, 500L, new Source("in", 3, 99L), null, new byte[] {1, 2, 3});
        UnitEvent back = UnitEvent.SERDE.deserializer().deserialize("t", UnitEvent.SERDE.serializer().serialize("t",
                event));
        assertEquals(List.of(event.experimentId(), event.unitId(), event.eventId(), event.role(), event.metric(),
                        event.value(), event.timestamp(), event.attributionWindowMs(), event.version(),
                        event.unitLevel(), event.earlyGraceMs(), event.source()),
                List.of(back.experimentId(), back.unitId(), back.eventId(), back.role(), back.metric(), back.value(),
                        back.timestamp(), back.attributionWindowMs(), back.version(), back.unitLevel(),
                        back.earlyGraceMs(), back.source()));
        assertArrayEquals(event.originalValue(), back.originalValue());
        UnitEvent capped = new UnitEvent("e", "u", "ev", UnitEvent.Role.TRIAL, Metric.VALUE, "a", Double.NaN, 7L,
                60_000L, 3L, true, 500L, new Source("in", 3, 99L), null, new byte[] {1}, null, 250.0);
        assertEquals(250.0, UnitEvent.SERDE.deserializer().deserialize("t", UnitEvent.SERDE.serializer()
                .serialize("t", capped)).valueCap());
        for (StageTwo s : List.of(StageTwo.delta(new ArmDelta("e", "a", 2, new ValueStats(3, 1.5, 0.25), -4)),
                StageTwo.definition(TestDefinitions.value("e", "a", "b")), StageTwo.ended("e"))) {
            byte[] bytes = StageTwo.SERDE.serializer().serialize("t", s);
            assertEquals(s, StageTwo.SERDE.deserializer().deserialize("t", bytes));
        }
    }

    /**
     * The writer's bytes are those of java.io.DataOutputStream (JDK reference: big-endian numbers, a double as
     * its doubleToLongBits, a boolean as one byte 0 or 1), which earlier versions of the job wrote with, so
     * values stored before are read unchanged; the reader gives every value back.
     */
    @Test
    void writesTheBytesOfDataOutputStreamAndReadsThemBack() throws java.io.IOException {
        double nan = Double.longBitsToDouble(0x7ff8_0000_0000_0001L);
        String text = "\u00e9t\u00e9 \ud83d\ude00";
        byte[] written = new BinaryOut().writeByte(0xC3).writeBoolean(true).writeInt(-2).writeLong(Long.MIN_VALUE + 7)
                .writeDouble(-0.0).writeDouble(nan).writeString(text).writeNullableString(null)
                .writeNullableBytes(new byte[300]).toByteArray();
        java.io.ByteArrayOutputStream expected = new java.io.ByteArrayOutputStream();
        java.io.DataOutputStream data = new java.io.DataOutputStream(expected);
        data.writeByte(0xC3);
        data.writeBoolean(true);
        data.writeInt(-2);
        data.writeLong(Long.MIN_VALUE + 7);
        data.writeDouble(-0.0);
        data.writeDouble(nan);
        byte[] utf8 = text.getBytes(java.nio.charset.StandardCharsets.UTF_8);
        data.writeInt(utf8.length);
        data.write(utf8);
        data.writeBoolean(false);
        data.writeBoolean(true);
        data.writeInt(300);
        data.write(new byte[300]);
        assertArrayEquals(expected.toByteArray(), written);
        BinaryIn in = new BinaryIn(written);
        assertEquals(List.of(0xC3, true, -2, Long.MIN_VALUE + 7, Double.doubleToRawLongBits(-0.0),
                        Double.doubleToRawLongBits(Double.NaN), text),
                List.of(in.readByte(), in.readBoolean(), in.readInt(), in.readLong(),
                        Double.doubleToRawLongBits(in.readDouble()), Double.doubleToRawLongBits(in.readDouble()),
                        in.readString()));
        assertEquals(null, in.readNullableString());
        assertEquals(300, in.readNullableBytes().length);
        in.end();
    }

    @Test
    void corruptBytesFailNamingTheProblem() {
        byte[] bytes = ExperimentStateSerde.encode(ExperimentState.start(TestDefinitions.bernoulli("e", "a", "b")));
        IllegalArgumentException truncated = assertThrows(IllegalArgumentException.class,
                () -> ExperimentStateSerde.decode(Arrays.copyOf(bytes, bytes.length - 3)));
        assertEquals("corrupt internal value: truncated", truncated.getMessage());
        byte[] hugeLength = {2, 0x7f, 0x7f, 0x7f, 0x7f};
        assertEquals("corrupt internal value: length 2139062143 with 0 bytes left",
                assertThrows(IllegalArgumentException.class, () -> ExperimentStateSerde.decode(hugeLength))
                        .getMessage());
    }
}
