package dev.runoff.engine.planning;

import java.util.List;
import java.util.Objects;

/**
 * The outcome of a simulation: the configured rule's runs and the uniform baseline's runs on the same
 * replication seeds, each list in replication order, with their summaries.
 *
 * @param config       what was simulated
 * @param rule         summary of the configured rule's runs
 * @param baseline     summary of the uniform allocation's runs
 * @param ruleRuns     the configured rule's runs, in replication order
 * @param baselineRuns the uniform allocation's runs, in replication order
 */
public record SimulationResult(SimulationConfig config, SimulationSummary rule, SimulationSummary baseline,
                               List<SimulationRun> ruleRuns, List<SimulationRun> baselineRuns) {

    /** Copies the lists. */
    public SimulationResult {
        Objects.requireNonNull(config, "config");
        Objects.requireNonNull(rule, "rule");
        Objects.requireNonNull(baseline, "baseline");
        ruleRuns = List.copyOf(ruleRuns);
        baselineRuns = List.copyOf(baselineRuns);
    }

    /** Mean trials to stop of the rule divided by those of uniform allocation. */
    public double trialRatio() {
        return rule.meanTrials() / baseline.meanTrials();
    }
}
