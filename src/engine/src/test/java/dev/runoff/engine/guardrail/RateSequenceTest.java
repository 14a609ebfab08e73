package dev.runoff.engine.guardrail;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.planning.SimulationSummary;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.junit.jupiter.api.Test;

class RateSequenceTest {

    /**
     * The ends of {p : B(h+1, n-h+1) / (p^h (1-p)^(n-h)) < 1/alpha}, the Beta(1, 1) mixture confidence
     * sequence (Robbins 1970; Waudby-Smith and Ramdas 2020, Section 2), solved outside Java with mpmath 1.3.0
     * at 40 digits (findroot on the same formula). Tolerance 1e-12.
     */
    @ParameterizedTest
    @CsvSource({
        "1000, 30, 0.025, 0.013186595877055853, 0.056727028532062914",
        "200, 0, 0.05, 0, 0.040646046251513179",
        "50, 50, 0.05, 0.87061871090849227, 1",
        "10000, 512, 0.005, 0.041724325809991844, 0.061930651547935721",
        "7, 3, 0.1, 0.0792003557698874, 0.84386270669326892"})
    void theBoundsSolveTheMixtureMartingaleEquation(long n, long h, double alpha, double lower, double upper) {
        RateSequence.Bounds b = RateSequence.bounds(n, h, alpha);
        assertEquals(lower, b.lower(), 1e-12);
        assertEquals(upper, b.upper(), 1e-12);
    }

    /**
     * A time-uniform interval must be wider than the fixed-sample Clopper-Pearson interval of the same level
     * (common practice: paying for continuous monitoring widens the interval).
     */
    @ParameterizedTest
    @CsvSource({"1000, 30", "200, 17", "5000, 2500"})
    void theSequenceIsWiderThanTheFixedSampleExactInterval(int n, int h) {
        RateSequence.Bounds b = RateSequence.bounds(n, h, 0.05);
        SimulationSummary.Interval cp = SimulationSummary.Interval.clopperPearson(h, n, 0.95);
        assertTrue(b.lower() < cp.lower() && b.upper() > cp.upper(), b + " vs " + cp);
    }

    @Test
    void noUnitsGiveTheWholeUnitInterval() {
        assertEquals(new RateSequence.Bounds(0, 1), RateSequence.bounds(0, 0, 0.05));
    }

    @Test
    void badArgumentsAreNamed() {
        assertTrue(assertThrows(IllegalArgumentException.class, () -> RateSequence.bounds(10, 11, 0.05))
                .getMessage().startsWith("hits"));
        assertTrue(assertThrows(IllegalArgumentException.class, () -> RateSequence.bounds(-1, 0, 0.05))
                .getMessage().startsWith("units"));
        assertTrue(assertThrows(IllegalArgumentException.class, () -> RateSequence.bounds(10, 1, 1.0))
                .getMessage().startsWith("alpha"));
    }
}
