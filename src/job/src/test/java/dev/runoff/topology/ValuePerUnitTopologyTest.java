package dev.runoff.topology;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.decision.ExperimentState;
import dev.runoff.decision.Replay;
import dev.runoff.engine.stats.ValueStats;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.MetricKind;
import dev.runoff.testkit.TestDefinitions;
import java.util.List;
import org.apache.kafka.streams.test.TestRecord;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;

/**
 * Value per unit through the whole topology (TopologyTestDriver): a unit's value events add up within its
 * window, the unit counts once, when the window closes, with its sum winsorised into [0, cap]; a unit without
 * value events counts as 0; value events outside the window or after the count are rejected naming the field.
 */
class ValuePerUnitTopologyTest {

    private static final long WINDOW = 1_000;
    private static final double CAP = 100;

    private final TopologyFixture job = new TopologyFixture();

    @AfterEach
    void close() {
        job.close();
    }

    private static ExperimentDefinition definition() {
        ExperimentDefinition def = TestDefinitions.withWindow(TestDefinitions.value("cabins", "classic", "wide"),
                WINDOW);
        def.getMetric().setKind(MetricKind.VALUE_PER_UNIT);
        def.getMetric().setValueCap(CAP);
        return def;
    }

    private static ValueStats stats(ExperimentState state, int arm) {
        return (ValueStats) state.stats().get(arm);
    }

    @Test
    void aUnitCountsOnceWithItsCappedSumAndAUnitWithoutValuesCountsAsZero() {
        job.define(definition());
        job.advance(150);
        long t = job.clock();
        job.event("u1", Events.exposure("cabins", "u1", "x1", "wide", t));
        job.event("u1", Events.value("cabins", "u1", "v1", null, t + 10, 30));
        job.event("u1", Events.value("cabins", "u1", "v2", "wide", t + 20, 90));
        job.event("u2", Events.exposure("cabins", "u2", "x2", "wide", t));
        job.event("u2", Events.exposure("cabins", "u2", "x2b", "wide", t + 5));
        job.event("u3", Events.exposure("cabins", "u3", "x3", "classic", t));
        job.event("u3", Events.value("cabins", "u3", "v3", null, t + 10, 40));
        job.event("u3", Events.value("cabins", "u3", "v4", null, t + 30, -50));
        job.event("u4", Events.exposure("cabins", "u4", "x4", "classic", t));
        job.event("u4", Events.value("cabins", "u4", "v5", null, t + 10, 25));
        job.event("u4", Events.value("cabins", "u4", "v6", null, t + 40, 5));
        job.advance(300);
        ExperimentState open = job.state("cabins");
        assertEquals(List.of(0L, 0L), List.of(stats(open, 0).trials(), stats(open, 1).trials()),
                "nothing counted while the windows are open");
        assertEquals(List.of(2L, 2L), List.of(open.pending()[0], open.pending()[1]), "every exposed unit pending");

        job.advance(WINDOW + TestDefinitions.RECOMPUTE_MS);
        ExperimentState closed = job.state("cabins");
        // wide: u1 sums 30 + 90 = 120, capped at 100; u2 has no value event: 0. Mean 50, M2 = 2 * 50^2.
        assertEquals(ValueStats.EMPTY.add(100).add(0), stats(closed, 1));
        assertEquals(50.0, stats(closed, 1).mean());
        assertEquals(5_000.0, stats(closed, 1).m2());
        // classic: u3 nets 40 - 50 = -10, counted as 0 (the lower bound); u4 sums 25 + 5 = 30.
        assertEquals(ValueStats.EMPTY.add(0).add(30), stats(closed, 0));
        assertEquals(List.of(0L, 0L), List.of(closed.pending()[0], closed.pending()[1]));
        assertTrue(job.rejected().isEmpty(), "every event was taken");

        List<DecisionRecord> decisions = job.decisions();
        DecisionRecord last = decisions.get(decisions.size() - 1);
        assertEquals(2L, last.getArms().get(1).getTrials(), "a trial is a unit, not a value event");
        assertEquals(50.0, last.getArms().get(1).getMean());
        assertEquals(0L, last.getArms().get(1).getPending(), "pending units are reported, as for Bernoulli units");
        Replay.assertChainReplays(decisions);
    }

    @Test
    void aValueEventBeforeItsUnitsExposureWaitsAndAddsToTheUnitsSum() {
        job.define(definition());
        job.advance(150);
        long t = job.clock();
        job.event("u1", Events.value("cabins", "u1", "v1", null, t, 45));
        job.advance(100);
        job.event("u1", Events.exposure("cabins", "u1", "x1", "wide", t + 50));
        job.event("u1", Events.value("cabins", "u1", "v2", null, t + 60, 15));
        job.advance(WINDOW + TestDefinitions.RECOMPUTE_MS);
        assertTrue(job.rejected().isEmpty(), "the early value waited for the exposure");
        assertEquals(ValueStats.EMPTY.add(60), stats(job.state("cabins"), 1), "one unit: 45 + 15");
    }

    @Test
    void theCapOfAnExperimentNeverChanges() {
        job.define(definition());
        job.advance(150);
        ExperimentDefinition recapped = definition();
        recapped.getMetric().setValueCap(2 * CAP);
        job.define(recapped);
        List<TestRecord<String, byte[]>> refused = job.rejected();
        assertEquals(1, refused.size());
        assertEquals("metric-change", TopologyFixture.header(refused.get(0), Rejections.REASON_HEADER));
        assertTrue(TopologyFixture.header(refused.get(0), Rejections.MESSAGE_HEADER).startsWith(
                "metric.valueCap: experiment 'cabins' caps per-unit sums at 100.0, not 200.0"));
        assertEquals(1, job.state("cabins").definition().getVersion());
    }

    @Test
    void valueEventsOutsideTheWindowOrAfterTheCountAreRejectedNamingTheField() {
        job.define(definition());
        job.advance(150);
        long t = job.clock();
        job.event("u1", Events.exposure("cabins", "u1", "x1", "wide", t));
        job.event("u1", Events.value("cabins", "u1", "v1", null, t + WINDOW + 1, 10));
        List<TestRecord<String, byte[]>> outside = job.rejected();
        assertEquals(1, outside.size());
        assertEquals("unattributed", TopologyFixture.header(outside.get(0), Rejections.REASON_HEADER));
        assertTrue(TopologyFixture.header(outside.get(0), Rejections.MESSAGE_HEADER).startsWith("timestamp: "
                + (WINDOW + 1) + " ms from the unit's first trial event"));

        job.advance(WINDOW + TestDefinitions.RECOMPUTE_MS);
        job.event("u1", Events.value("cabins", "u1", "v2", null, t + 10, 10));
        List<TestRecord<String, byte[]>> late = job.rejected();
        assertEquals(1, late.size());
        assertEquals("late-outcome", TopologyFixture.header(late.get(0), Rejections.REASON_HEADER));
        assertTrue(TopologyFixture.header(late.get(0), Rejections.MESSAGE_HEADER).startsWith(
                "timestamp: the unit's conversion window closed at"));
        job.advance(TestDefinitions.RECOMPUTE_MS);
        assertEquals(ValueStats.EMPTY.add(0), stats(job.state("cabins"), 1), "the unit counted once, as 0");
    }
}
