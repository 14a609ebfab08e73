package dev.runoff.job.pages;

import dev.runoff.decision.Evaluator;
import dev.runoff.decision.ExperimentState;
import dev.runoff.engine.stats.ArmStats;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.ExperimentDefinition;
import java.util.ArrayList;
import java.util.List;
import java.util.function.IntFunction;

/** Real decision records for the pages' tests, from the job's own evaluator. */
final class DecisionChains {

    static final long START = 1_800_000_000_000L;

    private DecisionChains() {
    }

    /**
     * {@code decisions} records of {@code definition} (version 1), one per second; before decision {@code d}
     * arm {@code i} receives {@code delta.apply(d)[i]}. Stops early when the rule says STOP.
     */
    static List<DecisionRecord> run(ExperimentDefinition definition, int decisions, IntFunction<ArmStats[]> delta) {
        ExperimentDefinition versioned = ExperimentDefinition.newBuilder(definition).setVersion(1).build();
        ExperimentState state = ExperimentState.start(versioned);
        Evaluator evaluator = new Evaluator(2_000);
        List<DecisionRecord> out = new ArrayList<>();
        for (int d = 0; d < decisions && !state.stopped(); d++) {
            long now = START + 1_000L * d;
            ArmStats[] add = delta.apply(d);
            for (int i = 0; i < add.length; i++) {
                state = state.withDelta(i, add[i], now);
            }
            Evaluator.Result result = evaluator.evaluate(state, now);
            out.add(result.decision());
            state = result.next();
        }
        return out;
    }
}
