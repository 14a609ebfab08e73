package dev.runoff.decision;


import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.runoff.engine.stopping.Verdict;
import dev.runoff.engine.stopping.GuardState;
import dev.runoff.engine.stopping.VerdictReason;
import dev.runoff.engine.stopping.Rule;
import java.time.Duration;
import java.time.Instant;
import java.util.EnumMap;
import java.util.Map;
import org.junit.jupiter.api.Test;

class DecisionReasonsTest {

    /** A fixed instant of the tests (2023-11-14). */
    static final long T0 = 1_700_000_000_000L;

    private static final Instant NOW = Instant.ofEpochMilli(T0);

    @Test
    void everyStoppingReasonHasItsRecordReason() {
        Map<VerdictReason, String> expected = new EnumMap<>(VerdictReason.class);
        expected.put(VerdictReason.GLR, "threshold-reached");
        expected.put(VerdictReason.POSTERIOR, "threshold-reached");
        expected.put(VerdictReason.INDIFFERENCE, "threshold-reached");
        expected.put(VerdictReason.GLR_HEURISTIC, "threshold-reached");
        expected.put(VerdictReason.MIXTURE, "threshold-reached");
        expected.put(VerdictReason.SEQUENTIAL_T, "threshold-reached");
        expected.put(VerdictReason.BUDGET, "budget");
        expected.put(VerdictReason.BELOW_THRESHOLD, "below-threshold");
        expected.put(VerdictReason.MIN_TRIALS, "min-trials");
        expected.put(VerdictReason.MIN_DURATION, "min-duration");
        for (VerdictReason reason : VerdictReason.values()) {
            assertEquals(expected.get(reason), DecisionReasons.of(decision(reason, 1_000, 1_000, NOW.plusSeconds(60))),
                    reason.name());
        }
    }

    @Test
    void budgetStopIsADeadlineWhenOnlyTheDeadlinePassed() {
        assertEquals("deadline", DecisionReasons.of(decision(VerdictReason.BUDGET, 10, 1_000, NOW)));
        assertEquals("budget", DecisionReasons.of(decision(VerdictReason.BUDGET, 1_000, 1_000, NOW)));
    }

    private static Verdict decision(VerdictReason reason, long total, long budget, Instant deadline) {
        GuardState guards = new GuardState(10, 0, Duration.ZERO, Duration.ZERO, total, budget, NOW, deadline);
        return new Verdict(reason, Rule.GLR, 0, "a", 1.0, 2.0, 0.9, guards);
    }
}
