package dev.runoff.engine.planning;

import dev.runoff.engine.core.Checks;
import dev.runoff.engine.EngineConfig;
import dev.runoff.engine.stopping.StoppingConfig;
import java.util.Objects;

/**
 * What to simulate: the true arms, the engine and stopping configurations the streaming job would use,
 * and the batching, replications and seed of the simulation.
 *
 * @param arms         the true arms
 * @param engine       the engine configuration; its metric must match the arms'
 * @param stopping     the stopping configuration: any rule the arms' metric supports, with a finite trial budget
 *                     ({@code budgetTrials}) so that every run ends; the simulation has no clock, so no
 *                     minimum duration and no deadline
 * @param batch        trials between two evaluations, {@code >= 1}
 * @param replications number of simulated experiments, {@code >= 1}
 * @param seed         master seed; replication i uses a seed derived from it and i
 * @param epsilon      indifference zone for counting errors, finite, {@code >= 0}: a pick is wrong when its
 *                     true mean is more than epsilon below the best
 */
public record SimulationConfig(ArmModel arms, EngineConfig engine, StoppingConfig stopping, int batch,
                               int replications, long seed, double epsilon) {

    /** Validates every field; messages name the field and the value. */
    public SimulationConfig {
        Objects.requireNonNull(arms, "arms");
        Objects.requireNonNull(engine, "engine");
        Objects.requireNonNull(stopping, "stopping");
        if (engine.metric() != arms.metric()) {
            throw new IllegalArgumentException("the engine's prior is for the " + engine.metric()
                    + " metric but the arms are " + arms.metric());
        }
        if (!stopping.rule().supports(arms.metric())) {
            throw new IllegalArgumentException("stopping rule " + stopping.rule() + " does not support "
                    + arms.metric() + " arms");
        }
        if (stopping.budgetTrials() == StoppingConfig.NO_TRIAL_BUDGET) {
            throw new IllegalArgumentException("the stopping configuration needs a trial budget (budgetTrials)"
                    + " so that every simulated run ends");
        }
        if (!stopping.minDuration().isZero() || !stopping.deadline().equals(StoppingConfig.NO_DEADLINE)) {
            throw new IllegalArgumentException("the simulation has no clock: minDuration must be 0 and there must"
                    + " be no deadline, got " + stopping.minDuration() + " and " + stopping.deadline());
        }
        if (batch < 1) {
            throw new IllegalArgumentException("batch must be >= 1, got " + batch);
        }
        if (replications < 1) {
            throw new IllegalArgumentException("replications must be >= 1, got " + replications);
        }
        Checks.nonNegative("epsilon", epsilon);
    }

    /** This configuration with another stopping configuration. */
    public SimulationConfig withStopping(StoppingConfig newStopping) {
        return new SimulationConfig(arms, engine, newStopping, batch, replications, seed, epsilon);
    }

    /** The trial budget of every run. */
    public long budgetTrials() {
        return stopping.budgetTrials();
    }
}
