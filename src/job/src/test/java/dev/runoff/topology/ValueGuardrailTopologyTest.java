package dev.runoff.topology;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.decision.GuardrailCounts;
import dev.runoff.engine.guardrail.Direction;
import dev.runoff.engine.guardrail.MarginCheck;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.GuardrailDirection;
import dev.runoff.records.avro.GuardrailSpec;
import dev.runoff.records.avro.GuardrailState;
import dev.runoff.testkit.TestDefinitions;
import java.nio.charset.StandardCharsets;
import java.util.List;
import org.apache.kafka.streams.test.TestRecord;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;

/**
 * Value guardrails through the whole topology (TopologyTestDriver): a signal event's value adds to its unit's
 * sum of that signal, each unit counts once at window close with its sum winsorised into [0, valueCap] over
 * the cap (0 without the signal), a signal event without a value is rejected naming the field, and an arm
 * whose capped mean is worse than the control's by more than the margin is suspended.
 */
class ValueGuardrailTopologyTest {

    private static final long WINDOW = GuardrailRuns.WINDOW;
    private static final String SIGNAL = "refund-issued";
    private static final double CAP = 100;
    private static final GuardrailSpec GUARDRAIL = new GuardrailSpec("refunds", SIGNAL,
            GuardrailDirection.HIGHER_IS_WORSE, 0.1, 0.05, CAP);

    private final TopologyFixture job = new TopologyFixture();

    @AfterEach
    void close() {
        job.close();
    }

    private static ExperimentDefinition definition() {
        return GuardrailRuns.ferry(GUARDRAIL);
    }

    /** A signal event with a value, arm-less. */
    private static byte[] refund(String unit, String eventId, long timestamp, double value) {
        String json = new String(Events.json("ferry", unit, eventId, "CONVERSION", timestamp, null, value),
                StandardCharsets.UTF_8);
        return (json.substring(0, json.length() - 1) + ",\"signal\":\"" + SIGNAL + "\"}")
                .getBytes(StandardCharsets.UTF_8);
    }

    @Test
    void eachUnitCountsItsCappedSumOverTheCapOnceItsWindowCloses() {
        job.define(definition());
        job.advance(150);
        long t = job.clock();
        job.event("u1", Events.exposure("ferry", "u1", "x1", "wide", t));
        job.event("u1", refund("u1", "r1", t + 10, 30));
        job.event("u1", refund("u1", "r2", t + 20, 90));
        job.event("u2", Events.exposure("ferry", "u2", "x2", "wide", t));
        job.event("u3", Events.exposure("ferry", "u3", "x3", "classic", t));
        job.event("u3", refund("u3", "r3", t + 30, -20));
        job.event("u4", Events.exposure("ferry", "u4", "x4", "classic", t));
        job.event("u4", refund("u4", "r4", t + 30, 25));
        job.advance(150);
        GuardrailCounts open = job.state("ferry").guardrails();
        assertEquals(0, open.counted(0, 0) + open.counted(1, 0), "nothing counted while the windows are open");
        job.advance(WINDOW + TestDefinitions.RECOMPUTE_MS);
        GuardrailCounts counts = job.state("ferry").guardrails();
        assertEquals(List.of(2L, 2L), List.of(counts.counted(0, 0), counts.counted(1, 0)));
        assertEquals(List.of(2L, 1L), List.of(counts.hits(0, 0), counts.hits(1, 0)), "units with the signal");
        // classic: u3 nets -20 -> 0, u4 25 -> 0.25; wide: u1 30 + 90 = 120 -> capped 100 -> 1, u2 none -> 0
        assertEquals(0.25, counts.total(0, 0));
        assertEquals(1.0, counts.total(1, 0));
    }

    @Test
    void aSignalEventWithoutAValueIsRejectedNamingTheField() {
        job.define(definition());
        job.advance(150);
        job.event("u1", Events.signal("ferry", "u1", "s1", SIGNAL, job.clock()));
        List<TestRecord<String, byte[]>> rejected = job.rejected();
        assertEquals(1, rejected.size());
        assertEquals("missing-value", TopologyFixture.header(rejected.get(0), Rejections.REASON_HEADER));
        assertTrue(TopologyFixture.header(rejected.get(0), Rejections.MESSAGE_HEADER).startsWith(
                "value: missing (signal 'refund-issued' feeds a value guardrail"));
    }

    @Test
    void anArmWhoseCappedMeanExceedsTheMarginIsSuspendedWithStatisticAndThreshold() {
        // wide: every second unit refunds 150 (capped at 100); classic: one in ten refunds 40 of the cap 100
        GuardrailRuns.fourHundredUnits(job, GUARDRAIL, (run, unit, i, wide, t) -> {
            if (wide ? i % 4 == 1 : i % 20 == 0) {
                run.event(unit, refund(unit, "r" + i, t + 5, wide ? 150 : 40));
            }
        });
        DecisionRecord last = GuardrailRuns.assertWideSuspended(job, "refunds");
        GuardrailState wide = last.getArms().get(1).getGuardrails().get(0);
        GuardrailState classic = last.getArms().get(0).getGuardrails().get(0);
        assertEquals(100.0, wide.getTotal(), "100 of wide's 200 units refund past the cap: 1 each");
        assertEquals(8.0, classic.getTotal(), 1e-12, "20 of classic's 200 units refund 40 of 100: 0.4 each");
        MarginCheck.Result direct = MarginCheck.check(new MarginCheck.Totals(200, 100.0),
                new MarginCheck.Totals(200, classic.getTotal()), Direction.HIGHER_IS_WORSE, 0.1, 0.05);
        assertEquals(MarginCheck.Outcome.FAIL, direct.outcome());
        assertEquals(direct.statistic(), wide.getStatistic());
        assertEquals(direct.threshold(), wide.getThreshold());
        assertNull(classic.getStatistic(), "the reference is not tested");
        assertNotNull(wide.getThreshold());
    }

    @Test
    void aDefinitionUpdateThatChangesAGuardrailsValueCapIsRefused() {
        job.define(definition());
        job.advance(150);
        ExperimentDefinition changed = definition();
        changed.getGuardrails().get(0).setValueCap(2 * CAP);
        job.define(changed);
        List<TestRecord<String, byte[]>> rejected = job.rejected();
        assertEquals(1, rejected.size());
        assertEquals("metric-change", TopologyFixture.header(rejected.get(0), Rejections.REASON_HEADER));
        assertTrue(TopologyFixture.header(rejected.get(0), Rejections.MESSAGE_HEADER).startsWith(
                "guardrails[0].valueCap: guardrail 'refunds'"));
    }
}
