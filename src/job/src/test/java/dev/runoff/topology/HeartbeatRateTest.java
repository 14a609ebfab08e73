package dev.runoff.topology;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.records.Definitions;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.testkit.TestDefinitions;
import java.util.List;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.parallel.Execution;
import org.junit.jupiter.api.parallel.ExecutionMode;

/**
 * How many decision records an experiment writes: without new data, one per heartbeat (never one per
 * allocation pass), so at most one per {@link Definitions#MIN_HEARTBEAT_MS}; with new data, one per recompute
 * period at most.
 *
 * <p>The tests run concurrently when the build runs tests in parallel: each builds its own job under its own
 * test driver.
 */
@Execution(ExecutionMode.CONCURRENT)
class HeartbeatRateTest {

    private static final long TEN_MINUTES = 600_000;
    private final TopologyFixture job = new TopologyFixture();

    @AfterEach
    void close() {
        job.close();
    }

    @Test
    void anIdleExperimentWritesOneDecisionPerHeartbeatNotOnePerPass() {
        ExperimentDefinition def = TestDefinitions.bernoulli("idle", "a", "b");
        def.setHeartbeatMs(Definitions.MIN_HEARTBEAT_MS);
        job.define(def);
        job.advance(TEN_MINUTES);
        List<DecisionRecord> decisions = job.decisions();
        // the first pass evaluates the new experiment, then one evaluation per 10 s heartbeat: 60 in 600 s,
        // although the allocation pass of the fixture runs thousands of times
        assertEquals(60, decisions.size(), "one decision per heartbeat, not one per pass");
        for (int i = 1; i < decisions.size(); i++) {
            assertEquals(Definitions.MIN_HEARTBEAT_MS,
                    decisions.get(i).getStreamTime() - decisions.get(i - 1).getStreamTime(), "record " + i);
        }
    }

    @Test
    void newDataIsEvaluatedAtMostOncePerRecomputePeriod() {
        // per-exposure counting: each exposure is a trial at once, so new data keeps arriving for 10 s
        ExperimentDefinition def = TestDefinitions.perExposure(TestDefinitions.bernoulli("busy", "a", "b"));
        def.setRecomputePeriodMs(Definitions.MIN_RECOMPUTE_PERIOD_MS);
        def.setHeartbeatMs(TEN_MINUTES);
        def.setValidForMs(2 * TEN_MINUTES);
        job.define(def);
        job.advance(1_000);
        assertEquals(1, job.decisions().size(), "the new experiment");
        for (int i = 0; i < 100; i++) {
            String unit = "u" + i;
            job.event(unit, Events.exposure("busy", unit, unit + "-x", i % 2 == 0 ? "a" : "b", job.clock()));
            job.advance(100);
        }
        List<DecisionRecord> decisions = job.decisions();
        assertTrue(decisions.size() >= 2, decisions.size() + " evaluations of 10 s of data");
        for (int i = 1; i < decisions.size(); i++) {
            long gap = decisions.get(i).getStreamTime() - decisions.get(i - 1).getStreamTime();
            assertTrue(gap >= Definitions.MIN_RECOMPUTE_PERIOD_MS, "gap " + gap + " ms before record " + i);
        }
    }
}
