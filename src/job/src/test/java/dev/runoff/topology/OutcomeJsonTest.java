package dev.runoff.topology;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.records.Decoded;
import dev.runoff.records.Format;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.OutcomeEvent;
import java.nio.charset.StandardCharsets;
import java.util.List;
import java.util.SplittableRandom;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;
import org.junit.jupiter.api.Test;

/**
 * The quick reader of outcome events against the records package's decoder, which parses with Jackson (the
 * reference here): whatever the quick reader takes, it must read to the same event, so that validation then
 * gives the same result, problems and messages included; whatever it refuses goes to that decoder.
 */
class OutcomeJsonTest {

    private static final long NOW = 1_700_000_000_000L;
    private static final RecordCodec<OutcomeEvent> CODEC = RecordCodec.outcomeEvents();
    private static final String PLAIN = "{\"experimentId\":\"exp-1\",\"unitId\":\"u-1\",\"eventId\":\"ev-1\","
            + "\"type\":\"EXPOSURE\",\"timestamp\":1699999999000,\"arm\":\"a\"}";

    @ParameterizedTest
    @ValueSource(strings = {
        PLAIN,
        " {\n\t\"timestamp\" : 1699999999000 ,\r\n \"type\":\"CLICK\", \"arm\": null, \"eventId\":\"e\","
                + "\"unitId\":\"u\",\"experimentId\":\"x\", \"value\" : null, \"signal\": null } \n",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"VALUE\",\"timestamp\":0,\"value\":-0}",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"VALUE\",\"timestamp\":0,\"value\":-0.0}",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"VALUE\",\"timestamp\":0,\"value\":0.1}",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"VALUE\",\"timestamp\":0,"
                + "\"value\":123456789012345678}",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"VALUE\",\"timestamp\":0,"
                + "\"value\":9.007199254740993E15}",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"VALUE\",\"timestamp\":0,\"value\":4.9e-324}",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"VALUE\",\"timestamp\":0,\"value\":2e-400}",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"VALUE\",\"timestamp\":0,\"value\":1E+3}",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"CONVERSION\",\"timestamp\":5,"
                + "\"signal\":\"payment-failed\",\"value\":12.5}",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"CLICK\",\"timestamp\":-1}",
        "{\"experimentId\":\" \",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"EXPOSURE\",\"timestamp\":0}",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"CLICK\",\"timestamp\":0,\"value\":3}",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"VALUE\",\"timestamp\":0,\"value\":1e16}",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"CLICK\",\"timestamp\":999999999999999999}"
    })
    void readsThePlainLayoutToTheEventTheFullDecoderReads(String json) {
        byte[] bytes = json.getBytes(StandardCharsets.UTF_8);
        assertNotNull(OutcomeJson.read(bytes), "read by the quick reader");
        assertSameAsFullDecoder(bytes);
    }

    @ParameterizedTest
    @ValueSource(strings = {
        "{\"experimentId\":\"x\\u0041\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"CLICK\",\"timestamp\":0}",
        "{\"experimentId\":\"\u00e9\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"CLICK\",\"timestamp\":0}",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"CLICK\",\"timestamp\":0,\"other\":1}",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"CLICK\",\"timestamp\":0,\"unitId\":\"v\"}",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"CLICK\"}",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"CLICK\",\"timestamp\":0} x",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"VALUE\",\"timestamp\":0,\"value\":NaN}",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"VALUE\",\"timestamp\":0,\"value\":01}",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"VALUE\",\"timestamp\":0,\"value\":1e400}",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"VALUE\",\"timestamp\":0,\"value\":1.}",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"VALUE\",\"timestamp\":0,"
                + "\"value\":1234567890123456789}",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"CLICK\",\"timestamp\":1.0}",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"CLICK\",\"timestamp\":\"1\"}",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"CLICK\",\"timestamp\":1e3}",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"BUY\",\"timestamp\":0}",
        "{\"experimentId\":null,\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"CLICK\",\"timestamp\":0}",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"CLICK\",\"timestamp\":0,}",
        "[{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"CLICK\",\"timestamp\":0}]",
        "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":\"CLICK\",\"timestamp\":0,\"arm\":nul}",
        ""
    })
    void leavesEverythingElseToTheFullDecoder(String json) {
        byte[] bytes = json.getBytes(StandardCharsets.UTF_8);
        assertNull(OutcomeJson.read(bytes));
    }

    /** What the records package writes as JSON (its canonical form, sorted keys) is read to the same event. */
    @Test
    void readsTheJsonTheRecordsPackageWrites() {
        List<OutcomeEvent> events = List.of(
                new OutcomeEvent("x", "u", "e", EventType.EXPOSURE, NOW, "a", null, null),
                new OutcomeEvent("x", "u", "e", EventType.VALUE, NOW, null, 12.25, null),
                new OutcomeEvent("x", "u", "e", EventType.VALUE, NOW, "b", 3.0, null),
                new OutcomeEvent("x", "u", "e", EventType.VALUE, NOW, "b", -1e-7, null),
                new OutcomeEvent("x", "u", "e", EventType.CONVERSION, NOW, null, 9.5e14, "payment-failed"));
        for (OutcomeEvent event : events) {
            byte[] bytes = CODEC.encode(event, Format.JSON);
            OutcomeEvent read = OutcomeJson.read(bytes);
            assertNotNull(read, new String(bytes, StandardCharsets.UTF_8));
            assertEquals(event.toString(), read.toString());
            assertEquals(bits(event.getValue()), bits(read.getValue()));
            assertSameAsFullDecoder(bytes);
        }
    }

    @Test
    void readsUpToItsBoundWhichTheFullDecoderAcceptsToo() {
        String padded = PLAIN + " ".repeat(OutcomeJson.MAX_BYTES - PLAIN.length());
        byte[] atBound = padded.getBytes(StandardCharsets.UTF_8);
        assertNotNull(OutcomeJson.read(atBound));
        assertTrue(CODEC.decode(atBound, NOW).isValid(), "the records package reads events of this size");
        assertNull(OutcomeJson.read((padded + " ").getBytes(StandardCharsets.UTF_8)));
    }

    /**
     * Seeded random edits of plain events (characters that matter to JSON inserted, replaced and deleted):
     * whatever the quick reader takes decodes and validates exactly as the full decoder does.
     */
    @Test
    void agreesWithTheFullDecoderOnRandomEdits() {
        SplittableRandom random = new SplittableRandom(15);
        List<String> seeds = List.of(PLAIN, "{\"experimentId\":\"x\",\"unitId\":\"u\",\"eventId\":\"e\",\"type\":"
                + "\"VALUE\",\"timestamp\":1,\"arm\":null,\"value\":-12.25e1,\"signal\":null}");
        String alphabet = "{}[]:,\" \\\n-+.0123456789eEnul aAZ\u00e9\u0001";
        int taken = 0;
        for (int i = 0; i < 20_000; i++) {
            StringBuilder text = new StringBuilder(seeds.get(random.nextInt(seeds.size())));
            for (int edits = 1 + random.nextInt(3); edits > 0 && text.length() > 0; edits--) {
                int at = random.nextInt(text.length());
                char c = alphabet.charAt(random.nextInt(alphabet.length()));
                switch (random.nextInt(3)) {
                    case 0 -> text.insert(at, c);
                    case 1 -> text.setCharAt(at, c);
                    default -> text.deleteCharAt(at);
                }
            }
            byte[] bytes = text.toString().getBytes(StandardCharsets.UTF_8);
            if (OutcomeJson.read(bytes) != null) {
                taken++;
                assertSameAsFullDecoder(bytes);
            }
        }
        assertTrue(taken > 1_000, "enough edited events read by the quick reader to compare: " + taken);
    }

    /** The quick reader then validation gives what the full decoder gives: validity, problems, fields, bits. */
    private static void assertSameAsFullDecoder(byte[] bytes) {
        String input = new String(bytes, StandardCharsets.UTF_8);
        Decoded<OutcomeEvent> full = CODEC.decode(bytes, NOW);
        Decoded<OutcomeEvent> quick = CODEC.validate(OutcomeJson.read(bytes), NOW);
        assertEquals(full.isValid(), quick.isValid(), input);
        assertEquals(full.problems().toString(), quick.problems().toString(), input);
        if (full.isValid()) {
            OutcomeEvent a = full.orThrow();
            OutcomeEvent b = quick.orThrow();
            assertEquals(a.toString(), b.toString(), input);
            assertEquals(bits(a.getValue()), bits(b.getValue()), input);
        }
    }

    private static Long bits(Double value) {
        return value == null ? null : Double.doubleToRawLongBits(value);
    }
}
