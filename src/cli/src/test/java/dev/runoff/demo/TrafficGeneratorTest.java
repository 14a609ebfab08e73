package dev.runoff.demo;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.OutcomeEvent;
import java.util.List;
import org.junit.jupiter.api.Test;

/** The demo's seeded visitors. */
class TrafficGeneratorTest {

    private static final List<String> ARMS = List.of("a", "b", "c");

    @Test
    void drawIsTheInverseCumulativeDistribution() {
        double[] w = {0.2, 0.0, 0.8};
        assertEquals(0, TrafficGenerator.draw(w, 0.0));
        assertEquals(0, TrafficGenerator.draw(w, 0.1999));
        assertEquals(2, TrafficGenerator.draw(w, 0.2));
        assertEquals(2, TrafficGenerator.draw(w, 0.9999999));
        // weights summing to slightly less than 1 (rounding) still give the last arm with weight
        assertEquals(2, TrafficGenerator.draw(new double[] {0.2, 0.0, 0.7999999}, 0.99999995));
        assertThrows(IllegalArgumentException.class, () -> TrafficGenerator.draw(new double[] {0, 0}, 0.5));
    }

    @Test
    void theSameSeedGivesTheSameEvents() {
        double[] w = {0.5, 0.25, 0.25};
        List<OutcomeEvent> first = new TrafficGenerator("e", ARMS, new double[] {0.1, 0.2, 0.3}, 7).next(500, w, 1_000);
        List<OutcomeEvent> again = new TrafficGenerator("e", ARMS, new double[] {0.1, 0.2, 0.3}, 7).next(500, w, 1_000);
        List<OutcomeEvent> other = new TrafficGenerator("e", ARMS, new double[] {0.1, 0.2, 0.3}, 8).next(500, w, 1_000);
        assertEquals(first, again);
        assertTrue(!first.equals(other));
    }

    @Test
    void sharesFollowTheWeightsAndBookingsTheHiddenRates() {
        double[] w = {0.6, 0.3, 0.1};
        double[] rates = {0.05, 0.10, 0.20};
        int n = 200_000;
        List<OutcomeEvent> events = new TrafficGenerator("e", ARMS, rates, 11).next(n, w, 1_000);
        long[] exposures = new long[3];
        long[] bookings = new long[3];
        String lastArmOfUnit = null;
        // one codec for every event, and the message built only on failure: building a codec per event and
        // every event's text cost most of this test's time
        RecordCodec<OutcomeEvent> codec = RecordCodec.outcomeEvents();
        for (OutcomeEvent e : events) {
            assertTrue(codec.validate(e, 1_000).isValid(), e::toString);
            if (e.getType() == EventType.EXPOSURE) {
                lastArmOfUnit = e.getArm();
                exposures[ARMS.indexOf(lastArmOfUnit)]++;
            } else {
                assertEquals(EventType.CONVERSION, e.getType());
                bookings[ARMS.indexOf(lastArmOfUnit)]++;
            }
        }
        for (int i = 0; i < 3; i++) {
            // seeded; tolerance 5 binomial standard errors, sqrt(p(1-p)/n)
            double share = exposures[i] / (double) n;
            assertEquals(w[i], share, 5 * Math.sqrt(w[i] * (1 - w[i]) / n), "share of " + ARMS.get(i));
            double rate = bookings[i] / (double) exposures[i];
            assertEquals(rates[i], rate, 5 * Math.sqrt(rates[i] * (1 - rates[i]) / exposures[i]), "rate of " + ARMS.get(i));
        }
    }

    @Test
    void everyPrefixOfTheScenarioHoldsItsBestLayoutWithAClearGap() {
        for (int k = 2; k <= DemoScenario.MAX_ARMS; k++) {
            DemoScenario s = new DemoScenario(k);
            assertEquals("flexible-bundle", s.trueBest());
            assertEquals(k, s.rates().length);
        }
        assertThrows(IllegalArgumentException.class, () -> new DemoScenario(1));
        assertThrows(IllegalArgumentException.class, () -> new DemoScenario(6));
    }

    @Test
    void barsAreThirtyCellsForTheWholeTraffic() {
        assertEquals("█".repeat(30), DemoReport.bar(1.0, true));
        assertEquals("", DemoReport.bar(0.0, true));
        assertEquals("███████▌", DemoReport.bar(0.25, true));
        assertEquals("#".repeat(8), DemoReport.bar(0.25, false));
    }
}
