package dev.runoff.topology;

import dev.runoff.decision.DecisionReasons;

import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.runoff.engine.stopping.Decision;
import dev.runoff.engine.stopping.GuardState;
import dev.runoff.engine.stopping.Reason;
import dev.runoff.engine.stopping.Rule;
import java.time.Duration;
import java.time.Instant;
import java.util.EnumMap;
import java.util.Map;
import org.junit.jupiter.api.Test;

class DecisionReasonsTest {

    private static final Instant NOW = Instant.ofEpochMilli(TopologyFixture.T0);

    @Test
    void everyStoppingReasonHasItsRecordReason() {
        Map<Reason, String> expected = new EnumMap<>(Reason.class);
        expected.put(Reason.GLR, "threshold-reached");
        expected.put(Reason.POSTERIOR, "threshold-reached");
        expected.put(Reason.INDIFFERENCE, "threshold-reached");
        expected.put(Reason.BUDGET, "budget");
        expected.put(Reason.BELOW_THRESHOLD, "below-threshold");
        expected.put(Reason.MIN_TRIALS, "min-trials");
        expected.put(Reason.MIN_DURATION, "min-duration");
        for (Reason reason : Reason.values()) {
            assertEquals(expected.get(reason), DecisionReasons.of(decision(reason, 1_000, 1_000, NOW.plusSeconds(60))),
                    reason.name());
        }
    }

    @Test
    void budgetStopIsADeadlineWhenOnlyTheDeadlinePassed() {
        assertEquals("deadline", DecisionReasons.of(decision(Reason.BUDGET, 10, 1_000, NOW)));
        assertEquals("budget", DecisionReasons.of(decision(Reason.BUDGET, 1_000, 1_000, NOW)));
    }

    private static Decision decision(Reason reason, long total, long budget, Instant deadline) {
        GuardState guards = new GuardState(10, 0, Duration.ZERO, Duration.ZERO, total, budget, NOW, deadline);
        return new Decision(reason, Rule.GLR, 0, "a", 1.0, 2.0, 0.9, guards);
    }
}
