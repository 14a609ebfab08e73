package dev.runoff.decision;

import dev.runoff.engine.EngineConfig;
import dev.runoff.engine.allocation.AllocationMethod;
import dev.runoff.engine.allocation.Guards;
import dev.runoff.engine.stopping.GlrThreshold;
import dev.runoff.engine.stopping.Rule;
import dev.runoff.engine.stopping.StoppingConfig;
import dev.runoff.records.Definitions;
import dev.runoff.records.avro.AllocationSpec;
import dev.runoff.records.avro.BestArmEstimator;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.StoppingSpec;
import java.time.Duration;
import java.time.Instant;

/**
 * The engine's and the stopping rule's configuration for a definition. The mapping is part of the audit
 * contract: a verifier rebuilds the same configurations from the definition embedded in a decision record.
 */
public final class DefinitionConfigs {

    private DefinitionConfigs() {
    }

    /**
     * Engine configuration: the definition's prior (or the documented default), rule and beta, the method
     * ({@link #method}), at most {@code draws} Monte Carlo draws, and guards built from warmUpTrials, floor,
     * controlArm with controlShare (no control guard without a controlShare) and maxStep (none: 1), and the
     * stopping rule's threshold on the leader's alpha ({@link StoppingConfig#leaderThreshold}).
     */
    public static EngineConfig engine(ExperimentDefinition definition, int draws) {
        AllocationSpec allocation = definition.getAllocation();
        Guards guards = new Guards(allocation.getWarmUpTrials(), allocation.getFloor(), null,
                allocation.getMaxStep() == null ? 1.0 : allocation.getMaxStep());
        if (allocation.getControlShare() != null) {
            guards = guards.withControl(definition.getControlArm(), allocation.getControlShare());
        }
        return new EngineConfig(Definitions.prior(definition), AllocationMethod.valueOf(allocation.getRule().name()),
                allocation.getBeta(), method(allocation), draws, guards, stopping(definition).leaderThreshold());
    }

    /**
     * The method of the definition's {@code bestArmEstimator}: Monte Carlo when it is null (the default) or
     * SAMPLED, exact integration when it is INTEGRATED.
     */
    public static EngineConfig.MethodChoice method(AllocationSpec allocation) {
        return allocation.getBestArmEstimator() == BestArmEstimator.INTEGRATED ? EngineConfig.MethodChoice.EXACT
                : EngineConfig.MethodChoice.MONTE_CARLO;
    }

    /**
     * Stopping configuration: rule, delta, the proven GLR threshold, z = 3, epsilon (0 when absent),
     * minTrialsPerArm, minDurationMs, budgetTrials (none: no budget) and deadline (none: no deadline).
     */
    public static StoppingConfig stopping(ExperimentDefinition definition) {
        StoppingSpec spec = definition.getStopping();
        return new StoppingConfig(Rule.valueOf(spec.getRule().name()), spec.getDelta(), GlrThreshold.PROVEN,
                StoppingConfig.DEFAULT_Z, spec.getEpsilon() == null ? 0.0 : spec.getEpsilon(),
                spec.getMinTrialsPerArm(), Duration.ofMillis(spec.getMinDurationMs()),
                spec.getBudgetTrials() == null ? StoppingConfig.NO_TRIAL_BUDGET : spec.getBudgetTrials(),
                spec.getDeadline() == null ? StoppingConfig.NO_DEADLINE : Instant.ofEpochMilli(spec.getDeadline()));
    }
}
