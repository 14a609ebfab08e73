package dev.runoff.job;

import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.decision.ExperimentState;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.records.HashChain;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.testkit.TestDefinitions;
import java.util.List;
import org.junit.jupiter.api.Test;

/** Test definitions recompute every 1 s and beat every 10 s (TestDefinitions). */
class LaggingTest {

    private static final ExperimentDefinition DEF = ExperimentDefinition.newBuilder(
            TestDefinitions.bernoulli("late", "a", "b")).setVersion(1).build();
    private static final List<dev.runoff.engine.stats.ArmStats> STATS = List.of(new BernoulliStats(10, 1),
            new BernoulliStats(10, 2));

    private static ExperimentState state(long computedAt, boolean dirty, ExperimentState.Stop stop) {
        return started(0, computedAt, dirty, stop);
    }

    private static ExperimentState started(long startedAt, long computedAt, boolean dirty, ExperimentState.Stop stop) {
        return new ExperimentState(DEF, STATS, stop, 1, 1, HashChain.GENESIS, new double[] {0.5, 0.5}, startedAt,
                computedAt, computedAt, dirty, computedAt < 0);
    }

    @Test
    void newDataMakesADecisionDueOnePeriodAfterTheLastAndLateAfterOneMore() {
        ExperimentState dirty = state(0, true, null);
        assertFalse(Lagging.lagging(dirty, 1_999), "due at 1 s, within one period of it");
        assertTrue(Lagging.lagging(dirty, 2_001), "more than one period past due");
    }

    @Test
    void withoutNewDataOnlyTheHeartbeatIsDue() {
        ExperimentState quiet = state(0, false, null);
        assertFalse(Lagging.lagging(quiet, 10_999));
        assertTrue(Lagging.lagging(quiet, 11_001));
    }

    @Test
    void stoppedExperimentsAreNeverLagging() {
        ExperimentState.Stop stop = new ExperimentState.Stop("a", 1, List.of("a", "b"), new double[] {1, 0});
        assertFalse(Lagging.lagging(state(0, true, stop), 1_000_000));
    }

    @Test
    void anExperimentNeverEvaluatedLagsOnePeriodAfterItsFirstStatistics() {
        // due since it was accepted, which is no later than its first statistics (startedAt = 5 s)
        assertFalse(Lagging.lagging(started(5_000, -1, true, null), 6_000), "within one period");
        assertTrue(Lagging.lagging(started(5_000, -1, true, null), 6_001), "first decision overdue");
    }

    @Test
    void anExperimentWithoutStatisticsNorEvaluationIsNotCountedLagging() {
        // its acceptance time is not kept, so how long it has waited is not known
        assertFalse(Lagging.lagging(started(-1, -1, false, null), 1_000_000));
    }

    @Test
    void newDataAfterAQuietSpellIsDueWhenItCameNotOnePeriodAfterTheLastEvaluation() {
        // evaluated at 0, quiet, new data after 4 s: due at 4 s, not at 1 s (TestDefinitions: 1 s period)
        ExperimentState dirty = state(0, true, null);
        assertTrue(Lagging.lagging(dirty, 5_000), "without the data's time: due at 1 s, counted at once");
        assertFalse(Lagging.lagging(dirty, 5_000, 4_000), "within one period of the data");
        assertTrue(Lagging.lagging(dirty, 5_001, 4_000), "more than one period past the data");
    }

    @Test
    void newDataWithinThePeriodIsStillDueOnePeriodAfterTheLastEvaluation() {
        ExperimentState dirty = state(0, true, null);
        assertFalse(Lagging.lagging(dirty, 1_999, 500));
        assertTrue(Lagging.lagging(dirty, 2_001, 500), "the data's time does not postpone the period");
    }

    @Test
    void theHeartbeatIsDueWhateverTheDataTime() {
        ExperimentState dirty = state(0, true, null);
        assertTrue(Lagging.lagging(dirty, 11_001, 10_500), "heartbeat due at 10 s, more than a period ago");
    }
}
