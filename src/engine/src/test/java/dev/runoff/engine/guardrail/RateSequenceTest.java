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
     * Non-integer totals (sums of observations in [0, 1]) are taken as they are: the ends of
     * {p : B(s+1, n-s+1) / (p^s (1-p)^(n-s)) < 1/alpha} at fractional s, solved outside Java with mpmath 1.3.0
     * at 40 digits (its beta function, bisection on the same formula; for the first, second, fourth and fifth
     * rows mpmath's quadrature of the integral of q^s (1-q)^(n-s) gave the same equation to 1e-33). Relative
     * tolerance 1e-10.
     */
    @ParameterizedTest
    @CsvSource({
        "7, 2.6, 0.1, 0.054846551297965797, 0.80703820887572708",
        "50, 12.25, 0.025, 0.086277186006950163, 0.47450210169845252",
        "1000, 31.7, 0.025, 0.014320673460716869, 0.05892770235856896",
        "200, 0.4, 0.05, 3.6131456467710935e-12, 0.045538234904745302",
        "40, 39.5, 0.05, 0.82040901226588685, 0.99999997098056777"})
    void fractionalTotalsSolveTheMixtureEquationExactly(long n, double s, double alpha, double lower,
                                                         double upper) {
        RateSequence.Bounds b = RateSequence.meanBounds(n, s, alpha);
        assertEquals(lower, b.lower(), 1e-10 * lower);
        assertEquals(upper, b.upper(), 1e-10 * upper);
    }

    /** A larger total moves both ends up: the fractional interval lies between those of the integers around it. */
    @Test
    void aFractionalTotalLiesBetweenTheIntegerTotalsAroundIt() {
        RateSequence.Bounds below = RateSequence.bounds(500, 40, 0.05);
        RateSequence.Bounds between = RateSequence.meanBounds(500, 40.5, 0.05);
        RateSequence.Bounds above = RateSequence.bounds(500, 41, 0.05);
        assertTrue(below.lower() < between.lower() && between.lower() < above.lower(), between.toString());
        assertTrue(below.upper() < between.upper() && between.upper() < above.upper(), between.toString());
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
        assertTrue(assertThrows(IllegalArgumentException.class, () -> RateSequence.meanBounds(10, 10.5, 0.05))
                .getMessage().startsWith("total"));
        assertTrue(assertThrows(IllegalArgumentException.class, () -> RateSequence.meanBounds(10, Double.NaN, 0.05))
                .getMessage().startsWith("total"));
    }
}
