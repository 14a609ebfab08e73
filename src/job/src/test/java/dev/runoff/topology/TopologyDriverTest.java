package dev.runoff.topology;

import dev.runoff.records.Definitions;

import dev.runoff.decision.Replay;
import dev.runoff.testkit.TestDefinitions;

import dev.runoff.decision.DecisionReasons;

import static dev.runoff.topology.TopologyFixture.T0;
import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.stats.ValueStats;
import dev.runoff.records.HashChain;
import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.ArmWeight;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.ExperimentStatus;
import dev.runoff.records.avro.Guard;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.OptionalInt;
import org.apache.kafka.streams.test.TestRecord;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.parallel.Execution;
import org.junit.jupiter.api.parallel.ExecutionMode;

/**
 * The whole job under the TopologyTestDriver, its wall clock advanced by the tests.
 *
 * <p>The tests run concurrently when the build runs tests in parallel: each builds its own job under its own
 * test driver.
 */
@Execution(ExecutionMode.CONCURRENT)
class TopologyDriverTest {

    private final TopologyFixture job = new TopologyFixture();

    @AfterEach
    void close() {
        job.close();
    }

    @Test
    void newExperimentGetsUniformWarmUpWeightsAtTheNextAllocationPass() {
        job.define(TestDefinitions.bernoulli("layout", "a", "b", "c"));
        assertEquals(1, job.accepted().get(0).getVersion());
        job.advance(150);
        List<AllocationUpdate> updates = job.allocations();
        assertEquals(1, updates.size());
        AllocationUpdate update = updates.get(0);
        assertEquals("layout", update.getExperimentId());
        assertEquals(1, update.getDefinitionVersion());
        assertEquals(1, update.getSequence());
        assertEquals(ExperimentStatus.RUNNING, update.getStatus());
        assertArrayEquals(new double[] {1.0 / 3, 1.0 / 3, 1.0 / 3}, weights(update), 1e-15);
        DecisionRecord first = job.decisions().get(0);
        assertEquals(HashChain.GENESIS, first.getPreviousHash());
        assertEquals(List.of(Guard.WARM_UP), first.getGuards());
        assertEquals("CONTINUE", first.getDecision().name());
    }

    @Test
    void sequencesIncreaseByOneAndTheHashChainHolds() {
        job.define(TestDefinitions.perExposure(TestDefinitions.bernoulli("layout", "a", "b", "c")));
        for (int round = 0; round < 4; round++) {
            feed("layout", "a", 30, 3, "r" + round);
            feed("layout", "b", 30, 6, "r" + round);
            feed("layout", "c", 30, 9, "r" + round);
            job.advance(TestDefinitions.RECOMPUTE_MS + 100);
        }
        List<DecisionRecord> decisions = job.decisions();
        List<AllocationUpdate> updates = job.allocations();
        assertEquals(5, decisions.size(), "the first evaluation, then one per round of new data");
        for (int i = 0; i < decisions.size(); i++) {
            assertEquals(i + 1, decisions.get(i).getSequence());
            assertEquals(i + 1, updates.get(i).getSequence());
            assertEquals(decisions.get(i).getStreamTime(), updates.get(i).getComputedAt());
        }
        assertEquals(OptionalInt.empty(), HashChain.firstBreak(decisions));
        DecisionRecord last = decisions.get(decisions.size() - 1);
        assertEquals(List.of(120L, 120L, 120L), last.getArms().stream().map(ArmState::getTrials).toList());
        assertEquals(List.of(12L, 24L, 36L), last.getArms().stream().map(ArmState::getSuccesses).toList());
        Replay.assertChainReplays(decisions);
    }

    @Test
    void clearWinnerStopsAndTheDecisionStandsWhileLaterEventsAreFolded() {
        job.define(TestDefinitions.perExposure(TestDefinitions.bernoulli("banner", "plain", "bold")));
        job.advance(150);
        feed("banner", "plain", 200, 10, "x");
        feed("banner", "bold", 200, 100, "x");
        job.advance(TestDefinitions.RECOMPUTE_MS + 100);
        List<DecisionRecord> decisions = job.decisions();
        DecisionRecord stop = decisions.get(decisions.size() - 1);
        assertEquals("STOP", stop.getDecision().name());
        assertEquals("bold", stop.getWinner());
        assertEquals(DecisionReasons.THRESHOLD_REACHED, stop.getReason());
        assertTrue(stop.getStatistic() > stop.getThreshold());
        assertTrue(stop.getGuards().contains(Guard.AFTER_STOP));
        AllocationUpdate stopped = last(job.allocations());
        assertEquals(ExperimentStatus.STOPPED, stopped.getStatus());
        assertEquals("bold", stopped.getWinner());
        assertArrayEquals(new double[] {0, 1}, weights(stopped));
        Replay.assertChainReplays(decisions);

        feed("banner", "plain", 300, 290, "late");
        job.advance(TestDefinitions.HEARTBEAT_MS + 100);
        assertEquals(List.of(), job.decisions(), "no evaluation after the stop");
        List<AllocationUpdate> heartbeats = job.allocations();
        assertEquals(1, heartbeats.size());
        assertEquals(stopped.getSequence() + 1, heartbeats.get(0).getSequence());
        assertEquals(ExperimentStatus.STOPPED, heartbeats.get(0).getStatus());
        assertEquals("bold", heartbeats.get(0).getWinner());
        assertEquals(new BernoulliStats(500, 300), job.state("banner").stats().get(0), "later events still folded");
    }

    @Test
    void jobCountersCountFoldedTrialsDecisionsAndAllocationPasses() {
        job.define(TestDefinitions.perExposure(TestDefinitions.bernoulli("counted", "a", "b")));
        job.advance(150);
        feed("counted", "a", 40, 4, "c");
        feed("counted", "b", 25, 5, "c");
        job.advance(TestDefinitions.RECOMPUTE_MS + 100);
        assertEquals(65, job.counters().foldedTrials(), "every exposure folded once");
        assertEquals(job.decisions().size(), job.counters().decisions());
        assertTrue(job.counters().allocationPasses() >= job.decisions().size());
        assertTrue(job.counters().allocationPassNanos() > 0);
    }

    @Test
    void duplicateEventIdsAreCountedOnce() {
        job.define(TestDefinitions.perExposure(TestDefinitions.bernoulli("dup", "a", "b")));
        byte[] exposure = Events.exposure("dup", "u1", "e-1", "a", T0);
        byte[] click = Events.click("dup", "u1", "e-2", null, T0 + 5);
        job.event("u1", exposure);
        job.event("u1", exposure);
        job.event("other-key", exposure);
        job.event("u1", click);
        job.event("u1", click);
        job.advance(TestDefinitions.RECOMPUTE_MS + 100);
        assertEquals(new BernoulliStats(1, 1), job.state("dup").stats().get(0));
        assertEquals(3, job.counters().count(JobCounters.DUPLICATE));
        assertEquals(List.of(), job.rejected(), "duplicates are dropped, not rejected");
    }

    @Test
    void attributionUsesTheUnitsFirstArmWithinTheWindow() {
        job.define(TestDefinitions.perExposure(TestDefinitions.bernoulli("attr", "a", "b")));
        job.event("u1", Events.exposure("attr", "u1", "x1", "a", T0));
        job.event("u1", Events.click("attr", "u1", "c1", null, T0 + 1_000));
        job.event("u1", Events.exposure("attr", "u1", "x2", "a", T0 + 2_000));
        job.event("u1", Events.click("attr", "u1", "c2", "a", T0 + 3_000));
        job.event("u1", Events.click("attr", "u1", "c3", null, T0 + 4_000));
        job.event("u1", Events.exposure("attr", "u1", "x3", "b", T0 + 5_000));
        job.event("u2", Events.exposure("attr", "u2", "y1", "b", T0));
        job.event("u2", Events.click("attr", "u2", "d1", "a", T0 + 10));
        job.event("u2", Events.click("attr", "u2", "d2", null, T0 + TestDefinitions.WINDOW_MS + 1));
        job.event("u3", Events.click("attr", "u3", "z1", null, T0));
        // u3's click has no exposure: it waits the early-outcome grace before it is rejected as unattributed
        job.advance(Definitions.earlyOutcomeGraceMs(TestDefinitions.bernoulli("attr", "a", "b")) + 100);
        assertEquals(List.of(new BernoulliStats(2, 2), new BernoulliStats(1, 0)), job.state("attr").stats());
        List<String> reasons = job.rejected().stream().map(r -> TopologyFixture.header(r, Rejections.REASON_HEADER))
                .toList();
        assertEquals(List.of("excess-success", "arm-conflict", "arm-mismatch", "unattributed", "unattributed"),
                reasons);
    }

    @Test
    void changedDefinitionGetsTheNextVersionAndLaterRecordsCarryIt() {
        ExperimentDefinition v1 = TestDefinitions.perExposure(TestDefinitions.bernoulli("copy", "a", "b"));
        job.define(v1);
        job.advance(150);
        job.define(v1);
        assertEquals(1, job.accepted().size(), "resubmitting the same content keeps version 1");
        job.define(TestDefinitions.withBeta(v1, 0.7));
        job.advance(150);
        assertEquals(2, last(job.accepted()).getVersion());
        List<DecisionRecord> decisions = job.decisions();
        assertEquals(List.of(1L, 2L), decisions.stream().map(DecisionRecord::getDefinitionVersion).toList());
        assertEquals(0.7, decisions.get(1).getAllocationBeta());
        assertEquals(2, last(job.allocations()).getDefinitionVersion());

        feed("copy", "a", 40, 4, "f");
        ExperimentDefinition v3 = TestDefinitions.perExposure(TestDefinitions.bernoulli("copy", "a", "b", "c"));
        job.define(v3);
        feed("copy", "c", 40, 4, "f");
        job.advance(TestDefinitions.RECOMPUTE_MS + 100);
        DecisionRecord latest = last(job.decisions());
        assertEquals(3, latest.getDefinitionVersion());
        assertEquals(List.of(40L, 0L, 40L), latest.getArms().stream().map(ArmState::getTrials).toList(),
                "arm a keeps its statistics, the new arm c starts empty");
        Replay.assertChainReplays(List.of(decisions.get(0), decisions.get(1), latest));
    }

    @Test
    void aPassBudgetSmallerThanTheExperimentsStillReachesEveryExperimentThroughTheTopology() {
        TopologySettings budgeted = TopologySettings.fromMap(Map.of(TopologySettings.ALLOCATE_INTERVAL_KEY,
                Definitions.MIN_HEARTBEAT_MS, TopologySettings.ALLOCATE_MAX_EVALUATIONS_KEY, 2));
        try (TopologyFixture small = new TopologyFixture(budgeted)) {
            List<String> ids = List.of("p0", "p1", "p2", "p3", "p4");
            for (String id : ids) {
                ExperimentDefinition def = TestDefinitions.bernoulli(id, "a", "b");
                def.setHeartbeatMs(Definitions.MIN_HEARTBEAT_MS);
                small.define(def);
            }
            small.advance(Definitions.MIN_HEARTBEAT_MS);
            assertEquals(List.of("p0", "p1"), experimentIds(small.decisions()), "one pass, two evaluations");
            small.advance(2 * Definitions.MIN_HEARTBEAT_MS);
            assertEquals(List.of("p2", "p3", "p4"), experimentIds(small.decisions()),
                    "the next passes resume where the last stopped, although p0 and p1 are due again");
        }
    }

    @Test
    void tombstoneEndsTheExperiment() {
        job.define(TestDefinitions.bernoulli("gone", "a", "b"));
        job.advance(150);
        job.allocations();
        job.end("gone");
        List<TestRecord<String, byte[]>> control = job.allocationRecords();
        assertEquals(1, control.size());
        assertEquals("gone", control.get(0).key());
        assertNull(control.get(0).value(), "a tombstone on the control topic");
        assertNull(job.state("gone"));
        job.event("u1", Events.exposure("gone", "u1", "x1", "a", T0));
        assertEquals("experiment-ended", TopologyFixture.header(job.rejected().get(0), Rejections.REASON_HEADER));
        job.advance(TestDefinitions.HEARTBEAT_MS + 100);
        assertEquals(List.of(), job.allocationRecords(), "nothing more is published");
    }

    @Test
    void valueMetricCountsOneObservationPerValueEvent() {
        job.define(TestDefinitions.value("revenue", "x", "y"));
        double[] values = {12.5, 3.25, 40.0, -2.0, 7.75};
        for (int unit = 0; unit < 5; unit++) {
            job.event("u" + unit, Events.exposure("revenue", "u" + unit, "x" + unit, "y", T0));
            job.event("u" + unit, Events.value("revenue", "u" + unit, "v" + unit, null, T0 + 5, values[unit]));
        }
        job.advance(TestDefinitions.RECOMPUTE_MS + 100);
        ValueStats stats = (ValueStats) job.state("revenue").stats().get(1);
        double mean = 61.5 / 5;
        double m2 = 0;
        for (double v : values) {
            m2 += (v - mean) * (v - mean);
        }
        assertEquals(5, stats.count());
        assertEquals(mean, stats.mean(), 1e-12);
        assertEquals(m2, stats.m2(), 1e-9);
        assertEquals(ValueStats.EMPTY, job.state("revenue").stats().get(0), "exposures alone add no observation");
        Replay.assertChainReplays(job.decisions());
    }

    private void feed(String experiment, String arm, int units, int clicks, String prefix) {
        for (int i = 0; i < units; i++) {
            String unit = prefix + "-" + arm + "-" + i;
            job.event(unit, Events.exposure(experiment, unit, unit + "-x", arm, job.clock()));
            if (i < clicks) {
                job.event(unit, Events.click(experiment, unit, unit + "-c", null, job.clock()));
            }
        }
    }

    private static List<String> experimentIds(List<DecisionRecord> decisions) {
        return decisions.stream().map(DecisionRecord::getExperimentId).toList();
    }

    private static double[] weights(AllocationUpdate update) {
        return update.getWeights().stream().mapToDouble(ArmWeight::getWeight).toArray();
    }

    private static <T> T last(List<T> list) {
        return new ArrayList<>(list).get(list.size() - 1);
    }
}
