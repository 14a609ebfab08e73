package dev.runoff.engine.planning;

import dev.runoff.engine.stopping.Rule;
import java.util.Objects;

/**
 * One stopping rule's row in a comparison of stopping rules on the same replication seeds.
 *
 * @param stopping the stopping rule
 * @param proven   whether its error probability is proven to be at most delta for every fixed truth
 *                 ({@link Rule#provenFor})
 * @param summary  what its runs add up to
 */
public record StoppingComparison(Rule stopping, boolean proven, SimulationSummary summary) {

    /** Checks that nothing is null. */
    public StoppingComparison {
        Objects.requireNonNull(stopping, "stopping");
        Objects.requireNonNull(summary, "summary");
    }
}
