package dev.runoff.records;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.sun.management.ThreadMXBean;
import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.OutcomeEvent;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.lang.management.ManagementFactory;
import java.nio.charset.StandardCharsets;
import java.util.Arrays;
import java.util.stream.IntStream;
import java.util.stream.Stream;
import org.apache.avro.io.BinaryEncoder;
import org.apache.avro.io.EncoderFactory;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.Arguments;
import org.junit.jupiter.params.provider.MethodSource;

/**
 * A corpus of malformed and hostile inputs. Each must be rejected with the right field and reason, and
 * none may produce a record.
 */
class HostileInputTest {

    private static final RecordCodec<OutcomeEvent> EVENTS = RecordCodec.outcomeEvents();
    private static final String EVENT = "{\"experimentId\":\"checkout-button\",\"unitId\":\"u-1\",\"eventId\":\"ev-1\","
            + "\"type\":\"CLICK\",\"timestamp\":1699999999000,\"arm\":\"green\"}";
    private static final String DEFINITION = "{\"experimentId\":\"e\",\"arms\":[\"a\",\"b\",\"c\"],"
            + "\"metric\":{\"kind\":\"BERNOULLI\",\"successEvent\":\"CLICK\"}}";

    static Stream<Arguments> eventCorpus() {
        return Stream.of(
                event("empty bytes", new byte[0], "record", Reason.EMPTY, "empty input"),
                event("null value (tombstone)", null, "record", Reason.EMPTY, "tombstone"),
                event("truncated JSON", utf8(EVENT.substring(0, 40)), "record", Reason.MALFORMED_JSON,
                        "invalid JSON at line 1"),
                event("JSON array instead of object", utf8("[1,2,3]"), "record", Reason.MALFORMED_JSON,
                        "expected a JSON object, got ARRAY"),
                event("trailing garbage", utf8(EVENT + " {}"), "record", Reason.MALFORMED_JSON, "invalid JSON"),
                event("duplicate key", utf8(EVENT.replace("\"arm\":\"green\"", "\"arm\":\"green\",\"arm\":\"blue\"")),
                        "record", Reason.MALFORMED_JSON, "Duplicate field 'arm'"),
                event("invalid UTF-8", concat(utf8("{\"experimentId\":\""), new byte[] {(byte) 0xFF, (byte) 0xFE},
                        utf8("\"}")), "record", Reason.MALFORMED_JSON, "Invalid UTF-8"),
                event("missing unitId", utf8(EVENT.replace("\"unitId\":\"u-1\",", "")), "unitId", Reason.MISSING,
                        "missing"),
                event("null unitId", utf8(EVENT.replace("\"u-1\"", "null")), "unitId", Reason.MISSING,
                        "must not be null"),
                event("timestamp as string", utf8(EVENT.replace("1699999999000", "\"yesterday\"")), "timestamp",
                        Reason.WRONG_TYPE, "expected an integer, got string"),
                event("timestamp with a fraction", utf8(EVENT.replace("1699999999000", "1699999999000.5")),
                        "timestamp", Reason.WRONG_TYPE, "expected an integer, got the number 1.6999999990005E12"),
                event("timestamp beyond 64 bits", utf8(EVENT.replace("1699999999000", "99999999999999999999")),
                        "timestamp", Reason.OUT_OF_RANGE, "'99999999999999999999' does not fit in 64 bits"),
                event("malformed guardrail signal", utf8(EVENT.replace("}", ",\"signal\":\"Payment Failed\"}")),
                        "signal", Reason.INVALID_TEXT, "'Payment Failed' must be 1 to 64 of a-z 0-9 and -"),
                event("guardrail signal on an exposure", utf8(EVENT.replace("CLICK", "EXPOSURE")
                        .replace("}", ",\"signal\":\"payment-failed\"}")), "signal", Reason.INCONSISTENT,
                        "must be null for EXPOSURE events"),
                event("negative timestamp", utf8(EVENT.replace("1699999999000", "-5")), "timestamp",
                        Reason.OUT_OF_RANGE, "must be >= 0, got -5"),
                event("timestamp in 2100", utf8(EVENT.replace("1699999999000", "4102444800000")), "timestamp",
                        Reason.BAD_TIME, "4102444800000 is more than 86400000 ms after the current time 1700000000000"),
                event("unknown event type", utf8(EVENT.replace("CLICK", "PURCHASE")), "type", Reason.UNKNOWN_VALUE,
                        "unknown value 'PURCHASE' (expected one of EXPOSURE, CLICK, CONVERSION, VALUE)"),
                event("event type in lower case", utf8(EVENT.replace("CLICK", "click")), "type",
                        Reason.UNKNOWN_VALUE, "unknown value 'click'"),
                event("NaN value", utf8(EVENT.replace("CLICK", "VALUE").replace("}", ",\"value\":NaN}")), "value",
                        Reason.NOT_FINITE, "NaN is not a finite number"),
                event("overflowing value", utf8(EVENT.replace("CLICK", "VALUE").replace("}", ",\"value\":1e999}")),
                        "value", Reason.NOT_FINITE, "Infinity is not a finite number"),
                event("value beyond the magnitude limit",
                        utf8(EVENT.replace("CLICK", "CONVERSION").replace("}", ",\"value\":-1e300}")), "value",
                        Reason.OUT_OF_RANGE, "-1.0E300 exceeds the magnitude limit 1.0E15"),
                event("VALUE event without value", utf8(EVENT.replace("CLICK", "VALUE")), "value", Reason.MISSING,
                        "missing (a VALUE event must carry a value)"),
                event("CLICK with a value", utf8(EVENT.replace("}", ",\"value\":3}")), "value", Reason.INCONSISTENT,
                        "must be null for CLICK events, got 3.0"),
                event("EXPOSURE without arm", utf8(EVENT.replace("CLICK", "EXPOSURE").replace(",\"arm\":\"green\"", "")),
                        "arm", Reason.MISSING, "missing (an EXPOSURE must name its arm)"),
                event("huge unitId", utf8(EVENT.replace("u-1", "u".repeat(5_000))), "unitId", Reason.TOO_LONG,
                        "5000 characters, at most 256 allowed"),
                event("unitId one character too long", utf8(EVENT.replace("u-1", "u".repeat(257))), "unitId",
                        Reason.TOO_LONG, "257 characters, at most 256 allowed"),
                event("unitId of 257 non-ASCII code points", utf8(EVENT.replace("u-1", "\u00e9".repeat(257))),
                        "unitId", Reason.TOO_LONG, "257 characters, at most 256 allowed"),
                event("DEL character in arm", utf8(EVENT.replace("green", "green\u007f")), "arm",
                        Reason.INVALID_TEXT, "control character U+007F at index 5"),
                event("C1 control character in arm", utf8(EVENT.replace("green", "gr\u0085een")), "arm",
                        Reason.INVALID_TEXT, "control character U+0085 at index 2"),
                event("input beyond 16 KiB", utf8(EVENT.replace("u-1", "u".repeat(20_000))), "record",
                        Reason.TOO_LARGE, "bytes, at most 16384 allowed"),
                event("blank experimentId", utf8(EVENT.replace("checkout-button", "   ")), "experimentId",
                        Reason.INVALID_TEXT, "must not be blank"),
                event("NUL character in eventId", utf8(EVENT.replace("ev-1", "ev\\u0000-1")), "eventId",
                        Reason.INVALID_TEXT, "control character U+0000 at index 2"),
                event("newline in arm", utf8(EVENT.replace("green", "green\\nFAKE LOG LINE")), "arm",
                        Reason.INVALID_TEXT, "control character U+000A at index 5 in 'green\\u000aFAKE LOG LINE'"),
                event("unpaired surrogate in unitId", utf8(EVENT.replace("u-1", "u\\ud800")), "unitId",
                        Reason.INVALID_TEXT, "unpaired surrogate U+D800 at index 1"),
                event("deeply nested JSON", utf8("{\"a\":" + "[".repeat(1_000) + "]".repeat(1_000) + "}"),
                        "record", Reason.TOO_LARGE, "nesting depth"),
                event("wrong Avro fingerprint (an allocation update)",
                        RecordCodec.allocationUpdates().encode(Samples.update()), "record", Reason.UNKNOWN_SCHEMA,
                        "avro: unknown schema fingerprint"),
                event("Avro header only", Arrays.copyOf(EVENTS.encode(Samples.click()), 6), "record",
                        Reason.MALFORMED_AVRO, "shorter than the 10-byte single-object header"),
                event("truncated Avro body", truncated(EVENTS.encode(Samples.click()), 3), "record",
                        Reason.MALFORMED_AVRO, "avro: truncated or corrupt body (EOFException)"),
                event("bytes after the Avro record", Arrays.copyOf(EVENTS.encode(Samples.click()),
                        EVENTS.encode(Samples.click()).length + 4), "record", Reason.MALFORMED_AVRO,
                        "avro: 4 bytes after the end of the record"),
                event("Avro string claiming 1.5 GB", hostileAvroString(), "record", Reason.MALFORMED_AVRO,
                        "avro: truncated or corrupt body"),
                event("Avro event with a NaN value", avroEventWithNaN(), "value", Reason.NOT_FINITE,
                        "NaN is not a finite number"),
                event("Avro enum index beyond the symbols", avroEvent(encoder -> {
                    encoder.writeEnum(9);
                    encoder.writeLong(5);
                    encoder.writeIndex(0);
                    encoder.writeIndex(0);
                    encoder.writeIndex(0);
                }), "record", Reason.MALFORMED_AVRO, "avro: truncated or corrupt body (ArrayIndexOutOfBoundsException"),
                event("Avro union index beyond the branches", avroEvent(encoder -> {
                    encoder.writeEnum(1);
                    encoder.writeLong(5);
                    encoder.writeIndex(7);
                }), "record", Reason.MALFORMED_AVRO, "avro: truncated or corrupt body (IndexOutOfBoundsException"),
                event("Avro negative string length", avroEvent(encoder -> {
                    encoder.writeEnum(1);
                    encoder.writeLong(5);
                    encoder.writeIndex(1);
                    encoder.writeLong(-5);
                }), "record", Reason.MALFORMED_AVRO, "avro: truncated or corrupt body"));
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("eventCorpus")
    void eventIsRejectedNamingTheField(String name, byte[] bytes, String field, Reason reason, String message) {
        Decoded<OutcomeEvent> decoded = EVENTS.decode(bytes, Samples.NOW);
        Rejections.assertFirstProblem(decoded, field, reason, message);
    }

    @Test
    void stringsUpToTheLimitInCodePointsAreAccepted() {
        // The limit counts code points (Limits): 256 ASCII characters, 256 two-byte characters and 256
        // characters outside the BMP (512 UTF-16 units) all pass.
        for (String unit : new String[] {"u".repeat(256), "\u00e9".repeat(256), "\ud83d\ude00".repeat(256)}) {
            assertTrue(EVENTS.decode(utf8(EVENT.replace("u-1", unit)), Samples.NOW).isValid(), unit);
        }
    }

    static Stream<Arguments> definitionCorpus() {
        return Stream.of(
                definition("duplicate arm names", DEFINITION.replace("\"c\"]", "\"a\"]"), "arms[2]",
                        Reason.DUPLICATE, "'a' appears twice (also at index 0)"),
                definition("a single arm", DEFINITION.replace("[\"a\",\"b\",\"c\"]", "[\"a\"]"), "arms",
                        Reason.TOO_FEW, "1 items, at least 2 required"),
                definition("101 arms", DEFINITION.replace("[\"a\",\"b\",\"c\"]", manyArms(101)), "arms",
                        Reason.TOO_MANY, "101 items, at most 100 allowed"),
                definition("misspelt field", DEFINITION.replace("}}", "},\"stopping\":{\"minTrialPerArm\":5}}"),
                        "stopping.minTrialPerArm", Reason.UNKNOWN_FIELD, "unknown field (expected one of rule, delta"),
                definition("prior mixing two shapes",
                        DEFINITION.replace("\"CLICK\"}", "\"CLICK\",\"prior\":{\"a\":1,\"mu0\":0}}"), "metric.prior",
                        Reason.WRONG_TYPE, "fields {'a', 'mu0'} match none of BetaParams {a, b}, "
                                + "NormalGammaPriorSpec {mu0, kappa0, alpha0, beta0}"),
                definition("metric as a string", DEFINITION.replace(
                        "{\"kind\":\"BERNOULLI\",\"successEvent\":\"CLICK\"}", "\"BERNOULLI\""), "metric",
                        Reason.WRONG_TYPE, "expected an object, got string"),
                definition("arm name as a number", DEFINITION.replace("\"b\"", "7"), "arms[1]", Reason.WRONG_TYPE,
                        "expected a string, got the number 7"));
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("definitionCorpus")
    void definitionIsRejectedNamingTheField(String name, String json, String field, Reason reason, String message) {
        Decoded<?> decoded = RecordCodec.definitions().decode(utf8(json), Samples.NOW);
        Rejections.assertFirstProblem(decoded, field, reason, message);
    }

    @Test
    void hostileAvroLengthsAllocateLittleMemory() throws IOException {
        ThreadMXBean threads = (ThreadMXBean) ManagementFactory.getThreadMXBean();
        assertTrue(threads.isThreadAllocatedMemorySupported(), "this test needs per-thread allocation counters");
        byte[] hostileList = hostileAvroList();
        long before = threads.getCurrentThreadAllocatedBytes();
        Decoded<OutcomeEvent> string = EVENTS.decode(hostileAvroString(), Samples.NOW);
        Decoded<AllocationUpdate> list = RecordCodec.allocationUpdates().decode(hostileList, Samples.NOW);
        long allocated = threads.getCurrentThreadAllocatedBytes() - before;
        assertEquals(Reason.MALFORMED_AVRO, string.reason());
        assertEquals(Reason.MALFORMED_AVRO, list.reason());
        // Without the guards Avro 1.12 allocates what the prefixes claim: 1.5 GB for the string, 80 MB
        // (20 million references) for the list (measured while writing this test). 16 MB is ample slack.
        assertTrue(allocated < 16_000_000, allocated + " bytes allocated");
    }

    private static Arguments event(String name, byte[] bytes, String field, Reason reason, String message) {
        return Arguments.of(name, bytes, field, reason, message);
    }

    private static Arguments definition(String name, String json, String field, Reason reason, String message) {
        return Arguments.of(name, json, field, reason, message);
    }

    private static String manyArms(int count) {
        return IntStream.range(0, count).mapToObj(i -> "\"arm" + i + "\"").toList().toString().replace(" ", "");
    }

    private static byte[] utf8(String text) {
        return text.getBytes(StandardCharsets.UTF_8);
    }

    private static byte[] concat(byte[]... parts) {
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        for (byte[] part : parts) {
            out.writeBytes(part);
        }
        return out.toByteArray();
    }

    private static byte[] truncated(byte[] bytes, int drop) {
        return Arrays.copyOf(bytes, bytes.length - drop);
    }

    /** The 10-byte header of an OutcomeEvent, then an experimentId claiming 1.5 GB followed by 20 bytes. */
    private static byte[] hostileAvroString() {
        byte[] header = Arrays.copyOf(EVENTS.encode(Samples.click()), 10);
        return withBody(header, encoder -> {
            encoder.writeLong(1_500_000_000L);
            encoder.writeFixed(new byte[20]);
        });
    }

    /** An AllocationUpdate whose weights list claims 20 million items, followed by 20 bytes. */
    private static byte[] hostileAvroList() {
        byte[] header = Arrays.copyOf(RecordCodec.allocationUpdates().encode(Samples.update()), 10);
        return withBody(header, encoder -> {
            encoder.writeString("e");
            encoder.writeLong(1);
            encoder.writeLong(1);
            encoder.writeLong(20_000_000L);
            encoder.writeFixed(new byte[20]);
        });
    }

    /** An OutcomeEvent header and its three ids, then whatever {@code rest} writes. */
    private static byte[] avroEvent(BodyWriter rest) {
        byte[] header = Arrays.copyOf(EVENTS.encode(Samples.click()), 10);
        return withBody(header, encoder -> {
            encoder.writeString("e");
            encoder.writeString("u");
            encoder.writeString("x");
            rest.write(encoder);
        });
    }

    private static byte[] avroEventWithNaN() {
        OutcomeEvent event = Samples.value();
        event.setValue(Double.NaN);
        try {
            // The generated encoder does not validate; our codec would refuse to write this.
            return OutcomeEvent.getEncoder().encode(event).array();
        } catch (IOException e) {
            throw new IllegalStateException(e);
        }
    }

    private interface BodyWriter {
        void write(BinaryEncoder encoder) throws IOException;
    }

    private static byte[] withBody(byte[] header, BodyWriter body) {
        try {
            ByteArrayOutputStream out = new ByteArrayOutputStream();
            out.writeBytes(header);
            BinaryEncoder encoder = EncoderFactory.get().directBinaryEncoder(out, null);
            body.write(encoder);
            encoder.flush();
            return out.toByteArray();
        } catch (IOException e) {
            throw new IllegalStateException(e);
        }
    }

}
