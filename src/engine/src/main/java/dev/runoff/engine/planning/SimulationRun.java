package dev.runoff.engine.planning;

import dev.runoff.engine.stopping.VerdictReason;
import java.util.Arrays;
import java.util.Objects;

/**
 * One simulated experiment, from its first evaluation to its STOP decision.
 *
 * @param trials    total trials when it stopped
 * @param pick      index of the arm declared the winner (for a budget stop, the arm with the largest alpha)
 * @param wrong     whether the pick is an error (true mean more than epsilon below the best)
 * @param reason    why it stopped: the rule's reason, or {@link VerdictReason#BUDGET}
 * @param armTrials trials of each arm, in arm order
 * @param alpha     probability that each arm is best at the stopping evaluation, in arm order
 */
public record SimulationRun(long trials, int pick, boolean wrong, VerdictReason reason, long[] armTrials,
                            double[] alpha) {

    /** Copies the arrays so the value stays immutable. */
    public SimulationRun {
        Objects.requireNonNull(reason, "reason");
        armTrials = armTrials.clone();
        alpha = alpha.clone();
    }

    /** Whether the run ended on the trial budget rather than by the stopping rule. */
    public boolean budgetStop() {
        return reason == VerdictReason.BUDGET;
    }

    @Override
    public long[] armTrials() {
        return armTrials.clone();
    }

    @Override
    public double[] alpha() {
        return alpha.clone();
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof SimulationRun r && trials == r.trials && pick == r.pick && wrong == r.wrong
                && reason == r.reason && Arrays.equals(armTrials, r.armTrials) && Arrays.equals(alpha, r.alpha);
    }

    @Override
    public int hashCode() {
        return Objects.hash(trials, pick, wrong, reason) * 31 * 31 + Arrays.hashCode(armTrials) * 31
                + Arrays.hashCode(alpha);
    }

    @Override
    public String toString() {
        return "SimulationRun[trials=" + trials + ", pick=" + pick + ", wrong=" + wrong + ", reason=" + reason
                + ", armTrials=" + Arrays.toString(armTrials) + ", alpha=" + Arrays.toString(alpha) + "]";
    }
}
