package dev.runoff.engine.stopping;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;

import dev.runoff.engine.best.LeaderThreshold;
import java.time.Duration;
import java.time.Instant;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.function.Executable;

class StoppingConfigTest {

    private static String message(Executable e) {
        return assertThrows(IllegalArgumentException.class, e).getMessage();
    }

    @Test
    void defaultsAreTheProvenGlrWithoutGuards() {
        StoppingConfig c = StoppingConfig.glr(0.05);
        assertEquals(Rule.GLR, c.rule());
        assertEquals(GlrThreshold.PROVEN, c.glrThreshold());
        assertEquals(3.0, c.z());
        assertEquals(0, c.minTrialsPerArm());
        assertEquals(Duration.ZERO, c.minDuration());
        assertEquals(StoppingConfig.NO_TRIAL_BUDGET, c.budgetTrials());
        assertEquals(StoppingConfig.NO_DEADLINE, c.deadline());
        assertEquals(Rule.POSTERIOR, StoppingConfig.posterior(0.1).rule());
        assertEquals(0.02, StoppingConfig.indifference(0.1, 0.02).epsilon());
    }

    @Test
    void rejectsBadValuesNamingTheField() {
        StoppingConfig c = StoppingConfig.glr(0.05);
        assertEquals("delta must be in (0.0, 1.0), got 0.0", message(() -> StoppingConfig.glr(0)));
        assertEquals("delta must be in (0.0, 1.0), got NaN", message(() -> StoppingConfig.posterior(Double.NaN)));
        assertEquals("z must be a finite number >= 0, got -1.0", message(() -> c.withZ(-1)));
        assertEquals("epsilon must be a finite number >= 0, got -0.1",
                message(() -> StoppingConfig.indifference(0.05, -0.1)));
        assertEquals("epsilon must be > 0 for the indifference rule, got 0.0",
                message(() -> StoppingConfig.indifference(0.05, 0)));
        assertEquals("minTrialsPerArm must be >= 0, got -5", message(() -> c.withMinTrialsPerArm(-5)));
        assertEquals("minDuration must not be negative, got PT-1S",
                message(() -> c.withMinDuration(Duration.ofSeconds(-1))));
        assertEquals("budgetTrials must be >= 1, got 0", message(() -> c.withBudgetTrials(0)));
        assertThrows(NullPointerException.class, () -> c.withDeadline(null));
    }

    @Test
    void timingRejectsAnEvaluationBeforeTheStart() {
        Instant start = Instant.parse("2026-03-02T09:00:00Z");
        assertEquals("now (2026-03-02T08:00:00Z) must not be before start (2026-03-02T09:00:00Z)",
                message(() -> new Timing(start, start.minus(Duration.ofHours(1)))));
        assertEquals(Duration.ofHours(3), new Timing(start, start.plus(Duration.ofHours(3))).elapsed());
    }

    @Test
    void decisionRejectsImpossibleValues() {
        Instant now = Instant.parse("2026-03-02T09:00:00Z");
        GuardState guards = new GuardState(10, 0, Duration.ZERO, Duration.ZERO, 20, StoppingConfig.NO_TRIAL_BUDGET,
                now, StoppingConfig.NO_DEADLINE);
        assertEquals("leaderConfidence must be in [0.0, 1.0], got 1.1", message(() -> new Verdict(VerdictReason.GLR,
                Rule.GLR, 0, "A", 1, 2, 1.1, guards)));
        assertEquals("leader must be >= 0, got -1", message(() -> new Verdict(VerdictReason.GLR, Rule.GLR, -1, "A", 1, 2,
                0.5, guards)));
        assertEquals(Verdict.Action.CONTINUE, new Verdict(VerdictReason.MIN_DURATION, Rule.GLR, 0, "A", 1, 2, 0.5, guards)
                .action());
    }

    @Test
    void onlyThePosteriorRuleReadsALevelOfTheLeadersAlpha() {
        assertEquals(new LeaderThreshold(0.95, StoppingConfig.DEFAULT_Z), StoppingConfig.posterior(0.05).leaderThreshold());
        assertEquals(new LeaderThreshold(0.99, 2.0), StoppingConfig.posterior(0.01).withZ(2.0).leaderThreshold());
        assertNull(StoppingConfig.glr(0.05).leaderThreshold());
        assertNull(StoppingConfig.indifference(0.05, 0.01).leaderThreshold());
    }
}
