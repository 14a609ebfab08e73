package dev.runoff.topology;

import static dev.runoff.topology.TopologyFixture.header;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.decision.ExperimentState;
import dev.runoff.decision.Replay;
import dev.runoff.engine.stats.ArmStats;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.records.HashChain;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.MetricKind;
import dev.runoff.records.avro.MetricSpec;
import dev.runoff.records.avro.EventType;
import dev.runoff.testkit.TestDefinitions;
import java.util.ArrayList;
import java.util.List;
import java.util.OptionalInt;
import java.util.SplittableRandom;
import org.apache.kafka.streams.test.TestRecord;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.parallel.Execution;
import org.junit.jupiter.api.parallel.ExecutionMode;

/**
 * Unit counting through the whole topology (TopologyTestDriver, wall clock advanced by the test): trials
 * and successes are units, counted when their conversion window closes; outcomes credited to the first
 * exposure; early outcomes wait for it; lifecycles keep the counts consistent.
 *
 * <p>The tests run concurrently when the build runs tests in parallel: each builds its own job under its own
 * test driver.
 */
@Execution(ExecutionMode.CONCURRENT)
class UnitCountingTopologyTest {

    private static final long WINDOW = 1_000;

    private final TopologyFixture job = new TopologyFixture();

    @AfterEach
    void close() {
        job.close();
    }

    private static ExperimentDefinition definition(String id, String... arms) {
        return TestDefinitions.withWindow(TestDefinitions.bernoulli(id, arms), WINDOW);
    }

    @Test
    void aUnitIsOneTrialCountedWhenItsWindowClosesAndPendingUntilThen() {
        long window = 3 * TestDefinitions.RECOMPUTE_MS;
        job.define(TestDefinitions.withWindow(TestDefinitions.bernoulli("units", "a", "b"), window));
        job.advance(150);
        job.decisions();
        long t = job.clock();
        for (int visit = 0; visit < 3; visit++) {
            job.event("u1", Events.exposure("units", "u1", "x" + visit, "a", t + visit * 100L));
        }
        job.event("u1", Events.click("units", "u1", "c1", null, t + 200));
        job.event("u2", Events.exposure("units", "u2", "y1", "b", t));
        job.advance(TestDefinitions.RECOMPUTE_MS + 100);
        assertEquals(List.of(), job.decisions(), "pending units alone bring nothing new to evaluate");
        job.define(TestDefinitions.withBeta(TestDefinitions.withWindow(TestDefinitions.bernoulli("units", "a", "b"),
                window), 0.6));
        job.advance(150);
        assertEquals(List.of(BernoulliStats.EMPTY, BernoulliStats.EMPTY), job.state("units").stats(),
                "nothing is counted while the windows are open");
        assertEquals(List.of(1L, 1L), pending(job.state("units")));
        DecisionRecord early = last(job.decisions());
        assertEquals(List.of(1L, 1L), early.getArms().stream().map(ArmState::getPending).toList(),
                "the decision record says what the decision did not know yet");

        job.advance(window + TestDefinitions.RECOMPUTE_MS);
        assertEquals(List.of(new BernoulliStats(1, 1), new BernoulliStats(1, 0)), job.state("units").stats(),
                "three exposures of u1 are one trial; its click one success");
        assertEquals(List.of(0L, 0L), pending(job.state("units")));
        List<DecisionRecord> chain = new ArrayList<>(List.of(early));
        chain.addAll(job.decisions());
        DecisionRecord latest = last(chain);
        assertEquals(List.of(0L, 0L), latest.getArms().stream().map(ArmState::getPending).toList());
        assertEquals(List.of(1L, 1L), latest.getArms().stream().map(ArmState::getTrials).toList());
        assertEquals(List.of(), job.rejected());
        Replay.assertChainReplays(chain);
    }

    @Test
    void outcomesGoToTheFirstExposureOnceWithinTheWindowAndOthersAreRejectedByName() {
        job.define(definition("credit", "a", "b"));
        long t = job.clock();
        job.event("u1", Events.exposure("credit", "u1", "x1", "a", t));
        job.event("u1", Events.click("credit", "u1", "c1", "b", t + 10));
        job.event("u1", Events.exposure("credit", "u1", "x2", "b", t + 20));
        job.event("u1", Events.click("credit", "u1", "c2", null, t + 30));
        job.event("u1", Events.click("credit", "u1", "c3", "a", t + 40));
        job.event("u2", Events.exposure("credit", "u2", "y1", "b", t));
        job.event("u2", Events.click("credit", "u2", "d1", null, t + WINDOW + 1));
        job.advance(WINDOW + 200);
        job.event("u3", Events.exposure("credit", "u3", "z1", "a", t));
        job.advance(200);
        job.event("u3", Events.click("credit", "u3", "z2", "a", t + WINDOW - 1));
        job.advance(TestDefinitions.RECOMPUTE_MS);
        assertEquals(List.of(new BernoulliStats(2, 1), new BernoulliStats(1, 0)), job.state("credit").stats());
        assertEquals(List.of("arm-mismatch", "arm-conflict", "excess-success", "unattributed", "late-outcome"),
                reasons(job.rejected()));
    }

    @Test
    void anOutcomeBeforeItsExposureWaitsForItThenAnUnmatchedOneIsUnattributedAfterTheGrace() {
        ExperimentDefinition def = definition("early", "a", "b");
        def.setEarlyOutcomeGraceMs(2_000L);
        job.define(def);
        long t = job.clock();
        job.event("u1", Events.click("early", "u1", "c1", null, t));
        job.event("u2", Events.click("early", "u2", "d1", null, t));
        job.advance(1_000);
        assertEquals(List.of(), job.rejected(), "both clicks wait");
        job.event("u1", Events.exposure("early", "u1", "x1", "a", t + 500));
        job.advance(1_100);
        List<TestRecord<String, byte[]>> rejected = job.rejected();
        assertEquals(List.of("unattributed"), reasons(rejected), "u2's click after the grace");
        assertTrue(header(rejected.get(0), Rejections.MESSAGE_HEADER).contains("early-outcome grace of 2000 ms"));
        job.advance(WINDOW + TestDefinitions.RECOMPUTE_MS);
        assertEquals(List.of(new BernoulliStats(1, 1), BernoulliStats.EMPTY), job.state("early").stats(),
                "u1's early click is matched to its exposure");
        assertEquals(2, job.counters().count(JobCounters.EARLY_HELD));
        assertEquals(1, job.counters().count(JobCounters.EARLY_MATCHED));
    }

    @Test
    void anEndedIdIsNotReusedAndTheMetricOrCountingNeverChanges() {
        job.define(definition("life", "a", "b"));
        job.advance(150);
        ExperimentDefinition value = definition("life", "a", "b");
        value.setMetric(MetricSpec.newBuilder().setKind(MetricKind.VALUE).setTrialEvent(EventType.EXPOSURE)
                .setValueEvent(EventType.VALUE).build());
        job.define(value);
        job.define(TestDefinitions.perExposure(definition("life", "a", "b")));
        List<TestRecord<String, byte[]>> refused = job.rejected();
        assertEquals(List.of("metric-change", "metric-change"), reasons(refused));
        for (TestRecord<String, byte[]> record : refused) {
            assertTrue(header(record, Rejections.MESSAGE_HEADER).contains("start a new experiment with a new id"));
        }
        assertEquals(1, job.state("life").definition().getVersion());
        List<DecisionRecord> firstRun = job.decisions();

        job.end("life");
        job.define(definition("life", "a", "b"));
        TestRecord<String, byte[]> reused = job.rejected().get(0);
        assertEquals("experiment-id-ended", header(reused, Rejections.REASON_HEADER));
        assertTrue(header(reused, Rejections.MESSAGE_HEADER).contains("start a new experiment with a new id"));
        job.advance(TestDefinitions.HEARTBEAT_MS);
        assertEquals(List.of(), job.decisions(), "no second chain under the same id");
        assertEquals(OptionalInt.empty(), HashChain.firstBreak(firstRun));
        Replay.assertChainReplays(firstRun);
    }

    @Test
    void aReAddedArmStartsCleanAndItsOldUnitsStayOut() {
        job.define(definition("arms", "a", "b", "c"));
        long t = job.clock();
        job.event("old", Events.exposure("arms", "old", "o1", "c", t));
        job.event("old", Events.click("arms", "old", "o2", null, t + 1));
        job.advance(200);
        job.define(definition("arms", "a", "b"));
        job.advance(200);
        job.define(definition("arms", "a", "b", "c"));
        job.event("new", Events.exposure("arms", "new", "n1", "c", job.clock()));
        job.event("old", Events.exposure("arms", "old", "o3", "c", job.clock()));
        job.advance(WINDOW + TestDefinitions.RECOMPUTE_MS);
        ExperimentState state = job.state("arms");
        assertEquals(3, state.definition().getVersion());
        assertEquals(new BernoulliStats(1, 0), state.stats().get(2), "only the unit first exposed after the re-add");
        assertEquals(0L, state.pending()[2]);
        assertEquals(List.of("delta-stale-arm"), reasons(job.rejected()),
                "the old unit's count, from before the arm was removed, is set aside");
    }

    @Test
    void successesNeverExceedTrialsWhateverTheDefinitionsDo() {
        SplittableRandom random = new SplittableRandom(11);
        List<String> pool = List.of("a", "b", "c", "d");
        List<String> arms = new ArrayList<>(List.of("a", "b"));
        job.define(definition("chaos", arms.toArray(String[]::new)));
        int event = 0;
        for (int step = 0; step < 60; step++) {
            if (random.nextInt(5) == 0) {
                arms = new ArrayList<>(pool.subList(0, 2 + random.nextInt(3)));
                if (random.nextBoolean()) {
                    java.util.Collections.reverse(arms);
                }
                ExperimentDefinition def = definition("chaos", arms.toArray(String[]::new));
                def.setAttributionWindowMs(200 + random.nextInt(1_500));
                job.define(def);
            }
            for (int i = 0; i < 10; i++) {
                // a unit keeps one arm, as sticky serving does, and clicks often: many repeat conversions
                int u = step / 4 * 3 + random.nextInt(6);
                String unit = "u" + u;
                String arm = pool.get(u % pool.size());
                long at = job.clock() - random.nextInt(300);
                byte[] value = switch (random.nextInt(4)) {
                    case 0 -> Events.exposure("chaos", unit, "e" + event, arm, at);
                    case 1 -> Events.click("chaos", unit, "e" + event, arm, at);
                    default -> Events.click("chaos", unit, "e" + event, null, at);
                };
                event++;
                job.event(unit, value);
            }
            job.advance(100 + random.nextInt(400));
            assertConsistent(job.state("chaos"));
        }
        job.advance(2_000 + TestDefinitions.RECOMPUTE_MS);
        ExperimentState end = job.state("chaos");
        assertConsistent(end);
        assertTrue(end.stats().stream().mapToLong(ArmStats::trials).sum() > 0, "some units were counted");
        assertTrue(job.rejected().stream().noneMatch(r -> "evaluation-error".equals(header(r,
                Rejections.REASON_HEADER))), "no evaluation failed");
        List<DecisionRecord> chain = job.decisions();
        assertEquals(OptionalInt.empty(), HashChain.firstBreak(chain));
        Replay.assertChainReplays(chain);
    }

    private static void assertConsistent(ExperimentState state) {
        assertNotNull(state);
        for (int i = 0; i < state.stats().size(); i++) {
            BernoulliStats arm = (BernoulliStats) state.stats().get(i);
            assertTrue(arm.successes() <= arm.trials(), "arm " + i + ": " + arm);
            assertTrue(state.pending()[i] >= 0, "arm " + i + " pending " + state.pending()[i]);
        }
    }

    private static List<Long> pending(ExperimentState state) {
        return java.util.Arrays.stream(state.pending()).boxed().toList();
    }

    private static List<String> reasons(List<TestRecord<String, byte[]>> records) {
        return records.stream().map(r -> header(r, Rejections.REASON_HEADER)).toList();
    }

    private static <T> T last(List<T> list) {
        return list.get(list.size() - 1);
    }
}
