package dev.runoff.topology;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.decision.GuardrailCounts;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.GuardrailDirection;
import dev.runoff.records.avro.GuardrailSpec;
import dev.runoff.testkit.TestDefinitions;
import java.util.List;
import org.apache.kafka.streams.test.TestRecord;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;

/**
 * Guardrails through the whole topology (TopologyTestDriver): signal events mark their unit, each unit counts
 * once per guardrail when its window closes, an unknown signal is rejected, and a failing arm's weight 0
 * reaches the control topic.
 */
class GuardrailTopologyTest {

    private static final long WINDOW = GuardrailRuns.WINDOW;
    private static final String SIGNAL = "payment-failed";
    private static final GuardrailSpec GUARDRAIL = new GuardrailSpec("failed-payments", SIGNAL,
            GuardrailDirection.HIGHER_IS_WORSE, 0.1, 0.05, null);

    private final TopologyFixture job = new TopologyFixture();

    @AfterEach
    void close() {
        job.close();
    }

    private static ExperimentDefinition definition() {
        return GuardrailRuns.ferry(GUARDRAIL);
    }

    @Test
    void aUnitCountsOnceForItsGuardrailWhenItsWindowCloses() {
        job.define(definition());
        job.advance(150);
        long t = job.clock();
        job.event("u1", Events.exposure("ferry", "u1", "x1", "wide", t));
        job.event("u1", Events.signal("ferry", "u1", "s1", SIGNAL, t + 10));
        job.event("u1", Events.signal("ferry", "u1", "s2", SIGNAL, t + 20));
        job.event("u2", Events.exposure("ferry", "u2", "x2", "wide", t));
        job.event("u3", Events.exposure("ferry", "u3", "x3", "classic", t));
        job.event("u3", Events.signal("ferry", "u3", "s3", SIGNAL, t + 30));
        job.advance(150);
        GuardrailCounts open = job.state("ferry").guardrails();
        assertEquals(0, open.counted(0, 0) + open.counted(1, 0), "nothing counted while the windows are open");
        job.advance(WINDOW + TestDefinitions.RECOMPUTE_MS);
        GuardrailCounts counts = job.state("ferry").guardrails();
        assertEquals(List.of(1L, 2L), List.of(counts.counted(0, 0), counts.counted(1, 0)));
        assertEquals(List.of(1L, 1L), List.of(counts.hits(0, 0), counts.hits(1, 0)),
                "u1's two signal events make one unit with the signal");
        assertEquals(List.of(0L, 0L), job.state("ferry").stats().stream().map(s -> ((dev.runoff.engine.stats
                .BernoulliStats) s).successes()).toList(), "signal events are not successes of the main metric");
    }

    @Test
    void aSignalNoGuardrailCountsIsRejectedNamingTheField() {
        job.define(definition());
        job.advance(150);
        job.event("u1", Events.signal("ferry", "u1", "s1", "refund-issued", job.clock()));
        List<TestRecord<String, byte[]>> rejected = job.rejected();
        assertEquals(1, rejected.size());
        assertEquals("unknown-signal", TopologyFixture.header(rejected.get(0), Rejections.REASON_HEADER));
        assertTrue(TopologyFixture.header(rejected.get(0), Rejections.MESSAGE_HEADER).startsWith(
                "signal: 'refund-issued' is not counted by any guardrail"));
    }

    @Test
    void anArmFailingItsGuardrailGetsWeightZeroOnTheControlTopic() {
        // wide: every second unit fails its payment; classic: one in fifty
        GuardrailRuns.fourHundredUnits(job, GUARDRAIL, (run, unit, i, wide, t) -> {
            if (wide ? i % 4 == 1 : i % 100 == 0) {
                run.event(unit, Events.signal("ferry", unit, "s" + i, SIGNAL, t + 5));
            }
        });
        GuardrailRuns.assertWideSuspended(job, "failed-payments");
    }
}
