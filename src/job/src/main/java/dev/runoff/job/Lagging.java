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
 *
 * <p>The state says that statistics changed since the last evaluation, not when. New data that came after a
 * quiet spell makes the decision due when it came, which may be long after one recompute period from the last
 * evaluation; without that time ({@link #lagging(ExperimentState, long)}) an experiment quiet for two periods
 * counts as lagging the moment its new data is folded. {@link LagWatch} supplies a bound on that time from
 * successive reads of the store.
 */
public final class Lagging {

    /** Passed as the time new data came after when it is not known. */
    public static final long UNKNOWN = Long.MIN_VALUE;

    private Lagging() {
    }

    /**
     * Whether {@code state} is lagging at wall-clock time {@code nowMillis}, its new data (if any) taken as due
     * one recompute period after the last evaluation: an upper bound of the count.
     */
    public static boolean lagging(ExperimentState state, long nowMillis) {
        return lagging(state, nowMillis, UNKNOWN);
    }

    /**
     * Whether {@code state} is lagging at wall-clock time {@code nowMillis}, its new data having come after
     * {@code dataAfterMillis} (or {@link #UNKNOWN}): a decision on new data is due at the later of that time
     * and one recompute period after the last evaluation.
     */
    public static boolean lagging(ExperimentState state, long nowMillis, long dataAfterMillis) {
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
            dueAt = Math.min(dueAt, Math.max(state.lastComputedAt() + period, dataAfterMillis));
        }
        return dueAt != Long.MAX_VALUE && nowMillis - dueAt > period;
    }
}
