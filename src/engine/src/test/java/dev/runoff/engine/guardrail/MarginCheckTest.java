package dev.runoff.engine.guardrail;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

class MarginCheckTest {

    private static MarginCheck.Counts counts(long units, long hits) {
        return new MarginCheck.Counts(units, hits);
    }

    @Test
    void aFailComparesTheArmsLowerBoundWithTheReferencesUpperBoundTimesOnePlusTheMargin() {
        MarginCheck.Result r = MarginCheck.check(counts(10_000, 1_000), counts(10_000, 500),
                Direction.HIGHER_IS_WORSE, 0.2, 0.05);
        assertEquals(MarginCheck.Outcome.FAIL, r.outcome());
        assertEquals(RateSequence.bounds(10_000, 1_000, 0.025).lower(), r.statistic());
        assertEquals(RateSequence.bounds(10_000, 500, 0.025).upper() * 1.2, r.threshold(), 1e-15);
    }

    @Test
    void aPassComparesTheArmsUpperBoundWithTheReferencesLowerBoundTimesOnePlusTheMargin() {
        MarginCheck.Result r = MarginCheck.check(counts(50_000, 2_000), counts(50_000, 2_500),
                Direction.HIGHER_IS_WORSE, 0.1, 0.05);
        assertEquals(MarginCheck.Outcome.PASS, r.outcome());
        assertEquals(r.arm().upper(), r.statistic());
        assertEquals(r.reference().lower() * 1.1, r.threshold(), 1e-15);
    }

    @Test
    void fewUnitsLeaveTheTestOpen() {
        assertEquals(MarginCheck.Outcome.OPEN, MarginCheck.check(counts(100, 10), counts(100, 5),
                Direction.HIGHER_IS_WORSE, 0.1, 0.05).outcome());
    }

    @Test
    void lowerIsWorseMirrorsTheTest() {
        MarginCheck.Result fail = MarginCheck.check(counts(10_000, 500), counts(10_000, 1_000),
                Direction.LOWER_IS_WORSE, 0.2, 0.05);
        assertEquals(MarginCheck.Outcome.FAIL, fail.outcome());
        assertEquals(fail.arm().upper(), fail.statistic());
        assertEquals(fail.reference().lower() * 0.8, fail.threshold(), 1e-15);
        MarginCheck.Result pass = MarginCheck.check(counts(50_000, 2_500), counts(50_000, 2_000),
                Direction.LOWER_IS_WORSE, 0.1, 0.05);
        assertEquals(MarginCheck.Outcome.PASS, pass.outcome());
    }

    @Test
    void badArgumentsAreNamed() {
        assertTrue(assertThrows(IllegalArgumentException.class, () -> MarginCheck.check(counts(1, 0), counts(1, 0),
                Direction.LOWER_IS_WORSE, 1.0, 0.05)).getMessage().startsWith("margin"));
        assertTrue(assertThrows(IllegalArgumentException.class, () -> MarginCheck.check(counts(1, 0), counts(1, 0),
                Direction.HIGHER_IS_WORSE, -0.1, 0.05)).getMessage().startsWith("margin"));
        assertTrue(assertThrows(IllegalArgumentException.class, () -> new MarginCheck.Counts(3, 4))
                .getMessage().startsWith("hits"));
    }
}
