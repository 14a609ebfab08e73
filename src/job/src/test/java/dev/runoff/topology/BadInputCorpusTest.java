package dev.runoff.topology;

import dev.runoff.testkit.TestDefinitions;

import dev.runoff.decision.ExperimentState;

import static dev.runoff.topology.TopologyFixture.T0;
import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.records.CanonicalJson;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.ArmWeight;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.ExperimentStatus;
import dev.runoff.records.avro.OutcomeEvent;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.ByteBuffer;
import java.nio.charset.StandardCharsets;
import java.util.Arrays;
import java.util.List;
import java.util.SplittableRandom;
import java.util.stream.Stream;
import org.apache.kafka.streams.test.TestRecord;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.MethodOrderer;
import org.junit.jupiter.api.Order;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.TestInstance;
import org.junit.jupiter.api.TestMethodOrder;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.Arguments;
import org.junit.jupiter.params.provider.MethodSource;

/**
 * Malformed and hostile events and definitions through the whole job, one running instance for the class:
 * each goes to the rejected topic with its original key and bytes, a reason code and a message naming the
 * field; after each one a valid event still gets through, and in the end the counts hold exactly the valid
 * events and the definition is unchanged.
 */
@TestInstance(TestInstance.Lifecycle.PER_CLASS)
@TestMethodOrder(MethodOrderer.OrderAnnotation.class)
class BadInputCorpusTest {

    private static final String ID = "corpus";
    private static final String EVENT = new String(Events.click(ID, "u-1", "ev-1", "a", T0), StandardCharsets.UTF_8);
    private static final String DEFINITION = CanonicalJson.of(TestDefinitions.bernoulli("other", "x", "y"));

    private TopologyFixture job;
    private int goodEvents;

    @BeforeAll
    void start() {
        job = new TopologyFixture();
        job.define(TestDefinitions.bernoulli(ID, "a", "b"));
        job.accepted();
    }

    @AfterAll
    void stop() {
        job.close();
    }

    static Stream<Arguments> corpus() {
        return Stream.of(
                event("truncated JSON", utf8(EVENT.substring(0, 40)), "malformed-json", "record"),
                event("random bytes", randomBytes(), "malformed-json", "record"),
                event("JSON array instead of an object", utf8("[1,2,3]"), "malformed-json", "record"),
                event("duplicate JSON key", utf8(EVENT.replace("\"arm\":\"a\"", "\"arm\":\"a\",\"arm\":\"b\"")),
                        "malformed-json", "Duplicate field"),
                event("timestamp as a string", utf8(EVENT.replace("" + T0, "\"yesterday\"")), "wrong-type",
                        "timestamp"),
                event("unknown event type", utf8(EVENT.replace("CLICK", "PURCHASE")), "unknown-value", "type"),
                event("unitId of 5000 characters", utf8(EVENT.replace("u-1", "u".repeat(5_000))), "too-long",
                        "unitId"),
                event("record beyond 16 KiB", utf8(EVENT.replace("u-1", "u".repeat(20_000))), "too-large", "record"),
                event("deeply nested JSON", utf8("{\"a\":" + "[".repeat(1_000) + "]".repeat(1_000) + "}"),
                        "too-large", "nesting depth"),
                event("NaN value", utf8(EVENT.replace("CLICK", "VALUE").replace("}", ",\"value\":NaN}")),
                        "not-finite", "value"),
                event("negative timestamp", utf8(EVENT.replace("" + T0, "-5")), "out-of-range", "timestamp"),
                event("timestamp two days ahead", utf8(EVENT.replace("" + T0, "" + (T0 + 2 * 86_400_000L))),
                        "bad-time", "timestamp"),
                event("wrong Avro fingerprint", RecordCodec.allocationUpdates().encode(update()), "unknown-schema",
                        "fingerprint"),
                event("truncated Avro body", truncatedAvro(), "malformed-avro", "record"),
                event("Avro event with a NaN value", avroNaN(), "not-finite", "value"),
                event("missing eventId", utf8(EVENT.replace("\"eventId\":\"ev-1\",", "")), "missing", "eventId"),
                event("newline in the arm", utf8(EVENT.replace("\"a\"", "\"a\\nFAKE LOG LINE\"")), "invalid-text",
                        "arm"),
                event("null value (tombstone)", null, "empty", "tombstone"),
                event("CLICK with a value", utf8(EVENT.replace("}", ",\"value\":3}")), "inconsistent", "value"),
                event("unknown experiment", utf8(EVENT.replace(ID, "nobody")), "unknown-experiment", "experimentId"),
                event("unknown arm", utf8(EVENT.replace("\"a\"", "\"z\"")), "unknown-arm", "arm"),
                event("event type the metric does not use", utf8(EVENT.replace("CLICK", "CONVERSION")),
                        "event-not-used", "type"),
                definition("truncated definition", "other", utf8(DEFINITION.substring(0, 50)), "malformed-json",
                        "record"),
                definition("misspelt definition field", "other",
                        utf8(DEFINITION.replace("\"minTrialsPerArm\"", "\"minTrialPerArm\"")), "unknown-field",
                        "stopping.minTrialPerArm"),
                definition("arms as a string", "other", utf8(DEFINITION.replace("[\"x\",\"y\"]", "\"x,y\"")),
                        "wrong-type", "arms"),
                definition("negative trial count", "other",
                        utf8(DEFINITION.replace("\"minTrialsPerArm\":50", "\"minTrialsPerArm\":-50")), "out-of-range",
                        "stopping.minTrialsPerArm"),
                definition("unknown metric kind", "other", utf8(DEFINITION.replace("BERNOULLI", "POISSON")),
                        "unknown-value", "metric.kind"),
                definition("deadline in the past", "other",
                        utf8(DEFINITION.replace("\"deadline\":null", "\"deadline\":1000")), "bad-time",
                        "stopping.deadline"),
                definition("key differs from experimentId", "corpus", utf8(DEFINITION), "key-mismatch", "key"),
                definition("key with a line break", "other\nFAKE LOG LINE", utf8(DEFINITION), "key-mismatch",
                        "'other\\u000aFAKE LOG LINE'"),
                definition("definition redefining the running experiment with a NaN delta", ID,
                        utf8(CanonicalJson.of(TestDefinitions.bernoulli(ID, "a", "b")).replace("\"delta\":0.05",
                                "\"delta\":NaN")), "not-finite", "stopping.delta"),
                definition("tombstone without a key", null, null, "missing", "key"));
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("corpus")
    @Order(1)
    void badInputIsRejectedWithItsReasonAndTheJobKeepsGoing(String name, boolean definition, String key, byte[] bytes,
                                                            String reason, String field) {
        if (definition) {
            job.defineRaw(key == null ? null : TopologyFixture.utf8(key), bytes);
        } else {
            job.event(key, bytes);
        }
        List<TestRecord<String, byte[]>> rejected = job.rejected();
        assertEquals(1, rejected.size(), name);
        TestRecord<String, byte[]> record = rejected.get(0);
        assertEquals(reason, TopologyFixture.header(record, Rejections.REASON_HEADER), name);
        String message = TopologyFixture.header(record, Rejections.MESSAGE_HEADER);
        assertTrue(message.contains(field), name + ": message '" + message + "' should name " + field);
        assertNotNull(TopologyFixture.header(record, Rejections.SOURCE_HEADER));
        assertEquals(key, record.key(), "the original key is kept");
        assertArrayEquals(bytes, record.value(), "the original bytes are kept");
        assertEquals(1, job.counters().count(reason) - countBefore(reason, name), name);

        String unit = "good-" + goodEvents++;
        job.event(unit, Events.exposure(ID, unit, unit, "a", job.clock()));
        assertEquals(List.of(), job.rejected(), "a valid event still gets through");
    }

    @Test
    @Order(2)
    void countsHoldExactlyTheValidEventsAndTheDefinitionIsUnchanged() {
        // unit counting: each good exposure is one unit, counted once its conversion window has closed
        job.advance(TestDefinitions.WINDOW_MS + TestDefinitions.RECOMPUTE_MS + 100);
        ExperimentState state = job.state(ID);
        assertEquals(1, state.definition().getVersion());
        assertEquals(List.of(new BernoulliStats(goodEvents, 0), BernoulliStats.EMPTY), state.stats());
        assertEquals(corpus().count(), goodEvents);
        assertTrue(goodEvents >= 15);
        AllocationUpdate latest = job.allocations().stream().reduce((a, b) -> b).orElseThrow();
        assertEquals(ExperimentStatus.RUNNING, latest.getStatus());
        assertEquals(List.of(), job.accepted(), "no rejected definition was accepted");
    }

    private final java.util.Map<String, Long> seen = new java.util.HashMap<>();

    /** Rejections with {@code reason} counted before this case (several cases share a reason). */
    private long countBefore(String reason, String name) {
        long before = seen.getOrDefault(reason, 0L);
        seen.put(reason, before + 1);
        return before;
    }

    private static Arguments event(String name, byte[] bytes, String reason, String field) {
        return Arguments.of(name, false, "key-" + name.length(), bytes, reason, field);
    }

    private static Arguments definition(String name, String key, byte[] bytes, String reason, String field) {
        return Arguments.of(name, true, key, bytes, reason, field);
    }

    private static byte[] utf8(String text) {
        return text.getBytes(StandardCharsets.UTF_8);
    }

    private static byte[] randomBytes() {
        byte[] bytes = new byte[64];
        new SplittableRandom(7).nextBytes(bytes);
        bytes[0] = 0x13;
        return bytes;
    }

    private static AllocationUpdate update() {
        return AllocationUpdate.newBuilder().setExperimentId(ID).setDefinitionVersion(1).setSequence(1)
                .setWeights(List.of(new ArmWeight("a", 0.5), new ArmWeight("b", 0.5))).setComputedAt(T0)
                .setValidUntil(T0 + 1).setStatus(ExperimentStatus.RUNNING).build();
    }

    private static OutcomeEvent click() {
        return OutcomeEvent.newBuilder().setExperimentId(ID).setUnitId("u-9").setEventId("ev-9")
                .setType(EventType.CLICK).setTimestamp(T0).setArm("a").build();
    }

    private static byte[] truncatedAvro() {
        byte[] bytes = RecordCodec.outcomeEvents().encode(click());
        return Arrays.copyOf(bytes, bytes.length - 3);
    }

    /** A VALUE event with a NaN value, written by Avro's own encoder (the codec refuses to write it). */
    private static byte[] avroNaN() {
        OutcomeEvent event = OutcomeEvent.newBuilder(click()).setType(EventType.VALUE).setArm(null)
                .setValue(Double.NaN).build();
        try {
            ByteBuffer buffer = OutcomeEvent.getEncoder().encode(event);
            return Arrays.copyOfRange(buffer.array(), buffer.position(), buffer.limit());
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
