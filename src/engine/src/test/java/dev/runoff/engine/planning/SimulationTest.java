package dev.runoff.engine.planning;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.EngineConfig;
import dev.runoff.engine.core.Metric;
import dev.runoff.engine.allocation.AllocationMethod;
import dev.runoff.engine.stopping.VerdictReason;
import dev.runoff.engine.stopping.Rule;
import dev.runoff.engine.stopping.StoppingConfig;
import java.time.Duration;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Set;
import java.util.concurrent.atomic.AtomicInteger;
import org.junit.jupiter.api.Test;

/** The simulation's mechanics: seeding, parallelism, batching, the budget and the baseline. */
class SimulationTest {
    private static final ArmModel THREE = ArmModel.bernoulli(0.2, 0.5, 0.8);
    /** Monte Carlo alpha, so that the engine's seeds matter too, with few draws to keep the test fast. */
    private static final EngineConfig MONTE_CARLO = EngineConfig.defaults(Metric.BERNOULLI)
            .withMethod(EngineConfig.MethodChoice.MONTE_CARLO).withDraws(500);

    private static SimulationConfig config(ArmModel arms, EngineConfig engine, StoppingConfig stopping,
                                           int batch, int replications, long seed) {
        return new SimulationConfig(arms, engine, stopping, batch, replications, seed, 0.0);
    }

    private static SimulationConfig small(int replications, long seed) {
        return config(THREE, MONTE_CARLO, StoppingConfig.glr(0.05).withBudgetTrials(5000), 10, replications, seed);
    }

    @Test
    void sameSeedGivesTheSameResultWithOneOrTwoThreadsOrADirectExecutor() {
        SimulationConfig c = small(12, 42L);
        SimulationResult one = Simulation.run(c, 1, SimulationProgress.NONE);
        SimulationResult two = Simulation.run(c, 2, SimulationProgress.NONE);
        SimulationResult direct = Simulation.run(c, Runnable::run, SimulationProgress.NONE);
        assertEquals(one, two);
        assertEquals(one, direct);
        assertEquals(one.rule(), two.rule());
        assertEquals(one.baseline(), two.baseline());
    }

    @Test
    void anotherSeedGivesOtherRuns() {
        assertNotEquals(Simulation.run(small(6, 1L), 1, SimulationProgress.NONE).ruleRuns(),
                Simulation.run(small(6, 2L), 1, SimulationProgress.NONE).ruleRuns());
    }

    @Test
    void eachReplicationDependsOnlyOnTheMasterSeedAndItsIndex() {
        SimulationResult three = Simulation.run(small(3, 5L), 2, SimulationProgress.NONE);
        SimulationResult six = Simulation.run(small(6, 5L), 2, SimulationProgress.NONE);
        assertEquals(three.ruleRuns(), six.ruleRuns().subList(0, 3));
        assertEquals(three.baselineRuns(), six.baselineRuns().subList(0, 3));
    }

    @Test
    void replicationSeedsDifferAcrossIndexesAndMasterSeeds() {
        Set<Long> seeds = new HashSet<>();
        for (long master = 0; master < 10; master++) {
            for (int i = 0; i < 100; i++) {
                seeds.add(Simulation.replicationSeed(master, i));
            }
        }
        assertEquals(1000, seeds.size());
        assertThrows(IllegalArgumentException.class, () -> Simulation.replicationSeed(1, -1));
    }

    @Test
    void runsStoppedByTheRuleEndOnABatchBoundary() {
        SimulationResult r = Simulation.run(small(10, 3L), 2, SimulationProgress.NONE);
        for (SimulationRun run : r.ruleRuns()) {
            assertEquals(VerdictReason.GLR, run.reason(), run.toString());
            assertEquals(0, run.trials() % 10, run.toString());
            assertEquals(run.trials(), run.armTrials()[0] + run.armTrials()[1] + run.armTrials()[2]);
        }
    }

    @Test
    void aRunThatCannotStopEndsExactlyAtTheBudgetPickingTheLargestAlpha() {
        // delta = 1e-100 puts the GLR threshold near 240, far above anything 1,234 trials can reach.
        SimulationConfig c = config(THREE, MONTE_CARLO, StoppingConfig.glr(1e-100).withBudgetTrials(1234), 100, 4,
                9L);
        SimulationResult r = Simulation.run(c, 2, SimulationProgress.NONE);
        for (SimulationRun run : r.ruleRuns()) {
            assertTrue(run.budgetStop(), run.toString());
            assertEquals(1234, run.trials());
            assertEquals(argmax(run.alpha()), run.pick(), run.toString());
        }
        assertEquals(4, r.rule().budgetStops());
        assertEquals(1234.0, r.baseline().meanTrials(), 0.0);
    }

    @Test
    void pairedRunsGiveEachRuleTheRunsItHasOnTheSameSeeds() {
        SimulationConfig c = small(5, 9L);
        SimulationResult alone = Simulation.run(c, 2, SimulationProgress.NONE);
        List<List<SimulationRun>> paired = Simulation.pairedRuns(c,
                List.of(AllocationMethod.UNIFORM, AllocationMethod.TOP_TWO_THOMPSON), 2);
        assertEquals(alone.baselineRuns(), paired.get(0));
        assertEquals(alone.ruleRuns(), paired.get(1));
        assertEquals("need at least one allocation rule and one thread, got 0 rules and 2 threads",
                assertThrows(IllegalArgumentException.class, () -> Simulation.pairedRuns(c, List.of(), 2))
                        .getMessage());
    }

    @Test
    void uniformRuleIsItsOwnBaseline() {
        SimulationConfig c = config(THREE, MONTE_CARLO.withRule(AllocationMethod.UNIFORM),
                StoppingConfig.glr(0.05).withBudgetTrials(5000), 10, 4, 4L);
        AtomicInteger calls = new AtomicInteger();
        SimulationResult r = Simulation.run(c, Runnable::run, (done, total) -> {
            calls.incrementAndGet();
            assertEquals(4, total);
        });
        assertEquals(4, calls.get());
        assertEquals(r.ruleRuns(), r.baselineRuns());
        assertEquals(AllocationMethod.UNIFORM, r.baseline().rule());
        assertEquals(1.0, r.trialRatio(), 0.0);
    }

    @Test
    void progressCountsEveryRunOfBothRules() {
        List<Integer> done = new ArrayList<>();
        Simulation.run(small(5, 8L), Runnable::run, (d, total) -> {
            assertEquals(10, total);
            done.add(d);
        });
        assertEquals(List.of(1, 2, 3, 4, 5, 6, 7, 8, 9, 10), done);
    }

    @Test
    void simulatedMeanTrialsStayAboveTheLowerBoundForBothMetrics() {
        // Garivier & Kaufmann (2016), Theorem 1: any delta-correct strategy has E[trials] >= T* kl(delta, 1 - delta).
        // The bound is on the expectation; the GLR rule's proven threshold needs several times more, so the mean
        // of 10 runs clears it with a wide margin.
        ArmModel value = ArmModel.gaussianStddevs(new double[] {1.0, 1.5, 0.8}, new double[] {1.0, 1.0, 2.0});
        for (ArmModel arms : List.of(THREE, value)) {
            EngineConfig engine = EngineConfig.defaults(arms.metric()).withMethod(EngineConfig.MethodChoice.MONTE_CARLO)
                    .withDraws(500);
            SimulationConfig c = config(arms, engine, StoppingConfig.glr(0.05).withBudgetTrials(100_000), 10, 10,
                    11L);
            SimulationResult r = Simulation.run(c, 2, SimulationProgress.NONE);
            double bound = OptimalAllocation.optimal(arms).lowerBoundTrials(0.05);
            assertTrue(r.rule().meanTrials() > bound, arms + ": " + r.rule() + " vs bound " + bound);
            assertTrue(r.baseline().meanTrials() > bound, arms + ": " + r.baseline() + " vs bound " + bound);
            assertEquals(0, r.rule().budgetStops(), r.rule().toString());
            assertTrue(r.rule().armShares()[1] > r.rule().armShares()[0], "best arm measured most: " + r.rule());
        }
    }

    @Test
    void configRejectsWhatTheSimulationCannotRun() {
        StoppingConfig glr = StoppingConfig.glr(0.05).withBudgetTrials(100);
        EngineConfig engine = EngineConfig.defaults(Metric.BERNOULLI);
        assertThrows(IllegalArgumentException.class, () -> config(THREE, engine, StoppingConfig.glr(0.05), 10, 1, 1));
        ArmModel values = ArmModel.gaussianStddevs(new double[] {1, 0}, new double[] {1, 1});
        IllegalArgumentException mixture = assertThrows(IllegalArgumentException.class,
                () -> config(values, EngineConfig.defaults(Metric.VALUE), glr.withRule(Rule.MIXTURE), 10, 1, 1));
        assertTrue(mixture.getMessage().contains("MIXTURE does not support VALUE arms"), mixture.getMessage());
        assertThrows(IllegalArgumentException.class,
                () -> config(THREE, engine, glr.withMinDuration(Duration.ofDays(1)), 10, 1, 1));
        assertThrows(IllegalArgumentException.class,
                () -> config(THREE, EngineConfig.defaults(Metric.VALUE), glr, 10, 1, 1));
        assertThrows(IllegalArgumentException.class, () -> config(THREE, engine, glr, 0, 1, 1));
        assertThrows(IllegalArgumentException.class, () -> config(THREE, engine, glr, 10, 0, 1));
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> new SimulationConfig(THREE, engine, glr, 10, 1, 1, -0.1));
        assertTrue(e.getMessage().contains("epsilon"), e.getMessage());
        assertEquals(Rule.GLR, config(THREE, engine, glr, 10, 1, 1).stopping().rule());
    }

    @Test
    void everyStoppingRuleRunsAndCompareKeepsTheirOrderOnTheSameSeeds() {
        // Well-separated arms (0.2, 0.5, 0.8), delta 0.05, epsilon 0.01 for the indifference rule: every rule
        // stops by itself well before the budget and names the best arm.
        StoppingConfig stop = StoppingConfig.indifference(0.05, 0.01).withBudgetTrials(20_000);
        SimulationConfig c = config(THREE, EngineConfig.defaults(Metric.BERNOULLI), stop, 20, 6, 3);
        List<Rule> rules = List.of(Rule.MIXTURE, Rule.INDIFFERENCE, Rule.GLR, Rule.GLR_HEURISTIC, Rule.POSTERIOR);
        List<StoppingComparison> rows = Simulation.compare(c, rules, Runnable::run, SimulationProgress.NONE);
        assertEquals(rules, rows.stream().map(StoppingComparison::stopping).toList());
        for (StoppingComparison row : rows) {
            assertEquals(0, row.summary().budgetStops(), row.toString());
            assertEquals(0, row.summary().errors(), row.toString());
            assertEquals(row.stopping().provenFor(Metric.BERNOULLI), row.proven());
            SimulationSummary alone = Simulation.run(c.withStopping(stop.withRule(row.stopping())), Runnable::run,
                    SimulationProgress.NONE).rule();
            assertEquals(alone, row.summary(), "the comparison is the single-rule simulation on the same seeds");
        }
    }

    private static int argmax(double[] x) {
        int best = 0;
        for (int i = 1; i < x.length; i++) {
            if (x[i] > x[best]) {
                best = i;
            }
        }
        return best;
    }
}
