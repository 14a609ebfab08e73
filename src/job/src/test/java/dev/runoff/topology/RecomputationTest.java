package dev.runoff.topology;

import dev.runoff.decision.Replay;

import dev.runoff.testkit.TestDefinitions;

import dev.runoff.decision.DecisionReasons;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.records.HashChain;
import dev.runoff.records.avro.AfterStopPolicy;
import dev.runoff.records.avro.AllocationSpec;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.EstimationMethod;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.Guard;
import dev.runoff.records.avro.StoppingRule;
import dev.runoff.records.avro.StoppingSpec;
import java.util.List;
import java.util.Map;
import java.util.OptionalInt;
import java.util.SplittableRandom;
import java.util.stream.IntStream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.parallel.Execution;
import org.junit.jupiter.api.parallel.ExecutionMode;

/**
 * Every decision the job publishes can be recomputed bit for bit from its record alone (see {@link Replay}),
 * for the guards that depend on the previous weights, for Monte Carlo estimates with their seeds, for the
 * indifference rule and for each after-stop policy.
 *
 * <p>The tests run concurrently when the build runs tests in parallel: each builds its own job under its own
 * test driver.
 */
@Execution(ExecutionMode.CONCURRENT)
class RecomputationTest {

    @Test
    void guardedExperimentWithStepCapReplays() {
        ExperimentDefinition def = TestDefinitions.bernoulli("capped", "control", "b", "c", "d");
        def.setControlArm("control");
        def.setAllocation(AllocationSpec.newBuilder(def.getAllocation()).setControlShare(0.25).setFloor(0.05)
                .setMaxStep(0.05).build());
        List<DecisionRecord> chain = run(def, new double[] {0.10, 0.12, 0.20, 0.11}, 5, 60);
        assertTrue(chain.stream().anyMatch(r -> r.getGuards().contains(Guard.MAX_STEP)), "the cap was active");
        assertTrue(chain.stream().allMatch(r -> r.getGuards().contains(Guard.CONTROL_SHARE)));
        Replay.assertChainReplays(chain);
    }

    @Test
    void monteCarloExperimentWithThirteenArmsReplaysWithItsSeeds() {
        String[] arms = IntStream.range(0, 13).mapToObj(i -> "arm" + i).toArray(String[]::new);
        double[] rates = IntStream.range(0, 13).mapToDouble(i -> 0.05 + 0.01 * i).toArray();
        List<DecisionRecord> chain = run(TestDefinitions.bernoulli("many", arms), rates, 3, 30);
        assertTrue(chain.stream().allMatch(r -> r.getMethod() == EstimationMethod.MONTE_CARLO && r.getDraws() > 0));
        Replay.assertChainReplays(chain);
    }

    @Test
    void indifferenceRuleStopsOnANearTieAndReplays() {
        ExperimentDefinition def = TestDefinitions.bernoulli("tie", "a", "b");
        def.setStopping(StoppingSpec.newBuilder(def.getStopping()).setRule(StoppingRule.INDIFFERENCE).setEpsilon(0.05)
                .setDelta(0.1).build());
        def.setAfterStop(AfterStopPolicy.KEEP_WEIGHTS);
        List<DecisionRecord> chain = run(def, new double[] {0.30, 0.31}, 4, 400);
        DecisionRecord last = chain.get(chain.size() - 1);
        assertEquals("STOP", last.getDecision().name(), "a near tie within epsilon ends the experiment");
        assertEquals(DecisionReasons.THRESHOLD_REACHED, last.getReason());
        Replay.assertChainReplays(chain);
    }

    @Test
    void sequentialTRuleStopsOnValueArmsAndReplays() {
        ExperimentDefinition def = TestDefinitions.value("seq-t", "a", "b");
        def.setStopping(StoppingSpec.newBuilder(def.getStopping()).setRule(StoppingRule.SEQUENTIAL_T).build());
        def.setAfterStop(AfterStopPolicy.KEEP_WEIGHTS);
        List<DecisionRecord> chain = run(def, new double[] {0.0, 1.5}, 3, 60);
        DecisionRecord last = chain.get(chain.size() - 1);
        assertEquals("STOP", last.getDecision().name(), "means 1.5 apart in unit noise separate after 60 values each");
        assertEquals(StoppingRule.SEQUENTIAL_T, last.getStoppingRule());
        assertEquals(DecisionReasons.THRESHOLD_REACHED, last.getReason());
        assertEquals("b", last.getWinner());
        Replay.assertChainReplays(chain);
    }

    @Test
    void budgetStopWithAllToControlReplays() {
        ExperimentDefinition def = TestDefinitions.bernoulli("budget", "ctl", "alt");
        def.setControlArm("ctl");
        def.setAfterStop(AfterStopPolicy.ALL_TO_CONTROL);
        def.setStopping(StoppingSpec.newBuilder(def.getStopping()).setBudgetTrials(200L).build());
        List<DecisionRecord> chain = run(def, new double[] {0.2, 0.21}, 2, 60);
        DecisionRecord last = chain.get(chain.size() - 1);
        assertEquals(DecisionReasons.BUDGET, last.getReason());
        assertEquals(1.0, last.getArms().get(0).getWeight());
        Replay.assertChainReplays(chain);
    }

    @Test
    void jsonOutputFormatWritesRecordsThatValidateAndReplay() {
        TopologySettings json = TopologySettings.fromMap(Map.of(TopologySettings.FLUSH_INTERVAL_KEY, 100,
                TopologySettings.ALLOCATE_INTERVAL_KEY, 100, TopologySettings.OUTPUT_FORMAT_KEY, "json"));
        try (TopologyFixture job = new TopologyFixture(json)) {
            List<DecisionRecord> chain = run(job, TestDefinitions.value("json-out", "a", "b"), new double[] {0.4, 0.6}, 2,
                    30);
            assertEquals(OptionalInt.empty(), HashChain.firstBreak(chain));
            Replay.assertChainReplays(chain);
        }
    }

    private static List<DecisionRecord> run(ExperimentDefinition def, double[] rates, int rounds, int unitsPerArm) {
        try (TopologyFixture job = new TopologyFixture()) {
            return run(job, def, rates, rounds, unitsPerArm);
        }
    }

    /**
     * Defines the experiment, then each round sends {@code unitsPerArm} exposures per arm with clicks (or
     * values) drawn from a seeded generator, and lets one recompute period pass. Returns the chain.
     */
    private static List<DecisionRecord> run(TopologyFixture job, ExperimentDefinition def, double[] rates, int rounds,
                                            int unitsPerArm) {
        String id = def.getExperimentId();
        boolean value = def.getMetric().getValueEvent() != null;
        SplittableRandom random = new SplittableRandom(42);
        // These tests replay decisions of the rules on counts fed round by round: per-exposure counting puts
        // each round's counts in the next evaluation (unit counting, which waits for windows to close, is
        // replayed in UnitCountingTopologyTest).
        job.define(TestDefinitions.perExposure(def));
        job.advance(150);
        for (int round = 0; round < rounds; round++) {
            for (int arm = 0; arm < rates.length; arm++) {
                String name = def.getArms().get(arm);
                for (int i = 0; i < unitsPerArm; i++) {
                    String unit = round + "-" + name + "-" + i;
                    long t = job.clock();
                    job.event(unit, Events.exposure(id, unit, unit + "x", name, t));
                    if (value) {
                        double v = rates[arm] + random.nextGaussian();
                        job.event(unit, Events.value(id, unit, unit + "v", null, t, v));
                    } else if (random.nextDouble() < rates[arm]) {
                        job.event(unit, Events.click(id, unit, unit + "c", null, t));
                    }
                }
            }
            job.advance(TestDefinitions.RECOMPUTE_MS + 100);
        }
        List<DecisionRecord> chain = job.decisions();
        assertEquals(OptionalInt.empty(), HashChain.firstBreak(chain));
        return chain;
    }
}
