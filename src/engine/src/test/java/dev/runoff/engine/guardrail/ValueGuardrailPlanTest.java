package dev.runoff.engine.guardrail;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

/**
 * A value guardrail is planned with the rate figure at the control's capped mean over the cap: the test reads
 * only the units and the total of the observations, so an arm whose expected total is n * mean / cap passes
 * where a rate arm with that many expected hits does, up to the rounding of the hits to a whole number.
 */
class ValueGuardrailPlanTest {

    @Test
    void theRateFigureAtTheMeanOverTheCapIsWhereExpectedValueTotalsPass() {
        double scaled = 6.0 / 200; // refunds of 6 per visitor on average under a cap of 200
        long n = GuardrailPlan.unitsToPass(scaled, 0.2, Direction.HIGHER_IS_WORSE, 0.05);
        assertTrue(n > 1, "n = " + n);
        MarginCheck.Totals at = new MarginCheck.Totals(n, n * scaled);
        assertEquals(MarginCheck.Outcome.PASS,
                MarginCheck.check(at, at, Direction.HIGHER_IS_WORSE, 0.2, 0.05).outcome());
        long earlier = n - n / 100;
        MarginCheck.Totals before = new MarginCheck.Totals(earlier, earlier * scaled);
        assertNotEquals(MarginCheck.Outcome.PASS,
                MarginCheck.check(before, before, Direction.HIGHER_IS_WORSE, 0.2, 0.05).outcome(),
                "1% fewer units do not pass: the figure is not far above what is needed");
    }
}
