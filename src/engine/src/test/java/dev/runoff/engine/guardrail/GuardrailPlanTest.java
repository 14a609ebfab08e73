package dev.runoff.engine.guardrail;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

class GuardrailPlanTest {

    @Test
    void theUnitsFoundAreTheFirstAtWhichTheExpectedCountsPass() {
        long n = GuardrailPlan.unitsToPass(0.02, 0.2, Direction.HIGHER_IS_WORSE, 0.05);
        assertTrue(n > 1, "n = " + n);
        MarginCheck.Counts at = new MarginCheck.Counts(n, Math.round(n * 0.02));
        MarginCheck.Counts before = new MarginCheck.Counts(n - 1, Math.round((n - 1) * 0.02));
        assertEquals(MarginCheck.Outcome.PASS,
                MarginCheck.check(at, at, Direction.HIGHER_IS_WORSE, 0.2, 0.05).outcome());
        assertNotEquals(MarginCheck.Outcome.PASS,
                MarginCheck.check(before, before, Direction.HIGHER_IS_WORSE, 0.2, 0.05).outcome());
    }

    /**
     * Halving the margin roughly quadruples the units: the interval widths shrink like sqrt(log n / n) (common
     * practice for confidence sequences; Howard et al. 2021 give the exact rates). Checked loosely: 3x to 5x.
     */
    @Test
    void halvingTheMarginRoughlyQuadruplesTheUnits() {
        double wide = GuardrailPlan.unitsToPass(0.05, 0.4, Direction.HIGHER_IS_WORSE, 0.05);
        double narrow = GuardrailPlan.unitsToPass(0.05, 0.2, Direction.HIGHER_IS_WORSE, 0.05);
        assertTrue(narrow / wide > 3 && narrow / wide < 5, wide + " -> " + narrow);
    }

    @Test
    void aMarginOfZeroIsNeverPassed() {
        assertEquals(-1, GuardrailPlan.unitsToPass(0.05, 0.0, Direction.HIGHER_IS_WORSE, 0.05));
    }
}
