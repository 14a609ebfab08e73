package dev.runoff.decision;

import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.runoff.engine.allocation.AllocationMethod;
import dev.runoff.engine.stopping.GlrThreshold;
import dev.runoff.engine.stopping.Rule;
import dev.runoff.engine.stopping.StoppingConfig;
import dev.runoff.records.avro.AllocationRule;
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
}
