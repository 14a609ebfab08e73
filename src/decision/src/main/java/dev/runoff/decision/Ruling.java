package dev.runoff.decision;

import dev.runoff.engine.stopping.Verdict;
import dev.runoff.engine.stopping.VerdictReason;

/**
 * The stopping decision a record states: the stopping rule's {@link Verdict}, held back or redirected by the
 * guardrails.
 *
 * <p>Rule: a STOP that the stopping rule reached by its threshold names its leader only if the leader passed
 * every guardrail (the reference arm always does); otherwise the decision is CONTINUE with reason
 * {@value DecisionReasons#GUARDRAIL_FAILED} (the leader is suspended: possible only when {@link Narrowing}
 * kept it, fewer than two arms being left) or {@value DecisionReasons#GUARDRAIL_OPEN} (a guardrail of the
 * leader has not passed yet). Once the trial budget is spent or the deadline has passed
 * the experiment stops all the same: its winner is the leader if it passed every guardrail, else the
 * reference arm (the control), with reason budget or deadline.
 *
 * @param stop      whether the experiment stops
 * @param winner    the arm named, or {@code null} for CONTINUE
 * @param reason    the record's reason
 * @param statistic the stopping rule's statistic
 * @param threshold the stopping rule's threshold
 */
record Ruling(boolean stop, String winner, String reason, double statistic, double threshold) {

    /** The ruling of {@code verdict} under {@code findings}, for the arms {@code arms} in definition order. */
    static Ruling of(Verdict verdict, GuardrailFindings findings, java.util.List<String> arms) {
        Ruling plain = new Ruling(verdict.isStop(), verdict.isStop() ? verdict.leaderName() : null,
                DecisionReasons.of(verdict), verdict.statistic(), verdict.threshold());
        int leader = arms.indexOf(verdict.leaderName());
        if (!verdict.isStop() || findings.cleared(leader)) {
            return plain;
        }
        if (verdict.reason() == VerdictReason.BUDGET || verdict.guards().budgetExhausted()) {
            String reason = verdict.guards().trialBudgetSpent() ? DecisionReasons.BUDGET : DecisionReasons.DEADLINE;
            return new Ruling(true, arms.get(findings.reference()), reason, plain.statistic, plain.threshold);
        }
        String held = findings.isSuspended(leader) ? DecisionReasons.GUARDRAIL_FAILED
                : DecisionReasons.GUARDRAIL_OPEN;
        return new Ruling(false, null, held, plain.statistic, plain.threshold);
    }
}
