package dev.runoff.records;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.ArmWeight;
import dev.runoff.records.avro.OutcomeEvent;
import java.util.HexFormat;
import java.util.List;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

class CanonicalJsonTest {

    // RFC 8785 (JSON Canonicalization Scheme), Appendix B, "Number Serialization Samples" (from memory);
    // each line was confirmed with Node.js v20.20.2 JSON.stringify before being written here.
    @ParameterizedTest
    @CsvSource(delimiter = '|', value = {
        "0000000000000000|0",
        "8000000000000000|0",
        "0000000000000001|5e-324",
        "8000000000000001|-5e-324",
        "7fefffffffffffff|1.7976931348623157e+308",
        "ffefffffffffffff|-1.7976931348623157e+308",
        "4340000000000000|9007199254740992",
        "c340000000000000|-9007199254740992",
        "4430000000000000|295147905179352830000",
        "44b52d02c7e14af5|9.999999999999997e+22",
        "44b52d02c7e14af6|1e+23",
        "44b52d02c7e14af7|1.0000000000000001e+23",
        "444b1ae4d6e2ef4e|999999999999999700000",
        "444b1ae4d6e2ef4f|999999999999999900000",
        "444b1ae4d6e2ef50|1e+21",
        "3eb0c6f7a0b5ed8c|9.999999999999997e-7",
        "3eb0c6f7a0b5ed8d|0.000001",
        "41b3de4355555553|333333333.3333332",
        "41b3de4355555554|333333333.33333325",
        "41b3de4355555555|333333333.3333333",
        "41b3de4355555556|333333333.3333334",
        "41b3de4355555557|333333333.33333343",
        "becbf647612f3696|-0.0000033333333333333333",
        "43143ff3c1cb0959|1424953923781206.2",
    })
    void numbersMatchTheRfc8785Samples(String bits, String expected) {
        assertEquals(expected, CanonicalJson.number(fromHex(bits)));
    }

    @Test
    void numbersMatchNodeJsOnThreeHundredVectors() {
        List<String> lines = EcmaScriptNumberVectors.VECTORS.lines().toList();
        assertEquals(324, lines.size());
        for (String line : lines) {
            String[] parts = line.split("\t");
            assertEquals(parts[1], CanonicalJson.number(fromHex(parts[0])), "bits " + parts[0]);
        }
    }

    @Test
    void numbersReadBackAsTheSameDouble() {
        // Round trip through Double.parseDouble (correctly rounded per the Java SE specification).
        SplittableRandom random = new SplittableRandom(20240607L);
        for (int i = 0; i < 5_000; i++) {
            double x = Double.longBitsToDouble(random.nextLong());
            if (Double.isFinite(x)) {
                assertEquals(x, Double.parseDouble(CanonicalJson.number(x)), "bits " + Long.toHexString(
                        Double.doubleToRawLongBits(x)));
            }
        }
    }

    @Test
    void numbersAreNeverLongerThanJavasOwnShortestCandidate() {
        // Double.toString also yields a decimal that reads back exactly; the canonical one has no more digits.
        SplittableRandom random = new SplittableRandom(7L);
        for (int i = 0; i < 5_000; i++) {
            double x = random.nextDouble() * Math.pow(10, random.nextInt(-30, 30));
            String java = new java.math.BigDecimal(Double.toString(x)).stripTrailingZeros().unscaledValue().toString();
            String ours = ProvenNumber.shortestDecimal(x).stripTrailingZeros().unscaledValue().toString();
            assertTrue(ours.length() <= java.length(), x + ": " + ours + " vs " + java);
        }
    }

    @Test
    void javasDigitsAreUsedOnlyWhereTheExactSearchAgrees() {
        // The reference's fast path (ProvenNumber, which CanonicalNumberTest compares the writer with) and the
        // writer itself must choose the same text as the exact search (ECMAScript Number::toString step 5)
        // for every double; random bit patterns, rates, small ratios, powers of two and ten with neighbours
        // and subnormals, where Java 17's Double.toString is known to give more digits than needed
        // (JDK-4511638, fixed in Java 19).
        SplittableRandom random = new SplittableRandom(20261202L);
        int decided = 0;
        int total = 0;
        for (double x : sampleDoubles(random)) {
            String fast = ProvenNumber.fastNumber(x);
            String exact = ProvenNumber.exactNumber(x);
            if (fast != null) {
                assertEquals(exact, fast, "bits " + Long.toHexString(Double.doubleToRawLongBits(x)));
                decided++;
            }
            assertEquals(exact, CanonicalJson.number(x));
            total++;
        }
        assertTrue(decided > total * 9 / 10, "fast path decided " + decided + " of " + total);
    }

    @Test
    void wholeNumbersAreWrittenAsTheExactSearchWritesThem() {
        // Whole numbers below 2^53 (posterior parameters, counts) take a shortcut; ECMAScript Number::toString
        // step 5, as the exact search implements it, decides their text too: every digit, no exponent.
        SplittableRandom random = new SplittableRandom(53L);
        List<Double> xs = new java.util.ArrayList<>(List.of(1.0, 9.0, 10.0, 100.0, 391.0, 8489.0, 0x1p52,
                0x1p53 - 1, 0x1p53 - 2, 1e15, 1e15 + 1, 4503599627370500.0));
        for (int i = 0; i < 3_000; i++) {
            xs.add((double) random.nextLong(1, 1L << 53));
            xs.add((double) random.nextInt(1, 1_000_000));
            xs.add(random.nextInt(1, 1_000) * Math.pow(10, random.nextInt(0, 13)));
        }
        for (double x : xs) {
            assertEquals(ProvenNumber.exactNumber(x), CanonicalJson.number(x), "bits " + Long.toHexString(
                    Double.doubleToRawLongBits(x)));
            assertEquals("-" + ProvenNumber.exactNumber(x), CanonicalJson.number(-x));
        }
        assertEquals("9007199254740991", CanonicalJson.number(0x1p53 - 1));
    }

    @Test
    void aRepeatedNumberIsWrittenEachTime() {
        AllocationUpdate update = Samples.update();
        update.setWeights(List.of(new ArmWeight("a", 0.25), new ArmWeight("b", 0.25), new ArmWeight("c", -0.0),
                new ArmWeight("d", 0.5)));
        assertTrue(CanonicalJson.of(update).contains("\"weights\":[{\"arm\":\"a\",\"weight\":0.25},"
                + "{\"arm\":\"b\",\"weight\":0.25},{\"arm\":\"c\",\"weight\":0},{\"arm\":\"d\",\"weight\":0.5}]"),
                CanonicalJson.of(update));
    }

    private static List<Double> sampleDoubles(SplittableRandom random) {
        List<Double> xs = new java.util.ArrayList<>();
        for (int i = 0; i < 1_500; i++) {
            double bits = Math.abs(Double.longBitsToDouble(random.nextLong()));
            if (Double.isFinite(bits) && bits > 0) {
                xs.add(bits);
            }
            xs.add(random.nextDouble());
            xs.add(random.nextInt(1, 100_000) / Math.pow(10, random.nextInt(0, 12)));
            xs.add(Double.longBitsToDouble(random.nextLong(1, 1L << 52)));
        }
        for (int e = -1074; e <= 1023; e += e < -1000 ? 1 : 5) {
            double p = Math.scalb(1.0, e);
            xs.addAll(List.of(p, Math.nextUp(p), Math.nextDown(p)));
        }
        for (int e = -320; e <= 308; e++) {
            double p = Double.parseDouble("1e" + e);
            if (p > 0) {
                xs.addAll(List.of(p, Math.nextUp(p), Math.nextDown(p)));
            }
        }
        xs.removeIf(x -> !(x > 0) || !Double.isFinite(x));
        return xs;
    }

    @Test
    void nonFiniteNumbersCannotBeWritten() {
        assertThrows(IllegalArgumentException.class, () -> CanonicalJson.number(Double.NaN));
        assertThrows(IllegalArgumentException.class, () -> CanonicalJson.number(Double.POSITIVE_INFINITY));
        AllocationUpdate update = Samples.update();
        update.setWeights(List.of(new ArmWeight("a", Double.NaN), new ArmWeight("b", 1.0)));
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> CanonicalJson.of(update));
        assertTrue(e.getMessage().startsWith("weights[0].weight: NaN"), e.getMessage());
    }

    @Test
    void stringsAreEscapedAsRfc8785Prescribes() {
        // RFC 8785 section 3.2.2.2: short escapes for \b \t \n \f \r, backslash-u00xx (lowercase) for the other
        // controls, everything else literal, including '/', DEL and non-ASCII.
        OutcomeEvent event = Samples.click();
        event.setArm("q\"b\\s/\b\t\n\f\r\u0001\u001f\u007f\u00e9\u20ac\ud83d\ude00");
        String json = CanonicalJson.of(event);
        assertTrue(json.contains("\"arm\":\"q\\\"b\\\\s/\\b\\t\\n\\f\\r\\u0001\\u001f\u007f\u00e9\u20ac\ud83d\ude00\""),
                json);
    }

    @Test
    void unpairedSurrogatesCannotBeWritten() {
        OutcomeEvent event = Samples.click();
        event.setArm("x\ud800y");
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> CanonicalJson.of(event));
        assertTrue(e.getMessage().startsWith("arm: unpaired surrogate at index 1"), e.getMessage());
    }

    @Test
    void keysAreSortedAndNullsAreWrittenOut() {
        assertEquals("{\"arm\":\"green\",\"eventId\":\"ev-0001\",\"experimentId\":\"checkout-button\","
                + "\"timestamp\":1699999999000,\"type\":\"CLICK\",\"unitId\":\"u-5f1d3a\",\"value\":null}",
                CanonicalJson.of(Samples.click()));
    }

    @Test
    void integersKeepAllSixtyFourBits() {
        OutcomeEvent event = Samples.click();
        event.setTimestamp(Long.MAX_VALUE);
        assertTrue(CanonicalJson.of(event).contains("\"timestamp\":9223372036854775807,"));
        assertTrue(CanonicalJson.of(Samples.decision()).contains("\"seed\":-7046029254386353131,"));
    }

    @Test
    void leavingOutAFieldRemovesTheKeyEntirely() {
        String json = CanonicalJson.without(Samples.click(), "unitId");
        assertFalse(json.contains("unitId"), json);
        assertTrue(json.startsWith("{\"arm\":\"green\",\"eventId\""), json);
    }

    private static double fromHex(String bits) {
        return Double.longBitsToDouble(HexFormat.fromHexDigitsToLong(bits));
    }
}
