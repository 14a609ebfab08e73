package dev.runoff.engine;

import dev.runoff.engine.core.Metric;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import dev.runoff.engine.allocation.AllocationMethod;
import dev.runoff.engine.allocation.Guards;
import dev.runoff.engine.posterior.BetaPrior;
import dev.runoff.engine.posterior.NormalGammaPrior;
import org.junit.jupiter.api.Test;

/** Configuration defaults and validation messages. */
class EngineConfigTest {

    @Test
    void defaultsAreTopTwoThompsonWithBetaOneHalfAndMonteCarloOfAtMostFortyThousandDraws() {
        EngineConfig c = EngineConfig.defaults(Metric.BERNOULLI);
        assertEquals(BetaPrior.UNIFORM, c.prior());
        assertEquals(AllocationMethod.TOP_TWO_THOMPSON, c.rule());
        assertEquals(0.5, c.beta());
        assertEquals(EngineConfig.MethodChoice.MONTE_CARLO, c.method());
        assertEquals(40_000, c.draws());
        assertEquals(Guards.NONE, c.guards());
        assertEquals(Metric.BERNOULLI, c.metric());
        assertEquals(NormalGammaPrior.WEAK, EngineConfig.defaults(Metric.VALUE).prior());
        assertEquals(Metric.VALUE, EngineConfig.defaults(Metric.VALUE).metric());
    }

    @Test
    void withersChangeOneField() {
        EngineConfig c = EngineConfig.defaults(Metric.BERNOULLI).withBeta(0.7).withDraws(500)
                .withRule(AllocationMethod.UNIFORM).withMethod(EngineConfig.MethodChoice.EXACT);
        assertEquals(new EngineConfig(BetaPrior.UNIFORM, AllocationMethod.UNIFORM, 0.7, EngineConfig.MethodChoice.EXACT,
                500, Guards.NONE), c);
    }

    @Test
    void badValuesAreRejectedNamingTheField() {
        EngineConfig c = EngineConfig.defaults(Metric.BERNOULLI);
        assertMessage("beta must be in [0.0, 1.0], got 1.5", () -> c.withBeta(1.5));
        assertMessage("beta must be in [0.0, 1.0], got -0.1", () -> c.withBeta(-0.1));
        assertMessage("beta must be in [0.0, 1.0], got NaN", () -> c.withBeta(Double.NaN));
        assertMessage("draws must be >= 1, got 0", () -> c.withDraws(0));
        assertEquals("prior", assertThrows(NullPointerException.class, () -> c.withPrior(null)).getMessage());
        assertEquals("rule", assertThrows(NullPointerException.class, () -> c.withRule(null)).getMessage());
        assertEquals("guards", assertThrows(NullPointerException.class, () -> c.withGuards(null)).getMessage());
    }

    private static void assertMessage(String expected, Runnable call) {
        assertEquals(expected, assertThrows(IllegalArgumentException.class, call::run).getMessage());
    }
}
