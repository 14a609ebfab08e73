package dev.runoff.decision;

import dev.runoff.engine.stopping.Verdict;

/**
 * The one place where the stopping rule's {@link dev.runoff.engine.stopping.VerdictReason} becomes the
 * {@code reason} string of a decision record.
 *
 * <table>
 *   <caption>Reasons</caption>
 *   <tr><th>stopping reason</th><th>record reason</th><th>decision</th></tr>
 *   <tr><td>GLR, POSTERIOR, INDIFFERENCE</td><td>{@value #THRESHOLD_REACHED}</td><td>STOP</td></tr>
 *   <tr><td>BUDGET with the trial budget spent</td><td>{@value #BUDGET}</td><td>STOP</td></tr>
 *   <tr><td>BUDGET with only the deadline passed</td><td>{@value #DEADLINE}</td><td>STOP</td></tr>
 *   <tr><td>BELOW_THRESHOLD</td><td>{@value #BELOW_THRESHOLD}</td><td>CONTINUE</td></tr>
 *   <tr><td>MIN_TRIALS</td><td>{@value #MIN_TRIALS}</td><td>CONTINUE</td></tr>
 *   <tr><td>MIN_DURATION</td><td>{@value #MIN_DURATION}</td><td>CONTINUE</td></tr>
 * </table>
 * A STOP the guardrails hold back ({@link Ruling}) is CONTINUE with {@value #GUARDRAIL_FAILED} or
 * {@value #GUARDRAIL_OPEN}.
 * The rule that reached its threshold is the record's {@code stoppingRule}.
 */
public final class DecisionReasons {

    /** The configured rule's statistic reached its threshold and the guards allowed the stop. */
    public static final String THRESHOLD_REACHED = "threshold-reached";
    /** The trial budget is spent. */
    public static final String BUDGET = "budget";
    /** The deadline has passed (and the trial budget is not spent). */
    public static final String DEADLINE = "deadline";
    /** The statistic is below its threshold. */
    public static final String BELOW_THRESHOLD = "below-threshold";
    /** The rule fired but some arm has fewer trials than the minimum. */
    public static final String MIN_TRIALS = "min-trials";
    /** The rule fired but the experiment has not run for the minimum duration. */
    public static final String MIN_DURATION = "min-duration";

    /** The rule fired but its leader failed a guardrail (it is suspended). */
    public static final String GUARDRAIL_FAILED = "guardrail-failed";
    /** The rule fired but a guardrail of its leader has not passed yet. */
    public static final String GUARDRAIL_OPEN = "guardrail-open";

    private DecisionReasons() {
    }

    /** The record reason of {@code decision}. */
    public static String of(Verdict decision) {
        return switch (decision.reason()) {
            case GLR, POSTERIOR, INDIFFERENCE, GLR_HEURISTIC, MIXTURE, SEQUENTIAL_T -> THRESHOLD_REACHED;
            case BUDGET -> decision.guards().trialBudgetSpent() ? BUDGET : DEADLINE;
            case BELOW_THRESHOLD -> BELOW_THRESHOLD;
            case MIN_TRIALS -> MIN_TRIALS;
            case MIN_DURATION -> MIN_DURATION;
        };
    }
}
