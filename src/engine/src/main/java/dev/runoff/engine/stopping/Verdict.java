package dev.runoff.engine.stopping;



import dev.runoff.engine.core.Checks;
import java.util.Objects;

/**
 * A stopping decision with the numbers behind it.
 *
 * <p>{@code statistic} and {@code threshold} are always those of the configured {@link Rule} (see there for
 * their meaning), also when the reason is {@link VerdictReason#BUDGET} or a guard. The leader is the winner when the
 * action is STOP: for the GLR rule the arm with the largest empirical mean, for the other rules and for a
 * budget stop the arm with the largest alpha.
 *
 * @param reason           why; it determines the {@link #action()}
 * @param rule             the configured rule
 * @param leader           index of the leading arm (the winner when STOP)
 * @param leaderName       its name
 * @param statistic        the rule's statistic
 * @param threshold        the rule's threshold
 * @param leaderConfidence the leader's probability of being best (its alpha)
 * @param guards           the guard state at this evaluation
 */
public record Verdict(VerdictReason reason, Rule rule, int leader, String leaderName, double statistic,
                       double threshold, double leaderConfidence, GuardState guards) {

    /** Validates every field; messages name the field. */
    public Verdict {
        Objects.requireNonNull(reason, "reason");
        Objects.requireNonNull(rule, "rule");
        Objects.requireNonNull(leaderName, "leaderName");
        Objects.requireNonNull(guards, "guards");
        if (leader < 0) {
            throw new IllegalArgumentException("leader must be >= 0, got " + leader);
        }
        if (Double.isNaN(statistic)) {
            throw new IllegalArgumentException("statistic must not be NaN");
        }
        if (Double.isNaN(threshold)) {
            throw new IllegalArgumentException("threshold must not be NaN");
        }
        Checks.inClosedRange("leaderConfidence", leaderConfidence, 0, 1);
    }

    /** CONTINUE or STOP, as implied by the reason. */
    public Action action() {
        return reason.action();
    }

    /** Whether the experiment should stop. */
    public boolean isStop() {
        return action() == Action.STOP;
    }

    /** CONTINUE or STOP. */
    public enum Action {
        /** Keep collecting data. */
        CONTINUE,
        /** End the experiment and declare the leader the winner. */
        STOP
    }
}
