package dev.runoff.decision;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;

import dev.runoff.engine.AllocationEngine;
import dev.runoff.engine.EngineVersion;
import dev.runoff.engine.allocation.AllocationMethod;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.stopping.GlrThreshold;
import dev.runoff.engine.stopping.Rule;
import dev.runoff.engine.stopping.StoppingConfig;
import dev.runoff.records.avro.AllocationRule;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.StoppingRule;
import dev.runoff.testkit.TestDefinitions;
import org.junit.jupiter.api.Test;

class DefinitionConfigsTest {

    @Test
    void everyDefinitionRuleMapsToTheEngineRuleOfTheSameName() {
        for (StoppingRule rule : StoppingRule.values()) {
            ExperimentDefinition def = TestDefinitions.bernoulli("exp", "a", "b");
            def.getStopping().setRule(rule);
            if (rule == StoppingRule.INDIFFERENCE) {
                def.getStopping().setEpsilon(0.01);
            }
            StoppingConfig config = DefinitionConfigs.stopping(def);
            assertEquals(rule.name(), config.rule().name());
            // the heuristic rule uses its own threshold whatever this field says (StoppingCheck)
            assertEquals(GlrThreshold.PROVEN, config.glrThreshold());
        }
        assertEquals(Rule.values().length, StoppingRule.values().length, "engine and schema list the same rules");
    }

    @Test
    void everyDefinitionAllocationRuleMapsToTheEngineRuleOfTheSameName() {
        for (AllocationRule rule : AllocationRule.values()) {
            ExperimentDefinition def = TestDefinitions.bernoulli("exp", "a", "b");
            def.getAllocation().setRule(rule);
            assertEquals(rule.name(), DefinitionConfigs.engine(def, 1000).rule().name());
        }
        assertEquals(AllocationMethod.values().length, AllocationRule.values().length,
                "engine and schema list the same allocation rules");
    }

    @Test
    void theEngineConfigurationCarriesThePosteriorRulesThresholdOnTheLeadersAlpha() {
        ExperimentDefinition def = TestDefinitions.bernoulli("exp", "a", "b");
        def.getStopping().setRule(StoppingRule.POSTERIOR);
        def.getStopping().setDelta(0.01);
        assertEquals(DefinitionConfigs.stopping(def).leaderThreshold(), DefinitionConfigs.engine(def, 1000).leaderThreshold());
        assertEquals(0.99, DefinitionConfigs.engine(def, 1000).leaderThreshold().level(), 1e-15);
        def.getStopping().setRule(StoppingRule.GLR);
        assertNull(DefinitionConfigs.engine(def, 1000).leaderThreshold());
    }

    @Test
    void theEvaluatorWritesTheVersionItComputesWith() {
        ExperimentState state = ExperimentState.start(TestDefinitions.bernoulli("exp", "a", "b"))
                .withDelta(0, new BernoulliStats(1_000, 60), 0L).withDelta(1, new BernoulliStats(1_000, 140), 0L);
        assertEquals(AllocationEngine.VERSION, new Evaluator(40_000).evaluate(state, 1L).decision().getEngineVersion());
        for (EngineVersion version : EngineVersion.values()) {
            DecisionRecord record = new Evaluator(40_000, version).evaluate(state, 1L).decision();
            assertEquals(version.label(), record.getEngineVersion());
            // b wins every draw: each version stops at its first stage
            assertEquals(version == EngineVersion.V1_2 ? 10_000 : 1_000, record.getDraws());
        }
    }
}
