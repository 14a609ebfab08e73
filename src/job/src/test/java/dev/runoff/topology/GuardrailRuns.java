package dev.runoff.topology;

import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.runoff.decision.Replay;
import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.GuardrailSpec;
import dev.runoff.testkit.TestDefinitions;
import java.util.List;

/**
 * The guardrail topology tests' shared fixture: experiment {@code ferry} (arms {@code classic}, the control, and
 * {@code wide}) with one guardrail, a run of 400 units, and the checks of a suspension of {@code wide}.
 */
final class GuardrailRuns {

    /** The conversion window of the experiment, ms. */
    static final long WINDOW = 1_000;

    /** The further events of one unit after its exposure. */
    @FunctionalInterface
    interface UnitEvents {
        void send(TopologyFixture job, String unit, int i, boolean wide, long exposedAt);
    }

    private GuardrailRuns() {
    }

    /**
     * Experiment {@code ferry}: Bernoulli, window {@link #WINDOW}, control {@code classic}, a copy of
     * {@code guardrail} (a test may change the definition's guardrail without touching a shared one).
     */
    static ExperimentDefinition ferry(GuardrailSpec guardrail) {
        ExperimentDefinition def = TestDefinitions.withWindow(TestDefinitions.bernoulli("ferry", "classic", "wide"),
                WINDOW);
        def.setControlArm("classic");
        def.setGuardrails(List.of(GuardrailSpec.newBuilder(guardrail).build()));
        return def;
    }

    /**
     * Defines {@link #ferry} with {@code guardrail}, exposes 400 units (even ones to classic, odd ones to wide),
     * each followed by {@code after}, and moves the clock past their windows and two recompute periods.
     */
    static void fourHundredUnits(TopologyFixture job, GuardrailSpec guardrail, UnitEvents after) {
        job.define(ferry(guardrail));
        job.advance(150);
        long t = job.clock();
        for (int i = 0; i < 400; i++) {
            boolean wide = i % 2 == 1;
            String unit = "u" + i;
            job.event(unit, Events.exposure("ferry", unit, "x" + i, wide ? "wide" : "classic", t));
            after.send(job, unit, i, wide, t);
        }
        job.advance(WINDOW + 2 * TestDefinitions.RECOMPUTE_MS);
    }

    /**
     * Checks that the last decision suspends {@code wide} by {@code guardrail} with weight 0, that the chain
     * replays, and that the last control record gives {@code wide} weight 0 and {@code classic} 1; returns that
     * decision.
     */
    static DecisionRecord assertWideSuspended(TopologyFixture job, String guardrail) {
        List<DecisionRecord> decisions = job.decisions();
        DecisionRecord last = decisions.get(decisions.size() - 1);
        assertEquals(guardrail, last.getArms().get(1).getSuspendedBy());
        assertEquals(0.0, last.getArms().get(1).getWeight());
        Replay.assertChainReplays(decisions);
        List<AllocationUpdate> updates = job.allocations();
        AllocationUpdate control = updates.get(updates.size() - 1);
        assertEquals(0.0, control.getWeights().get(1).getWeight(), "serving tiers stop sending units to wide");
        assertEquals(1.0, control.getWeights().get(0).getWeight(), "classic takes every unit");
        return last;
    }
}
