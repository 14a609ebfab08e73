package dev.runoff.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.runoff.engine.planning.ArmModel;
import dev.runoff.engine.planning.OptimalAllocation;
import dev.runoff.engine.planning.TargetAllocation;
import java.util.List;
import java.util.Locale;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/** {@code runoff plan} run in-process with captured output. */
class PlanCommandTest {
    /** Three well-separated arms, so that a few simulated runs take a fraction of a second. */
    private static final String[] SMALL = {"plan", "--rates", "0.7,0.4,0.3", "--delta", "0.1", "--simulate", "4",
        "--batch", "50"};

    private static EvaluateCommandTest.Run run(String... args) {
        return EvaluateCommandTest.run(args);
    }

    private static String[] small(String... more) {
        String[] args = new String[SMALL.length + more.length];
        System.arraycopy(SMALL, 0, args, 0, SMALL.length);
        System.arraycopy(more, 0, args, SMALL.length, more.length);
        return args;
    }

    private static JsonNode json(EvaluateCommandTest.Run r) throws Exception {
        assertEquals(0, r.exitCode(), r.err());
        assertEquals(1, r.out().lines().count(), r.out());
        return new ObjectMapper().readTree(r.out());
    }

    @Test
    void aGuardrailRateAddsTheUnitsBeforeAnArmAsGoodAsTheControlPasses() throws Exception {
        long units = dev.runoff.engine.guardrail.GuardrailPlan.unitsToPass(0.02, 0.2,
                dev.runoff.engine.guardrail.Direction.HIGHER_IS_WORSE, 0.05);
        EvaluateCommandTest.Run r = run("plan", "--rates", "0.05,0.06", "--simulate", "0", "--guardrail-rate", "0.02",
                "--guardrail-margin", "0.2");
        assertEquals(0, r.exitCode(), r.err());
        assertTrue(r.out().contains(String.format(java.util.Locale.ROOT, "%,d units per arm", units)), r.out());
        JsonNode guardrail = json(run("plan", "--rates", "0.05,0.06", "--simulate", "0", "--guardrail-rate", "0.02",
                "--guardrail-margin", "0.2", "--json")).get("guardrail");
        assertEquals(units, guardrail.get("unitsPerArm").asLong());
        EvaluateCommandTest.Run bad = run("plan", "--rates", "0.05,0.06", "--simulate", "0", "--guardrail-rate", "1.5");
        assertEquals(2, bad.exitCode());
        assertTrue(bad.err().contains("--guardrail-rate 1.5: rate must be in"), bad.err());
    }

    @Test
    void textHasThePlanningAndSimulationSections() {
        EvaluateCommandTest.Run r = run(SMALL);
        assertEquals(0, r.exitCode(), r.err());
        assertEquals("", r.err(), "no progress bar without a terminal");
        String out = r.out();
        List<String> lines = out.lines().toList();
        assertEquals("Plan for 3 Bernoulli arms, delta 0.1, epsilon 0", lines.get(0));
        assertTrue(lines.contains("Planning (asymptotic)"), out);
        assertTrue(lines.stream().anyMatch(l -> l.matches("arm +rate +optimal +beta-optimal +uniform")), out);
        assertTrue(lines.stream().anyMatch(l -> l.matches("arm3 +0\\.3 +0\\.\\d{4} +0\\.\\d{4} +0\\.3333")), out);
        assertTrue(out.contains("T* = "), out);
        assertTrue(out.contains("Simulation: 4 runs per rule, batch 50, glr stopping"), out);
        for (String row : List.of("mean trials", "median trials", "90th percentile trials", "wrong picks",
                "error rate", "95% interval (Clopper-Pearson)", "budget stops", "traffic share arm1",
                "traffic share arm3", "mean trials top-two-thompson / uniform: ")) {
            assertTrue(lines.stream().anyMatch(l -> l.startsWith(row)), row + " in\n" + out);
        }
        assertTrue(lines.stream().anyMatch(l -> l.matches(" +top-two-thompson +uniform")), out);
    }

    @Test
    void jsonHasTheDocumentedShapeWithArraysInArmOrder() throws Exception {
        JsonNode root = json(run(small("--json")));
        TargetAllocation optimal = OptimalAllocation.optimal(ArmModel.bernoulli(0.7, 0.4, 0.3));
        JsonNode weights = root.get("optimalWeights");
        assertEquals(3, weights.size());
        for (int a = 0; a < 3; a++) {
            assertEquals(optimal.weight(a), weights.get(a).asDouble(), 0.0);
        }
        assertEquals(optimal.characteristicTime(), root.get("characteristicTime").asDouble(), 0.0);
        assertEquals(Math.round(optimal.predictedTrials(0.1)), root.get("predictedTrials").asLong());
        JsonNode sim = root.get("simulation");
        assertEquals("top-two-thompson", sim.get("rule").asText());
        assertEquals("glr", sim.get("stopping").asText());
        assertEquals(4, sim.get("replications").asInt());
        // delta 0.1: log(1/delta) = 2.3 is below the floor 3 of the default budget
        assertEquals(PlanCommand.BUDGET_FACTOR * Math.round(optimal.characteristicTime() * 3),
                sim.get("budgetTrials").asLong());
        JsonNode base = root.get("baseline");
        assertEquals("uniform", base.get("rule").asText());
        for (JsonNode s : List.of(sim, base)) {
            for (String field : List.of("meanTrials", "medianTrials", "p90Trials", "errorRate", "budgetStops")) {
                assertTrue(s.get(field).isNumber(), field + " in " + s);
            }
            assertEquals("clopper-pearson", s.get("errorInterval").get("method").asText());
            assertEquals(3, s.get("armShares").size());
            double total = 0;
            for (JsonNode share : s.get("armShares")) {
                total += share.asDouble();
            }
            assertEquals(1.0, total, 1e-12);
        }
        assertEquals(sim.get("meanTrials").asDouble() / base.get("meanTrials").asDouble(),
                root.get("trialRatio").asDouble(), 1e-12);
    }

    @Test
    void issueExampleGivesThePublishedWeightsAndPrediction() throws Exception {
        JsonNode root = json(run("plan", "--rates", "0.5,0.45,0.43,0.4", "--delta", "0.01", "--simulate", "0",
                "--json"));
        // Garivier & Kaufmann (2016), "Optimal Best Arm Identification with Fixed Confidence", COLT:
        // w*(0.5, 0.45, 0.43, 0.4) = (0.417, 0.390, 0.136, 0.057); T* = 989.8 and T* log(100) = 4558 are the
        // figures of the issue's example output.
        double[] published = {0.417, 0.390, 0.136, 0.057};
        for (int a = 0; a < 4; a++) {
            assertEquals(published[a], root.get("optimalWeights").get(a).asDouble(), 0.001);
        }
        assertEquals(989.8, root.get("characteristicTime").asDouble(), 0.05);
        assertEquals(4558, root.get("predictedTrials").asLong());
        assertFalse(root.has("simulation"), root.toString());
        assertEquals("beta-optimal", root.get("ruleTarget").get("kind").asText());
        assertFalse(run("plan", "--rates", "0.5,0.45,0.43,0.4", "--simulate", "0").out().contains("Simulation"));
    }

    @Test
    void printsTheEvidenceRatesOfTheHalfOptimalAndUniformSplits() throws Exception {
        // Garivier & Kaufmann (2016)'s first instance: Gamma*_1/2 = 1 / T_1/2 (Russo 2020's rate at the
        // beta-optimal split and Garivier & Kaufmann's characteristic time of that split share one definition),
        // and the uniform split's rate is 1 / T_uniform; per 1,000 trials.
        ArmModel model = ArmModel.bernoulli(0.5, 0.45, 0.43, 0.4);
        double half = 1000 / OptimalAllocation.betaOptimal(model, 0.5).characteristicTime();
        double uniform = 1000 / OptimalAllocation.uniform(model).characteristicTime();
        JsonNode root = json(run("plan", "--rates", "0.5,0.45,0.43,0.4", "--simulate", "0", "--json"));
        assertEquals(half, root.get("betaOptimalRatePer1000Trials").asDouble(), 1e-9 * half);
        assertEquals(uniform, root.get("uniformRatePer1000Trials").asDouble(), 1e-9 * uniform);
        assertEquals(1000 / root.get("characteristicTime").asDouble(), root.get("optimalRatePer1000Trials").asDouble(),
                1e-12);
        String text = run("plan", "--rates", "0.5,0.45,0.43,0.4", "--simulate", "0").out();
        assertTrue(text.contains(String.format(Locale.ROOT, "Gamma*_beta %.3f at beta 0.5; uniform split %.3f;", half,
                uniform)), text);
        JsonNode tied = json(run("plan", "--rates", "0.6,0.6,0.2", "--epsilon", "0.01", "--simulate", "0", "--json"));
        assertTrue(tied.get("betaOptimalRatePer1000Trials").isNull(), tied.toString());
    }

    @Test
    void theAdaptiveLeaderShareIsSimulatedWithoutABetaOptimalColumn() {
        EvaluateCommandTest.Run r = run(small("--rule", "top-two-adaptive"));
        assertEquals(0, r.exitCode(), r.err());
        List<String> lines = r.out().lines().toList();
        assertTrue(lines.stream().anyMatch(l -> l.matches("arm +rate +optimal +uniform")), r.out());
        assertFalse(r.out().contains("beta-optimal"), r.out());
        assertTrue(lines.stream().anyMatch(l -> l.matches(" +top-two-adaptive +uniform")), r.out());
    }

    @Test
    void defaultBudgetIsTwentyTimesThePredictedTrialsForSmallDelta() throws Exception {
        JsonNode root = json(run("plan", "--rates", "0.7,0.4,0.3", "--delta", "0.01", "--simulate", "1", "--json"));
        assertEquals(20 * root.get("predictedTrials").asLong(), root.get("simulation").get("budgetTrials").asLong());
    }

    @Test
    void outputDependsOnTheSeedButNotOnTheThreads() {
        String one = run(small("--json", "--threads", "1", "--seed", "5")).out();
        assertEquals(one, run(small("--json", "--threads", "2", "--seed", "5")).out());
        assertFalse(one.equals(run(small("--json", "--threads", "2", "--seed", "6")).out()));
    }

    @Test
    void valueMetricTakesMeansAndStandardDeviations() throws Exception {
        JsonNode root = json(run("plan", "--means", "1.0,2.0", "--stddev", "1,2", "--delta", "0.1", "--simulate",
                "2", "--batch", "20", "--json"));
        assertEquals("value", root.get("metric").asText());
        assertEquals(2.0, root.get("stddevs").get(1).asDouble(), 0.0);
        assertEquals(2, root.get("simulation").get("armShares").size());
        JsonNode common = json(run("plan", "--means", "1.0,2.0,1.5", "--stddev", "1", "--simulate", "0", "--json"));
        assertEquals(1.0, common.get("stddevs").get(2).asDouble(), 0.0);
    }

    @Test
    void tiedBestArmsWithAnIndifferenceZoneSimulateWithoutAPrediction() throws Exception {
        JsonNode root = json(run("plan", "--rates", "0.6,0.6,0.2", "--epsilon", "0.01", "--delta", "0.1",
                "--budget-trials", "300", "--simulate", "2", "--batch", "100", "--rule", "uniform", "--json"));
        assertTrue(root.get("optimalWeights").isNull(), root.toString());
        assertTrue(root.get("predictedTrials").isNull(), root.toString());
        assertEquals(0, root.get("simulation").get("errors").asInt(), "either tied arm is a right pick");
        assertEquals(300, root.get("simulation").get("budgetTrials").asLong());
    }

    @Test
    void helpListsThePlanCommandAndItsOptions() {
        assertTrue(run("--help").out().contains("plan"));
        EvaluateCommandTest.Run r = run("plan", "--help");
        assertEquals(0, r.exitCode());
        for (String option : List.of("--rates", "--means", "--stddev", "--delta", "--epsilon", "--rule", "--beta",
                "--stopping", "--batch", "--simulate", "--seed", "--budget-trials", "--threads", "--json")) {
            assertTrue(r.out().contains(option), option);
        }
    }

    @Test
    void stoppingAllPrintsOneRowPerRuleInOneTable() {
        EvaluateCommandTest.Run r = run(small("--stopping", "all", "--epsilon", "0.05"));
        assertEquals(0, r.exitCode(), r.err());
        List<String> lines = r.out().lines().toList();
        assertTrue(lines.contains("Stopping rules: 4 runs each on the same seeds, top-two-thompson, batch 50,"
                + " budget 1540 trials per run, seed 1"), r.out());
        assertTrue(lines.stream().anyMatch(l -> l.matches("stopping +proven +mean trials +median trials +90th"
                + " percentile trials +wrong picks +error rate +95% interval \\(Clopper-Pearson\\) +budget stops")),
                r.out());
        for (String row : List.of("glr +yes", "posterior +NO", "indifference +NO", "glr-heuristic +NO", "mixture +yes")) {
            assertEquals(1, lines.stream().filter(l -> l.matches(row + " +\\d+\\.\\d +\\d+\\.\\d +\\d+ +\\d+/4"
                    + " +\\d\\.\\d{4} +\\[\\d\\.\\d{4}, \\d\\.\\d{4}\\] +\\d+")).count(), row + " in\n" + r.out());
        }
        assertFalse(r.out().contains("traffic share"), "no uniform baseline table with --stopping all");
    }

    @Test
    void stoppingAllInJsonIsAnArrayWithTheDocumentedKeys() throws Exception {
        JsonNode root = json(run(small("--stopping", "all", "--json")));
        JsonNode rows = root.get("stoppingComparison");
        // no --epsilon: no indifference zone, so the indifference rule is left out
        assertEquals(4, rows.size(), rows.toString());
        List<String> names = new java.util.ArrayList<>();
        for (JsonNode row : rows) {
            names.add(row.get("stopping").asText());
            for (String key : List.of("meanTrials", "medianTrials", "p90Trials", "errorRate")) {
                assertTrue(row.get(key).isNumber(), key + " in " + row);
            }
            assertTrue(row.get("proven").isBoolean(), row.toString());
            JsonNode interval = row.get("errorInterval");
            assertEquals("clopper-pearson", interval.get("method").asText());
            assertTrue(interval.get("lower").asDouble() <= row.get("errorRate").asDouble()
                    && row.get("errorRate").asDouble() <= interval.get("upper").asDouble(), row.toString());
        }
        assertEquals(List.of("glr", "posterior", "glr-heuristic", "mixture"), names);
        assertEquals(List.of(true, false, false, true),
                List.of(rows.get(0).get("proven").asBoolean(), rows.get(1).get("proven").asBoolean(),
                        rows.get(2).get("proven").asBoolean(), rows.get(3).get("proven").asBoolean()));
        assertEquals(4, root.get("stoppingComparisonSettings").get("replications").asInt());
        assertFalse(root.has("simulation"), "no single-rule simulation with --stopping all");
    }

    @Test
    void stoppingAllOnValueArmsComparesSequentialTAsTheOnlyProvenRuleAndLeavesOutTheMixtureRule() throws Exception {
        JsonNode rows = json(run("plan", "--means", "1,0", "--stddev", "1", "--delta", "0.1", "--simulate", "2",
                "--batch", "50", "--stopping", "all", "--json")).get("stoppingComparison");
        List<String> names = new java.util.ArrayList<>();
        for (JsonNode row : rows) {
            names.add(row.get("stopping").asText());
            assertEquals(row.get("stopping").asText().equals("sequential-t"), row.get("proven").asBoolean(),
                    row.toString());
        }
        assertEquals(List.of("glr", "posterior", "glr-heuristic", "sequential-t"), names);
    }

    @ParameterizedTest
    @CsvSource(delimiter = '|', value = {
        "--rates 0.5,1.2|--rates 0.5,1.2: rate of arm2 must be in (0.0, 1.0), got 1.2",
        "--rates 0,0.5|--rates 0,0.5: rate of arm1 must be in (0.0, 1.0), got 0.0",
        "--rates 0.5,0.3,0.5|--rates: arm1 and arm3 share the best mean 0.5; the best arm is not unique: give an"
            + " indifference zone --epsilon > 0",
        "--rates 0.5,0.5 --epsilon 0.01|give --budget-trials",
        "--rates 0.5,0.4 --delta 1.5|--delta 1.5: delta must be in (0.0, 1.0), got 1.5",
        "--rates 0.5,0.4 --delta 0|--delta 0.0: delta must be in (0.0, 1.0), got 0.0",
        "--rates 0.5,0.4 --epsilon -1|--epsilon -1.0: epsilon must be a finite number >= 0, got -1.0",
        "--rates 0.5,0.4 --beta 2|--beta 2.0: beta must be in [0.0, 1.0], got 2.0",
        "--rates 0.5,0.4 --rule best|Invalid value for option '--rule': 'best' is not one of",
        "--rates 0.5,0.4 --stopping best|'best' is not one of glr, posterior, indifference, glr-heuristic, mixture,"
            + " sequential-t, all",
        "--rates 0.5,0.4 --stopping indifference|--stopping indifference needs an indifference zone --epsilon > 0",
        "--means 1,2 --stddev 1 --stopping mixture|--stopping mixture is for --rates (Bernoulli arms) only",
        "--rates 0.5,0.4 --stopping sequential-t|--stopping sequential-t is for --means (value arms) only",
        "--rates 0.5,0.4 --batch 0|--batch must be >= 1, got 0",
        "--rates 0.5,0.4 --simulate -1|--simulate must be >= 0, got -1",
        "--rates 0.5,0.4 --threads 0|--threads must be >= 1, got 0",
        "--rates 0.5,x|Invalid value for option '--rates'",
        "--rates 0.5|need at least 2 arms, got 1",
        "--delta 0.1|give either --rates (Bernoulli) or --means with --stddev (value metric)",
        "--rates 0.5,0.4 --means 1,2|give either --rates (Bernoulli) or --means with --stddev",
        "--means 1,2|--means needs --stddev",
        "--means 1,2,3 --stddev 1,2|--stddev: give one value or one per arm (3), got 2",
        "--means 1,2 --stddev 1,-1|--means 1,2: standard deviation of arm2 must be a finite number > 0, got -1.0",
    })
    void badArgumentsGiveOneLineAndExitCodeTwo(String args, String expected) {
        EvaluateCommandTest.Run r = run(("plan " + args).split(" "));
        assertEquals(2, r.exitCode(), r.err());
        assertEquals("", r.out());
        assertEquals(1, r.err().lines().count(), r.err());
        assertTrue(r.err().startsWith("runoff plan: "), r.err());
        assertTrue(r.err().contains(expected), r.err());
        assertFalse(r.err().contains("Usage") || r.err().contains("\tat "), r.err());
    }
}
