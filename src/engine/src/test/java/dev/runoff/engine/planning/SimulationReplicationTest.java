package dev.runoff.engine.planning;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import dev.runoff.engine.EngineConfig;
import dev.runoff.engine.allocation.AllocationMethod;
import dev.runoff.engine.core.Metric;
import dev.runoff.engine.stopping.Rule;
import dev.runoff.engine.stopping.StoppingConfig;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.junit.jupiter.api.Test;

class SimulationReplicationTest {

    @ParameterizedTest
    @CsvSource({
        "UNIFORM, GLR, 1000000",
        "UNIFORM, MIXTURE, 1000000",
        "TOP_TWO_VALUE, GLR, 1000000",
        "TOP_TWO_EI, GLR_HEURISTIC, 1000000",
        "UNIFORM, GLR, 100",
    })
    void skippingTheEstimatorGivesTheSameRunsBitForBit(AllocationMethod allocation, Rule rule, long budget) {
        // The last case ends every run on the budget, where the winner is the arm with the largest alpha.
        EngineConfig engine = EngineConfig.defaults(Metric.BERNOULLI).withRule(allocation).withDraws(100);
        SimulationConfig c = new SimulationConfig(ArmModel.bernoulli(0.2, 0.4, 0.6), engine,
                StoppingConfig.glr(0.1).withRule(rule).withBudgetTrials(budget), 20, 1, 1L, 0.0);
        SimulationReplication full = new SimulationReplication(c, engine, false);
        SimulationReplication skipping = new SimulationReplication(c, engine, true);
        for (long seed = 1; seed <= 5; seed++) {
            assertEquals(full.run(seed), skipping.run(seed), "seed " + seed);
        }
    }

    @Test
    void theEstimatorCannotBeSkippedWhenARuleReadsAlpha() {
        EngineConfig thompson = EngineConfig.defaults(Metric.BERNOULLI);
        SimulationConfig glr = new SimulationConfig(ArmModel.bernoulli(0.3, 0.5), thompson,
                StoppingConfig.glr(0.1).withBudgetTrials(1_000), 20, 1, 1L, 0.0);
        assertThrows(IllegalArgumentException.class, () -> new SimulationReplication(glr, thompson, true));
        EngineConfig uniform = thompson.withRule(AllocationMethod.UNIFORM);
        SimulationConfig posterior = new SimulationConfig(ArmModel.bernoulli(0.3, 0.5), uniform,
                StoppingConfig.posterior(0.1).withBudgetTrials(1_000), 20, 1, 1L, 0.0);
        assertThrows(IllegalArgumentException.class, () -> new SimulationReplication(posterior, uniform, true));
    }
}
