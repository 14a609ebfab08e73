package dev.runoff.cli;

import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import dev.runoff.engine.core.Arm;
import dev.runoff.engine.EngineConfig;
import dev.runoff.engine.Evaluation;
import dev.runoff.engine.allocation.GuardFlag;
import dev.runoff.engine.best.ProbabilityBest;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.stats.ValueStats;
import java.util.List;
import java.util.Map;

/** The {@code --json} output of {@code evaluate}: one JSON object. Non-finite numbers are written as null. */
final class JsonReport {
    private static final ObjectMapper MAPPER = new ObjectMapper();

    private JsonReport() {
    }

    static String render(List<Arm> arms, EngineConfig config, Evaluation e) {
        ObjectNode root = MAPPER.createObjectNode();
        root.put("engineVersion", e.engineVersion());
        root.put("metric", Spelling.of(config.metric()));
        root.put("prior", Posteriors.describe(config.prior()));
        root.put("rule", e.rule().cliName());
        number(root, "beta", e.beta());
        root.put("methodChoice", Spelling.of(config.method()));
        root.put("method", Spelling.of(e.method()));
        root.put("draws", e.probabilityBest().draws());
        root.put("seed", e.seed());
        ArrayNode guards = root.putArray("guards");
        for (GuardFlag flag : e.flags()) {
            guards.add(Spelling.of(flag));
        }
        ArrayNode list = root.putArray("arms");
        for (int i = 0; i < arms.size(); i++) {
            list.add(arm(arms.get(i), e, i));
        }
        try {
            return MAPPER.writeValueAsString(root);
        } catch (com.fasterxml.jackson.core.JsonProcessingException ex) {
            throw new IllegalStateException("cannot write the JSON report", ex);
        }
    }

    private static ObjectNode arm(Arm arm, Evaluation e, int i) {
        ObjectNode n = MAPPER.createObjectNode();
        n.put("name", arm.name());
        n.put("trials", arm.stats().trials());
        if (arm.stats() instanceof BernoulliStats b) {
            n.put("successes", b.successes());
            number(n, "rate", b.rate());
        } else {
            ValueStats v = (ValueStats) arm.stats();
            number(n, "mean", v.mean());
            number(n, "stddev", Math.sqrt(v.sampleVariance()));
        }
        Evaluation.PosteriorSummary s = e.posteriors().get(i);
        ObjectNode posterior = n.putObject("posterior");
        for (Map.Entry<String, Object> p : Posteriors.parameters(s.posterior()).entrySet()) {
            if (p.getValue() instanceof Double d) {
                number(posterior, p.getKey(), d);
            } else {
                posterior.put(p.getKey(), String.valueOf(p.getValue()));
            }
        }
        number(n, "posteriorMean", s.mean());
        number(n, "lower95", s.lower95());
        number(n, "upper95", s.upper95());
        ProbabilityBest pb = e.probabilityBest();
        number(n, "pBest", pb.alpha(i));
        number(n, "standardError", pb.standardError(i));
        if (pb.conditional(i)) {
            n.put("wonNoDraw", true);
            number(n, "zeroWinUpperBound", pb.zeroWinUpperBound(i));
        }
        number(n, "ruleWeight", e.ruleWeights()[i]);
        number(n, "weight", e.weight(i));
        return n;
    }

    private static void number(ObjectNode node, String field, double value) {
        if (Double.isFinite(value)) {
            node.put(field, value);
        } else {
            node.putNull(field);
        }
    }
}
