package dev.runoff.job;

import dev.runoff.decision.ExperimentState;

/**
 * Whether a running experiment is lagging: its next decision is overdue by more than one recompute period.
 * A running experiment is due for a decision when new data came in and its recompute period has passed since
 * the last evaluation, and in any case when its heartbeat has passed since the last publication (the rule of
 * the allocation pass); a job that keeps up with its input decides within one allocation interval of that.
 * A new experiment is due at once; one never evaluated lags when its first statistics were folded more than
 * one recompute period ago (it was due no later than that). One never evaluated and without statistics is not
 * counted: the time it was accepted is not kept. Stopped experiments are never lagging. An evaluation that
 * failed counts as an evaluation here (it is counted as a rejection with reason {@code evaluation-error}).
 */
public final class Lagging {

    private Lagging() {
    }

    /** Whether {@code state} is lagging at wall-clock time {@code nowMillis}. */
    public static boolean lagging(ExperimentState state, long nowMillis) {
        if (state.stopped()) {
            return false;
        }
        long period = state.definition().getRecomputePeriodMs();
        if (state.lastComputedAt() < 0) {
            return state.startedAt() >= 0 && nowMillis - state.startedAt() > period;
        }
        long dueAt = state.lastPublishedAt() < 0 ? Long.MAX_VALUE
                : state.lastPublishedAt() + state.definition().getHeartbeatMs();
        if (state.dirty()) {
            dueAt = Math.min(dueAt, state.lastComputedAt() + period);
        }
        return dueAt != Long.MAX_VALUE && nowMillis - dueAt > period;
    }
}
