package dev.runoff.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.runoff.decision.ExperimentState;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.GuardrailDirection;
import dev.runoff.records.avro.GuardrailSpec;
import dev.runoff.testkit.TestDefinitions;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/** The experiment's JSON view shows each arm's guardrail counts when the definition has guardrails. */
class ExperimentJsonTest {

    @Test
    void eachArmListsItsGuardrailCounts() throws Exception {
        ExperimentDefinition def = TestDefinitions.bernoulli("e", "a", "b");
        def.setGuardrails(List.of(new GuardrailSpec("failed-payments", "payment-failed",
                GuardrailDirection.HIGHER_IS_WORSE, 0.1, 0.05, null)));
        ExperimentState state = ExperimentState.start(def).withGuardrailUnits(1, 40, Map.of("payment-failed", 3L));
        JsonNode b = new ObjectMapper().readTree(ExperimentJson.of(state)).get("arms").get(1);
        JsonNode counts = b.get("guardrails").get(0);
        assertEquals("failed-payments", counts.get("guardrail").asText());
        assertEquals(40, counts.get("counted").asLong());
        assertEquals(3, counts.get("hits").asLong());
    }

    @Test
    void withoutGuardrailsThereIsNoGuardrailsField() throws Exception {
        ExperimentState state = ExperimentState.start(TestDefinitions.bernoulli("e", "a", "b"));
        assertNull(new ObjectMapper().readTree(ExperimentJson.of(state)).get("arms").get(0).get("guardrails"));
    }
}
