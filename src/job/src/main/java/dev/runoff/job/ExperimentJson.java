package dev.runoff.job;

import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import dev.runoff.engine.stats.ArmStats;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.stats.ValueStats;
import dev.runoff.records.CanonicalJson;
import dev.runoff.records.Definitions;
import dev.runoff.records.avro.GuardrailSpec;
import dev.runoff.decision.ExperimentState;
import dev.runoff.decision.GuardrailCounts;
import java.util.List;

/**
 * The JSON view of an {@link ExperimentState} served at {@code /experiments/{id}}: status and winner, the
 * definition in force, each arm's statistics, last weight and guardrail counts, the numbering of the outputs
 * and their times.
 */
final class ExperimentJson {

    private static final ObjectMapper JSON = new ObjectMapper();

    private ExperimentJson() {
    }

    /** {@code state} as a JSON object. */
    static String of(ExperimentState state) {
        ObjectNode root = JSON.createObjectNode()
                .put("experimentId", state.experimentId())
                .put("definitionVersion", state.definition().getVersion())
                .put("status", state.stopped() ? "STOPPED" : "RUNNING");
        root.put("winner", state.stopped() ? state.stop().winner() : null);
        arms(root.putArray("arms"), state);
        root.put("decisionSequence", state.decisionSequence())
                .put("allocationSequence", state.allocationSequence())
                .put("lastHash", state.lastHash());
        time(root, "startedAt", state.startedAt());
        time(root, "lastComputedAt", state.lastComputedAt());
        time(root, "lastPublishedAt", state.lastPublishedAt());
        root.put("newDataSinceLastEvaluation", state.dirty());
        try {
            root.set("definition", JSON.readTree(CanonicalJson.of(state.definition())));
            return JSON.writeValueAsString(root);
        } catch (JsonProcessingException e) {
            throw new IllegalStateException("cannot write experiment " + state.experimentId() + " as JSON", e);
        }
    }

    private static void arms(ArrayNode arms, ExperimentState state) {
        List<String> names = state.definition().getArms();
        double[] weights = state.lastWeights();
        for (int i = 0; i < names.size(); i++) {
            ObjectNode arm = arms.addObject().put("arm", names.get(i));
            stats(arm, state.stats().get(i));
            if (weights != null) {
                arm.put("weight", weights[i]);
            } else {
                arm.putNull("weight");
            }
            guardrails(arm, state, i);
        }
    }

    /**
     * The arm's guardrail counts, when the definition has guardrails (the tests and suspensions are in the
     * decision records); a value guardrail's entry adds its total (see {@link GuardrailCounts#totals()}).
     */
    private static void guardrails(ObjectNode arm, ExperimentState state, int index) {
        GuardrailCounts counts = state.guardrails();
        if (counts.guardrails().isEmpty()) {
            return;
        }
        List<GuardrailSpec> specs = Definitions.guardrails(state.definition());
        ArrayNode list = arm.putArray("guardrails");
        for (int g = 0; g < counts.guardrails().size(); g++) {
            ObjectNode entry = list.addObject().put("guardrail", counts.guardrails().get(g))
                    .put("counted", counts.counted(index, g)).put("hits", counts.hits(index, g));
            if (g < specs.size() && specs.get(g).getValueCap() != null) {
                entry.put("total", counts.total(index, g));
            }
        }
    }

    private static void stats(ObjectNode arm, ArmStats stats) {
        if (stats instanceof BernoulliStats b) {
            arm.put("trials", b.trials()).put("successes", b.successes());
            arm.put("observedRate", b.trials() == 0 ? null : b.rate());
        } else if (stats instanceof ValueStats v) {
            arm.put("trials", v.count()).put("mean", v.mean());
            arm.put("sampleVariance", v.count() < 2 ? null : v.sampleVariance());
        }
    }

    private static void time(ObjectNode root, String field, long millis) {
        if (millis < 0) {
            root.putNull(field);
        } else {
            root.put(field, millis);
        }
    }
}
