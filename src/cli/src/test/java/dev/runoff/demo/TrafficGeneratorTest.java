package dev.runoff.demo;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Set;
import org.junit.jupiter.api.Test;

/** The demo's seeded visitors: who comes back, who books, and when. */
class TrafficGeneratorTest {

    private static final double[] RATES = {0.05, 0.10, 0.20};

    @Test
    void theSameSeedGivesTheSameVisitsAndBookings() {
        assertEquals(trace(7), trace(7));
        assertNotEquals(trace(7), trace(8));
    }

    private static List<String> trace(long seed) {
        TrafficGenerator g = new TrafficGenerator(RATES, 1.0 / 3, 250, seed);
        List<String> out = new ArrayList<>();
        for (int i = 0; i < 2_000; i++) {
            TrafficGenerator.Visit v = g.nextVisit();
            out.add(v.unit() + (v.returning() ? "r" : "n") + g.bookingDelay(v, i % RATES.length));
        }
        return out;
    }

    @Test
    void aboutAThirdOfVisitsAreByVisitorsWhoCameBefore() {
        TrafficGenerator g = new TrafficGenerator(RATES, 1.0 / 3, 250, 11);
        Set<String> seen = new HashSet<>();
        int n = 90_000;
        for (int i = 0; i < n; i++) {
            TrafficGenerator.Visit v = g.nextVisit();
            assertEquals(!seen.add(v.unit()), v.returning(), "returning means seen before: " + v);
        }
        assertEquals(n, g.visits());
        assertEquals(seen.size(), g.visitors());
        assertEquals(n - seen.size(), g.returningVisits());
        // seeded; every visit but the first is returning with probability 1/3: tolerance 5 binomial standard
        // errors, sqrt(p(1-p)/n)
        assertEquals(1.0 / 3, g.returningVisits() / (double) n, 5 * Math.sqrt((1.0 / 3) * (2.0 / 3) / n));
    }

    @Test
    void bookingsFollowTheHiddenRatesOncePerVisitorAfterExponentialDelays() {
        TrafficGenerator g = new TrafficGenerator(RATES, 0, 250, 13);
        int perArm = 100_000;
        long[] bookings = new long[RATES.length];
        double delays = 0;
        long afterWindow = 0;
        for (int arm = 0; arm < RATES.length; arm++) {
            for (int i = 0; i < perArm; i++) {
                TrafficGenerator.Visit v = g.nextVisit();
                long delay = g.bookingDelay(v, arm);
                assertTrue(delay >= -1);
                if (delay >= 0) {
                    bookings[arm]++;
                    delays += delay;
                    afterWindow += delay > 500 ? 1 : 0;
                    assertEquals(-1, g.bookingDelay(v, arm), "a visitor books at most once");
                }
            }
        }
        long total = 0;
        for (int arm = 0; arm < RATES.length; arm++) {
            // seeded; tolerance 5 binomial standard errors
            assertEquals(RATES[arm], bookings[arm] / (double) perArm,
                    5 * Math.sqrt(RATES[arm] * (1 - RATES[arm]) / perArm), "rate of arm " + arm);
            total += bookings[arm];
        }
        // exponential delays: mean 250 ms (standard deviation 250 ms, 5 standard errors of the mean), and
        // P(delay > 500 ms) = e^-2 (5 binomial standard errors); rounding to whole milliseconds moves neither
        assertEquals(250, delays / total, 5 * 250 / Math.sqrt(total));
        double p = Math.exp(-2);
        assertEquals(p, afterWindow / (double) total, 5 * Math.sqrt(p * (1 - p) / total));
    }

    @Test
    void badSettingsAreRefusedByName() {
        assertThrows(IllegalArgumentException.class, () -> new TrafficGenerator(new double[] {1.5}, 0.3, 250, 1));
        assertThrows(IllegalArgumentException.class, () -> new TrafficGenerator(RATES, 1.0, 250, 1));
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> new TrafficGenerator(RATES, 0.3, 0, 1));
        assertTrue(e.getMessage().startsWith("meanDelayMs"), e.getMessage());
    }

    @Test
    void countedRatesAreTheBookingRatesWithinTheWindow() {
        DemoScenario s = new DemoScenario(3);
        double inWindow = 1 - Math.exp(-(double) DemoScenario.CONVERSION_WINDOW_MS / DemoScenario.BOOKING_DELAY_MEAN_MS);
        double[] expected = s.rates();
        for (int i = 0; i < expected.length; i++) {
            expected[i] *= inWindow;
        }
        assertArrayEquals(expected, s.countedRates(), 1e-15);
        assertFalse(s.countedRates()[0] >= s.rates()[0]);
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
