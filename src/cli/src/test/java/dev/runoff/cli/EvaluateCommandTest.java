package dev.runoff.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.runoff.engine.AllocationEngine;
import dev.runoff.engine.core.Arm;
import dev.runoff.engine.EngineConfig;
import dev.runoff.engine.EngineVersion;
import dev.runoff.engine.Evaluation;
import dev.runoff.engine.core.Metric;
import dev.runoff.engine.stats.BernoulliStats;
import java.io.PrintWriter;
import java.io.StringWriter;
import java.util.List;
import java.util.Locale;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/** {@code runoff evaluate} run in-process with captured output. */
class EvaluateCommandTest {
    private static final String[] README_EXAMPLE = {"evaluate", "--arm", "a=120/1000", "--arm", "b=135/1000",
        "--arm", "c=110/1000"};

    /** Exit code, standard output and standard error of one run. */
    record Run(int exitCode, String out, String err) {
    }

    static Run run(String... args) {
        StringWriter out = new StringWriter();
        StringWriter err = new StringWriter();
        int code = Main.commandLine().setOut(new PrintWriter(out)).setErr(new PrintWriter(err)).execute(args);
        return new Run(code, out.toString(), err.toString());
    }

    private static String[] with(String... more) {
        String[] args = new String[README_EXAMPLE.length + more.length];
        System.arraycopy(README_EXAMPLE, 0, args, 0, README_EXAMPLE.length);
        System.arraycopy(more, 0, args, README_EXAMPLE.length, more.length);
        return args;
    }

    private static Evaluation engineResult() {
        return engineResult(new AllocationEngine());
    }

    private static Evaluation engineResult(AllocationEngine engine) {
        List<Arm> arms = List.of(new Arm("a", new BernoulliStats(1000, 120)), new Arm("b", new BernoulliStats(1000, 135)),
                new Arm("c", new BernoulliStats(1000, 110)));
        return engine.evaluate(arms, EngineConfig.defaults(Metric.BERNOULLI), 0L);
    }

    @Test
    void engineVersionOptionChoosesTheArithmeticAndTheReportNamesIt() throws Exception {
        for (EngineVersion version : EngineVersion.values()) {
            JsonNode root = new ObjectMapper().readTree(run(with("--json", "--engine-version", version.label())).out());
            Evaluation e = engineResult(new AllocationEngine(version));
            assertEquals(version.label(), root.get("engineVersion").asText());
            assertEquals(e.probabilityBest().draws(), root.get("draws").asInt());
            assertEquals(e.probabilityBest().alpha(1), root.get("arms").get(1).get("pBest").asDouble(), 0.0);
        }
        assertEquals(run(with("--json")).out(), run(with("--json", "--engine-version", AllocationEngine.VERSION)).out());
    }

    @Test
    void tableShowsEachArmWithTheEnginesNumbersAndABar() {
        Run r = run(README_EXAMPLE);
        assertEquals(0, r.exitCode(), r.err());
        assertEquals("", r.err());
        Evaluation e = engineResult();
        List<String> lines = r.out().lines().toList();
        assertTrue(lines.get(1).startsWith("P(best) by Monte Carlo, " + e.probabilityBest().draws()
                + " draws; rule top-two-thompson, beta 0.5; seed 0; engine " + AllocationEngine.VERSION), lines.get(1));
        String header = lines.get(3);
        for (String column : List.of("arm", "trials", "rate", "posterior mean", "95% interval", "P(best)", "std. error",
                "weight")) {
            assertTrue(header.contains(column), column + " in " + header);
        }
        for (int i = 0; i < 3; i++) {
            String row = lines.get(4 + i);
            assertTrue(row.startsWith(e.arms().get(i) + " "), row);
            assertTrue(row.contains(String.format(Locale.ROOT, "%.4f", e.probabilityBest().alpha(i))), row);
            assertTrue(row.contains(String.format(Locale.ROOT, "%.4f  ", e.weight(i)) + TableReport.bar(e.weight(i)).strip()),
                    row);
            assertTrue(row.contains("█"), row);
        }
    }

    @Test
    void barsHaveFortyEighthsPerUnitWeight() {
        assertEquals("█".repeat(20) + " ", TableReport.bar(0.5));
        assertEquals("█".repeat(2) + "▌", TableReport.bar(0.0625));
        assertEquals(" ", TableReport.bar(0.0));
    }

    @Test
    void jsonIsOneObjectWithTheDocumentedShape() throws Exception {
        Run r = run(with("--json"));
        assertEquals(0, r.exitCode(), r.err());
        assertEquals(1, r.out().lines().count());
        JsonNode root = new ObjectMapper().readTree(r.out());
        assertEquals("monte-carlo", root.get("method").asText());
        assertEquals("top-two-thompson", root.get("rule").asText());
        assertEquals(0.5, root.get("beta").asDouble());
        assertEquals(AllocationEngine.VERSION, root.get("engineVersion").asText());
        JsonNode arms = root.get("arms");
        assertEquals(3, arms.size());
        Evaluation e = engineResult();
        double weights = 0;
        for (int i = 0; i < 3; i++) {
            JsonNode arm = arms.get(i);
            assertEquals(e.arms().get(i), arm.get("name").asText());
            assertEquals(1000, arm.get("trials").asLong());
            assertEquals(e.probabilityBest().alpha(i), arm.get("pBest").asDouble(), 0.0);
            assertEquals(e.probabilityBest().standardError(i), arm.get("standardError").asDouble(), 0.0);
            assertEquals(e.weight(i), arm.get("weight").asDouble(), 0.0);
            assertEquals("beta", arm.get("posterior").get("family").asText());
            weights += arm.get("weight").asDouble();
        }
        assertEquals(1.0, weights, 1e-12);
        assertEquals(121.0, arms.get(0).get("posterior").get("a").asDouble());
    }

    @Test
    void monteCarloReportsDrawsAndStandardErrors() throws Exception {
        Run r = run(with("--json", "--method", "monte-carlo", "--draws", "5000", "--seed", "9"));
        assertEquals(0, r.exitCode(), r.err());
        JsonNode root = new ObjectMapper().readTree(r.out());
        assertEquals("monte-carlo", root.get("method").asText());
        int draws = root.get("draws").asInt();
        assertTrue(draws >= 1000 && draws <= 5000, "draws " + draws);
        assertEquals(9, root.get("seed").asLong());
        for (JsonNode arm : root.get("arms")) {
            double p = arm.get("pBest").asDouble();
            // Binomial standard error of a proportion over the draws made.
            assertEquals(Math.sqrt(p * (1 - p) / draws), arm.get("standardError").asDouble(), 1e-15);
        }
        assertEquals(r.out(), run(with("--json", "--method", "monte-carlo", "--draws", "5000", "--seed", "9")).out());
    }

    @Test
    void armsThatWinNoDrawShowTheClopperPearsonBoundAndTheirConditionalEstimate() throws Exception {
        String[] args = {"evaluate", "--arm", "a=10/1000", "--arm", "b=500/1000", "--arm", "c=20/1000",
            "--engine-version", "1.2"};
        Run table = run(args);
        assertEquals(0, table.exitCode(), table.err());
        // One-sided 95% Clopper-Pearson bound at 0 of 10,000: 1 - 0.05^(1/10000) = 3.0e-4 (Clopper and Pearson
        // 1934; scipy beta.ppf(0.95, 1, 10000) = 0.0002995).
        assertTrue(table.out().contains("a, c won none of 10000 draws: P(best) < 3.0e-04"), table.out());
        String[] json = java.util.Arrays.copyOf(args, args.length + 1);
        json[args.length] = "--json";
        JsonNode arms = new ObjectMapper().readTree(run(json).out()).get("arms");
        assertTrue(arms.get(0).get("wonNoDraw").asBoolean() && arms.get(0).get("pBest").asDouble() > 0, arms.toString());
        assertEquals(0.00029952835977661195, arms.get(0).get("zeroWinUpperBound").asDouble(), 1e-15);
        assertTrue(arms.get(1).get("wonNoDraw") == null, arms.toString());
    }

    @Test
    void valueArmsTakeCountMeanAndStandardDeviation() throws Exception {
        Run r = run("evaluate", "--metric", "value", "--arm", "a=400:2.5:4", "--arm", "b=400:2.9:4.2",
                "--rule", "top-two-ei", "--json");
        assertEquals(0, r.exitCode(), r.err());
        JsonNode arm = new ObjectMapper().readTree(r.out()).get("arms").get(1);
        assertEquals(2.9, arm.get("mean").asDouble(), 1e-12);
        assertEquals(4.2, arm.get("stddev").asDouble(), 1e-12);
        assertEquals("student-t", arm.get("posterior").get("family").asText());
    }

    @Test
    void guardsAreShownWhenActive() {
        Run r = run(with("--control", "a=0.3", "--floor", "0.05"));
        assertEquals(0, r.exitCode(), r.err());
        assertTrue(r.out().contains("guards active: control-share"), r.out());
        assertTrue(r.out().contains("rule weight"), r.out());
        assertTrue(r.out().lines().anyMatch(l -> l.startsWith("a ") && l.contains("0.3000  ")), r.out());
    }

    @ParameterizedTest
    @CsvSource(delimiter = '|', value = {
        "--arm a=1/2 --arm b=1/2 --bogus|Unknown option: '--bogus'",
        "--json|Missing required option: '--arm=ARM'",
        "--arm a=1200/1000 --arm b=1/2|'a=1200/1000': arm 'a': successes (1200) must not exceed trials (1000)",
        "--arm a=-3/10 --arm b=1/2|'a=-3/10': arm 'a': successes must be >= 0, got -3",
        "--arm a=12 --arm b=1/2|'a=12': arm 'a': expected SUCCESSES/TRIALS or COUNT:MEAN:STDDEV, got '12'",
        "--arm 12 --arm b=1/2|'12': expected NAME=SUCCESSES/TRIALS or NAME=COUNT:MEAN:STDDEV",
        "--arm a=x/10 --arm b=1/2|arm 'a': successes must be a whole number, got 'x'",
        "--arm a=1/2 --arm a=3/4|duplicate arm name 'a'",
        "--arm a=1/2|at least two arms are needed, got 1",
        "--arm a=1/2 --arm b=3/4 --beta 1.5|--beta 1.5: beta must be in [0.0, 1.0], got 1.5",
        "--arm a=1/2 --arm b=3/4 --rule best|Invalid value for option '--rule': 'best' is not one of",
        "--arm a=1/2 --arm b=3/4 --draws 0|--draws 0: draws must be >= 1, got 0",
        "--arm a=1/2 --arm b=3/4 --engine-version 1.1|--engine-version 1.1: engine version '1.1' is not supported;"
            + " supported: 1.2, 1.3",
        "--arm a=1/2 --arm b=3/4 --prior 1,0|--prior 1.0,0.0: prior b must be a finite number > 0, got 0.0",
        // the floor and the message of definitions (DefinitionRules, metric.prior.a / .b)
        "--arm a=0/10 --arm b=0/20 --prior 0.02,1|--prior 0.02,1.0: prior a must be >= 0.03 (smaller Beta shapes"
            + " lose probability mass in the exact P(best) integration), got 0.02",
        "--arm a=1/2 --arm b=3/4 --floor 0.6|floor 0.6 times 2 arms = 1.2 exceeds 1",
        "--arm a=1/2 --arm b=3/4 --control z=0.2|control arm 'z' is not one of the arms [a, b]",
        "--arm a=10:1:1 --arm b=10:2:1|--arm a: COUNT:MEAN:STDDEV needs --metric value",
        "--metric value --arm a=10:NaN:1 --arm b=10:2:1|'a=10:NaN:1': arm 'a': mean must be finite, got NaN",
        "--metric value --arm a=10:1:-1 --arm b=10:2:1|arm 'a': standard deviation must be finite and >= 0, got -1.0",
    })
    void badArgumentsGiveOneLineNamingTheArgumentAndExitCodeTwo(String args, String expected) {
        String[] split = ("evaluate " + args).split(" ");
        Run r = run(split);
        assertEquals(2, r.exitCode());
        assertEquals("", r.out());
        assertEquals(1, r.err().lines().count(), r.err());
        assertTrue(r.err().startsWith("runoff evaluate: "), r.err());
        assertTrue(r.err().contains(expected), r.err());
        assertFalse(r.err().contains("Usage") || r.err().contains("\tat "), r.err());
    }
}
