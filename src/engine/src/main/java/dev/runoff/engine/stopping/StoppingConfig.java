package dev.runoff.engine.stopping;

import dev.runoff.engine.best.LeaderThreshold;
import dev.runoff.engine.core.Checks;
import java.time.Duration;
import java.time.Instant;
import java.util.Objects;

/**
 * Validated configuration of a stopping rule and its guards. Build one with {@link #glr}, {@link #posterior}
 * or {@link #indifference} and adjust it with the {@code with...} methods.
 *
 * @param rule            which rule decides
 * @param delta           error probability, in (0, 1)
 * @param glrThreshold    threshold of the GLR rule (ignored by the other rules)
 * @param z               multiplier of the standard error in the posterior rule's lower bound, finite,
 *                        {@code >= 0} (default 3)
 * @param epsilon         indifference zone, finite, {@code >= 0}, and {@code > 0} for
 *                        {@link Rule#INDIFFERENCE}
 * @param minTrialsPerArm trials every arm needs before a rule may stop the experiment, {@code >= 0}
 * @param minDuration     time the experiment must run before a rule may stop it, not negative
 * @param budgetTrials  trial budget, {@code >= 1}; {@link #NO_TRIAL_BUDGET} for none
 * @param deadline        instant at which the experiment stops for budget; {@link #NO_DEADLINE} for none
 */
public record StoppingConfig(Rule rule, double delta, GlrThreshold glrThreshold, double z, double epsilon,
                             long minTrialsPerArm, Duration minDuration, long budgetTrials, Instant deadline) {

    /** No trial budget. */
    public static final long NO_TRIAL_BUDGET = Long.MAX_VALUE;
    /** No deadline. */
    public static final Instant NO_DEADLINE = Instant.MAX;
    /** Default multiplier of the standard error in the posterior rule. */
    public static final double DEFAULT_Z = 3.0;

    /** Validates every field; messages name the field and the value. */
    public StoppingConfig {
        Objects.requireNonNull(rule, "rule");
        Checks.inOpenRange("delta", delta, 0, 1);
        Objects.requireNonNull(glrThreshold, "glrThreshold");
        Checks.nonNegative("z", z);
        Checks.nonNegative("epsilon", epsilon);
        if (rule == Rule.INDIFFERENCE && epsilon == 0) {
            throw new IllegalArgumentException("epsilon must be > 0 for the indifference rule, got " + epsilon);
        }
        Checks.nonNegative("minTrialsPerArm", minTrialsPerArm);
        Objects.requireNonNull(minDuration, "minDuration");
        if (minDuration.isNegative()) {
            throw new IllegalArgumentException("minDuration must not be negative, got " + minDuration);
        }
        if (budgetTrials < 1) {
            throw new IllegalArgumentException("budgetTrials must be >= 1, got " + budgetTrials);
        }
        Objects.requireNonNull(deadline, "deadline");
    }

    /** GLR rule with the {@link GlrThreshold#PROVEN} threshold, no guards, no budget. */
    public static StoppingConfig glr(double delta) {
        return new StoppingConfig(Rule.GLR, delta, GlrThreshold.PROVEN, DEFAULT_Z, 0.0, 0, Duration.ZERO,
                NO_TRIAL_BUDGET, NO_DEADLINE);
    }

    /** Posterior probability rule with z = 3, no guards, no budget. */
    public static StoppingConfig posterior(double delta) {
        return glr(delta).withRule(Rule.POSTERIOR);
    }

    /** Indifference-zone rule with the given epsilon, no guards, no budget. */
    public static StoppingConfig indifference(double delta, double epsilon) {
        return new StoppingConfig(Rule.INDIFFERENCE, delta, GlrThreshold.PROVEN, DEFAULT_Z, epsilon, 0,
                Duration.ZERO, NO_TRIAL_BUDGET, NO_DEADLINE);
    }

    /** This configuration with another rule. */
    public StoppingConfig withRule(Rule newRule) {
        return new StoppingConfig(newRule, delta, glrThreshold, z, epsilon, minTrialsPerArm, minDuration,
                budgetTrials, deadline);
    }

    /** This configuration with another GLR threshold. */
    public StoppingConfig withGlrThreshold(GlrThreshold threshold) {
        return new StoppingConfig(rule, delta, threshold, z, epsilon, minTrialsPerArm, minDuration,
                budgetTrials, deadline);
    }

    /** This configuration with another standard-error multiplier for the posterior rule. */
    public StoppingConfig withZ(double newZ) {
        return new StoppingConfig(rule, delta, glrThreshold, newZ, epsilon, minTrialsPerArm, minDuration,
                budgetTrials, deadline);
    }

    /** This configuration with a minimum number of trials per arm. */
    public StoppingConfig withMinTrialsPerArm(long trials) {
        return new StoppingConfig(rule, delta, glrThreshold, z, epsilon, trials, minDuration, budgetTrials,
                deadline);
    }

    /** This configuration with a minimum duration. */
    public StoppingConfig withMinDuration(Duration duration) {
        return new StoppingConfig(rule, delta, glrThreshold, z, epsilon, minTrialsPerArm, duration,
                budgetTrials, deadline);
    }

    /** This configuration with a trial budget. */
    public StoppingConfig withBudgetTrials(long trials) {
        return new StoppingConfig(rule, delta, glrThreshold, z, epsilon, minTrialsPerArm, minDuration, trials,
                deadline);
    }

    /** This configuration with a deadline. */
    public StoppingConfig withDeadline(Instant instant) {
        return new StoppingConfig(rule, delta, glrThreshold, z, epsilon, minTrialsPerArm, minDuration,
                budgetTrials, instant);
    }

    /**
     * The threshold this rule compares the leader's Monte Carlo alpha with: {@code 1 - delta} at {@code z} for
     * the posterior rule (see {@link StoppingCheck}), {@code null} for the rules that read no alpha level. An
     * engine configuration carries it ({@link dev.runoff.engine.EngineConfig#withLeaderThreshold}) so that the
     * draws can settle the rule's verdict.
     */
    public LeaderThreshold leaderThreshold() {
        return rule == Rule.POSTERIOR ? new LeaderThreshold(1 - delta, z) : null;
    }
}
