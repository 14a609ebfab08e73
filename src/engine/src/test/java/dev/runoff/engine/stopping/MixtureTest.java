package dev.runoff.engine.stopping;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.best.ProbabilityBest;
import dev.runoff.engine.core.Arm;
import dev.runoff.engine.core.Metric;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.stats.ValueStats;
import java.time.Instant;
import java.util.List;
import org.junit.jupiter.api.Test;

class MixtureTest {
    private static final Timing NO_CLOCK = new Timing(Instant.EPOCH, Instant.EPOCH);

    private static Arm arm(String name, long trials, long successes) {
        return new Arm(name, new BernoulliStats(trials, successes));
    }

    private static ProbabilityBest exact(double... alpha) {
        return new ProbabilityBest(alpha, new double[alpha.length], ProbabilityBest.Method.EXACT, 0);
    }

    @Test
    void statisticMatchesTheClosedFormByHand() {
        // Closed form: under Beta(1, 1) one sequence of s successes and f failures has probability
        // B(s + 1, f + 1) = s! f! / (s + f + 1)!. For a = 8/10 and b = 2/10:
        // B(9, 3) = 8! 2! / 11! = 80640 / 39916800 = 1/495, and likewise B(3, 9) = 1/495.
        // Under mu_a <= mu_b the maximum likelihood is at the pooled rate 10/20 = 1/2: (1/2)^20.
        // log M = log((1/495)^2 / 2^-20) = log(1048576 / 245025) = 1.453830... (hand computation).
        double logM = Mixture.logRatio(new BernoulliStats(10, 8), new BernoulliStats(10, 2));
        assertEquals(Math.log(1048576.0 / 245025.0), logM, 1e-12);
        assertEquals(1.45383, logM, 1e-5);
    }

    @Test
    void anArmBehindItsChallengerHasNoEvidence() {
        // rate_a <= rate_b: the null's maximum is the unconstrained one, which the marginal likelihood cannot
        // exceed: log M = -2 log 495 - 2 (8 log 0.8 + 2 log 0.2) = -12.4... + 10.0... < 0 (hand computation).
        double logM = Mixture.logRatio(new BernoulliStats(10, 2), new BernoulliStats(10, 8));
        assertEquals(-2 * Math.log(495) - 2 * (8 * Math.log(0.8) + 2 * Math.log(0.2)), logM, 1e-12);
        assertTrue(logM < 0);
        assertEquals(0.0, Mixture.logRatio(BernoulliStats.EMPTY, BernoulliStats.EMPTY), 0.0);
    }

    @Test
    void statisticIsTheSmallestPairAgainstTheEmpiricalLeader() {
        List<Arm> arms = List.of(arm("a", 10, 2), arm("b", 10, 8), arm("c", 10, 5));
        Glr.Statistic m = Mixture.statistic(arms);
        assertEquals(1, m.leader());
        assertEquals(2, m.challenger());
        assertEquals(Mixture.logRatio(new BernoulliStats(10, 8), new BernoulliStats(10, 5)), m.value(), 0.0);
        assertEquals(30, m.trials());
    }

    @Test
    void thresholdIsLogOfArmsLessOneOverDelta() {
        assertEquals(Math.log(3 / 0.01), Mixture.threshold(4, 0.01), 1e-12);
        assertThrows(IllegalArgumentException.class, () -> Mixture.threshold(1, 0.01));
        assertThrows(IllegalArgumentException.class, () -> Mixture.threshold(2, 1.0));
    }

    @Test
    void theRuleStopsOnlyAboveItsThreshold() {
        // 80/100 vs 20/100: log M is far above log(1/0.05) = 3.0; 8/10 vs 2/10 (log M = 1.45) is below it.
        StoppingConfig config = StoppingConfig.glr(0.05).withRule(Rule.MIXTURE);
        Verdict stop = StoppingCheck.decide(List.of(arm("a", 100, 80), arm("b", 100, 20)), exact(1, 0), NO_CLOCK,
                config);
        assertEquals(VerdictReason.MIXTURE, stop.reason());
        assertEquals("a", stop.leaderName());
        assertEquals(Math.log(1 / 0.05), stop.threshold(), 1e-12);
        Verdict wait = StoppingCheck.decide(List.of(arm("a", 10, 8), arm("b", 10, 2)), exact(0.99, 0.01), NO_CLOCK,
                config);
        assertEquals(VerdictReason.BELOW_THRESHOLD, wait.reason());
        assertEquals(Math.log(1048576.0 / 245025.0), wait.statistic(), 1e-12);
    }

    @Test
    void valueArmsAreRefusedByName() {
        List<Arm> arms = List.of(new Arm("a", ValueStats.EMPTY.add(1).add(2)), new Arm("b", ValueStats.EMPTY.add(3)));
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> Mixture.statistic(arms));
        assertTrue(e.getMessage().contains("Bernoulli arms only"), e.getMessage());
        assertTrue(!Rule.MIXTURE.supports(Metric.VALUE) && Rule.MIXTURE.supports(Metric.BERNOULLI));
    }

    @Test
    void theHeuristicRuleUsesTheLighterThresholdWhateverTheConfiguredOne() {
        StoppingConfig config = StoppingConfig.glr(0.05).withRule(Rule.GLR_HEURISTIC);
        List<Arm> arms = List.of(arm("a", 150, 90), arm("b", 150, 60));
        Verdict d = StoppingCheck.decide(arms, exact(0.99, 0.01), NO_CLOCK, config);
        assertEquals(GlrThreshold.lighterNotProven(300, 0.05), d.threshold(), 1e-12);
        // Statistic 6.04 (see StoppingCheckTest) > log((1 + log 300)/0.05) = 4.87 < proven log(2*300/0.05) = 9.39.
        assertEquals(VerdictReason.GLR_HEURISTIC, d.reason());
        assertEquals(VerdictReason.BELOW_THRESHOLD,
                StoppingCheck.decide(arms, exact(0.99, 0.01), NO_CLOCK, StoppingConfig.glr(0.05)).reason());
    }

    @Test
    void onlyTheProvenRulesClaimAGuarantee() {
        assertTrue(Rule.GLR.provenFor(Metric.BERNOULLI));
        assertTrue(Rule.MIXTURE.provenFor(Metric.BERNOULLI));
        for (Rule r : List.of(Rule.GLR_HEURISTIC, Rule.POSTERIOR, Rule.INDIFFERENCE)) {
            assertTrue(!r.provenFor(Metric.BERNOULLI) && !r.provenFor(Metric.VALUE), r.name());
        }
    }
}
