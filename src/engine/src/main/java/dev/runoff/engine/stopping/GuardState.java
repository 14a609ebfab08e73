package dev.runoff.engine.stopping;

import java.time.Duration;
import java.time.Instant;
import java.util.Objects;

/**
 * The guards' inputs and limits at one evaluation, kept in the decision so it can be re-checked.
 *
 * @param fewestTrials    trials of the arm with the fewest
 * @param minTrialsPerArm configured minimum trials per arm before any STOP by a rule
 * @param elapsed         time since the experiment started
 * @param minDuration     configured minimum duration before any STOP by a rule
 * @param totalTrials     trials over all arms
 * @param budgetTrials  trial budget ({@link StoppingConfig#NO_TRIAL_BUDGET} for none)
 * @param now             evaluation time
 * @param deadline        deadline ({@link StoppingConfig#NO_DEADLINE} for none)
 */
public record GuardState(long fewestTrials, long minTrialsPerArm, Duration elapsed, Duration minDuration,
                         long totalTrials, long budgetTrials, Instant now, Instant deadline) {

    /** Checks that nothing is null. */
    public GuardState {
        Objects.requireNonNull(elapsed, "elapsed");
        Objects.requireNonNull(minDuration, "minDuration");
        Objects.requireNonNull(now, "now");
        Objects.requireNonNull(deadline, "deadline");
    }

    /** Every arm has at least the minimum number of trials. */
    public boolean minTrialsMet() {
        return fewestTrials >= minTrialsPerArm;
    }

    /** The experiment has run for at least the minimum duration. */
    public boolean minDurationMet() {
        return elapsed.compareTo(minDuration) >= 0;
    }

    /** The total trials have reached the trial budget. */
    public boolean trialBudgetSpent() {
        return totalTrials >= budgetTrials;
    }

    /** The evaluation time is at or after the deadline. */
    public boolean deadlinePassed() {
        return !now.isBefore(deadline);
    }

    /** The trial budget or the deadline is spent. */
    public boolean budgetExhausted() {
        return trialBudgetSpent() || deadlinePassed();
    }
}
