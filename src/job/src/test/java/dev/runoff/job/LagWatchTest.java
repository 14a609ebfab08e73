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

/** Test definitions recompute every 1 s and beat every 10 s (TestDefinitions); evaluated at 0 here. */
class LagWatchTest {

    private static final ExperimentDefinition DEF = ExperimentDefinition.newBuilder(
            TestDefinitions.bernoulli("late", "a", "b")).setVersion(1).build();
    private static final ExperimentState CLEAN = state(false);
    private static final ExperimentState DIRTY = state(true);

    private final LagWatch watch = new LagWatch();

    private static ExperimentState state(boolean dirty) {
        return new ExperimentState(DEF, List.of(new BernoulliStats(10, 1), new BernoulliStats(10, 2)), null, 1, 1,
                HashChain.GENESIS, new double[] {0.5, 0.5}, 0, 0, 0, dirty, false);
    }

    private boolean scan(long now, ExperimentState state) {
        watch.begin(now);
        boolean lagging = watch.lagging("late", state);
        watch.end();
        return lagging;
    }

    @Test
    void dataSeenAfterAScanThatSawTheExperimentCleanIsDueNoEarlierThanThatScan() {
        assertFalse(scan(4_000, CLEAN));
        assertFalse(scan(5_000, DIRTY), "the data came after 4 s: due then, not at 1 s");
        assertTrue(scan(5_001, DIRTY), "more than one period past 4 s");
    }

    @Test
    void theFirstScanDoesNotKnowWhenTheDataCameAndCountsByTheStatelessRule() {
        assertTrue(scan(5_000, DIRTY), "due at 1 s by the stateless rule");
        assertTrue(scan(6_000, DIRTY), "still not known at the next scan");
    }

    @Test
    void aScanLeftUnfinishedDoesNotCount() {
        assertFalse(scan(4_000, CLEAN));
        watch.begin(4_500);
        watch.lagging("other", CLEAN);
        assertFalse(scan(5_000, DIRTY), "compared with the scan at 4 s, the last one ended");
        assertTrue(scan(5_001, DIRTY));
    }
}
