package dev.runoff.engine.posterior;

import dev.runoff.engine.stats.ArmStats;

/** A conjugate prior that turns an arm's sufficient statistics into the posterior of its mean. */
public sealed interface Prior permits BetaPrior, NormalGammaPrior {

    /**
     * The posterior after observing {@code stats}.
     *
     * @throws IllegalArgumentException if the statistics are of the wrong kind for this prior
     */
    Posterior posterior(ArmStats stats);
}
