package dev.runoff.engine.stopping;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.core.Arm;
import dev.runoff.engine.best.ExactProbabilityBest;
import dev.runoff.engine.best.MonteCarloProbabilityBest;
import dev.runoff.engine.best.ProbabilityBest;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.posterior.StudentTPosterior;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.stats.ValueStats;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import org.apache.commons.math3.analysis.integration.IterativeLegendreGaussIntegrator;
import org.apache.commons.math3.distribution.BetaDistribution;
import org.apache.commons.math3.distribution.NormalDistribution;
import org.apache.commons.math3.stat.interval.WilsonScoreInterval;
import org.junit.jupiter.api.Test;

class StoppingCheckTest {
    private static final Instant START = Instant.parse("2026-03-02T09:00:00Z");
    private static final Timing ONE_DAY = new Timing(START, START.plus(Duration.ofDays(1)));

    private static Arm bernoulli(String name, long trials, long successes) {
        return new Arm(name, new BernoulliStats(trials, successes));
    }

    private static ProbabilityBest exact(double... alpha) {
        return new ProbabilityBest(alpha, new double[alpha.length], ProbabilityBest.Method.EXACT, 0);
    }

    private static ProbabilityBest monteCarlo(double[] alpha, int draws) {
        double[] se = new double[alpha.length];
        for (int i = 0; i < alpha.length; i++) {
            se[i] = Math.sqrt(alpha[i] * (1 - alpha[i]) / draws);
        }
        return new ProbabilityBest(alpha, se, ProbabilityBest.Method.MONTE_CARLO, draws);
    }

    /** A = 60%, B = 40% of 150 trials each: Z = 300 (0.6 ln 1.2 + 0.4 ln 0.8) = 6.04 (hand computation). */
    private static List<Arm> moderateGap() {
        return List.of(bernoulli("A", 150, 90), bernoulli("B", 150, 60));
    }

    /** A = 60%, B = 40% of 2000 trials each: Z = 80.5, far above any threshold used here. */
    private static List<Arm> largeGap() {
        return List.of(bernoulli("A", 2000, 1200), bernoulli("B", 2000, 800));
    }

    @Test
    void glrStopsWhenTheStatisticExceedsTheProvenThreshold() {
        Verdict d = StoppingCheck.decide(largeGap(), exact(0.999, 0.001), ONE_DAY, StoppingConfig.glr(0.05));
        assertEquals(Verdict.Action.STOP, d.action());
        assertEquals(VerdictReason.GLR, d.reason());
        assertEquals("glr", d.reason().label());
        assertEquals(0, d.leader());
        assertEquals("A", d.leaderName());
        assertEquals(0.999, d.leaderConfidence());
        // Garivier & Kaufmann (2016): statistic 4000 (0.6 ln 1.2 + 0.4 ln 0.8), threshold log(2 t (K-1)/delta).
        assertEquals(4000 * (0.6 * Math.log(1.2) + 0.4 * Math.log(0.8)), d.statistic(), 1e-9);
        assertEquals(Math.log(2.0 * 4000 / 0.05), d.threshold(), 1e-12);
    }

    @Test
    void glrContinuesBelowTheProvenThresholdButTheLighterOneStops() {
        // Z = 6.04 (hand computation); proven log(2 * 300 / 0.05) = 9.39; lighter log((1 + ln 300)/0.05) = 4.90.
        Verdict proven = StoppingCheck.decide(moderateGap(), exact(0.99, 0.01), ONE_DAY, StoppingConfig.glr(0.05));
        assertEquals(Verdict.Action.CONTINUE, proven.action());
        assertEquals(VerdictReason.BELOW_THRESHOLD, proven.reason());
        assertEquals(300 * (0.6 * Math.log(1.2) + 0.4 * Math.log(0.8)), proven.statistic(), 1e-9);
        assertEquals(Math.log(2.0 * 300 / 0.05), proven.threshold(), 1e-12);

        Verdict lighter = StoppingCheck.decide(moderateGap(), exact(0.99, 0.01), ONE_DAY,
                StoppingConfig.glr(0.05).withGlrThreshold(GlrThreshold.LIGHTER_NOT_PROVEN));
        assertEquals(VerdictReason.GLR, lighter.reason());
        assertEquals(Math.log((1 + Math.log(300)) / 0.05), lighter.threshold(), 1e-12);
    }

    @Test
    void glrOnValueArmsUsesTheGaussianThreshold() {
        // Gaussian GLR: 0.5^2 / (2 (4/100 + 9/150)) = 1.25, below 2 C_G(log(1/0.05)/2) + 4 log(4 + log 125).
        List<Arm> arms = List.of(new Arm("A", ValueStats.ofSummary(100, 10.5, 2.0)),
                new Arm("B", ValueStats.ofSummary(150, 10.0, 3.0)));
        Verdict d = StoppingCheck.decide(arms, exact(0.9, 0.1), ONE_DAY, StoppingConfig.glr(0.05));
        assertEquals(VerdictReason.BELOW_THRESHOLD, d.reason());
        assertEquals(1.25, d.statistic(), 1e-9);
        double expected = 2 * GaussianCalibrationTest.cgByGrid(Math.log(1 / 0.05) / 2) + 4 * Math.log(4 + Math.log(125));
        assertEquals(expected, d.threshold(), 1e-7);
    }

    @Test
    void sequentialTStopsOnceTheLeadersSequenceLiesAboveTheOther() {
        // n = 400 per arm, s = 2, alpha = 0.05 / 2: r^2 = (1 - p) 401 M2 / (400 (401 p - 1)) with
        // p = (alpha^2 / 401)^(1/400) gives r = 0.369 (hand computation), so means 11 and 10 are apart, 10.5 and
        // 10 are not.
        StoppingConfig config = StoppingConfig.glr(0.05).withRule(Rule.SEQUENTIAL_T);
        List<Arm> apart = List.of(new Arm("A", ValueStats.ofSummary(400, 10.0, 2.0)),
                new Arm("B", ValueStats.ofSummary(400, 11.0, 2.0)));
        Verdict stop = StoppingCheck.decide(apart, exact(0.01, 0.99), ONE_DAY, config);
        assertEquals(VerdictReason.SEQUENTIAL_T, stop.reason());
        assertEquals("sequential-t", stop.reason().label());
        assertEquals("B", stop.leaderName());
        assertEquals(Math.log(2 / 0.05), stop.threshold(), 1e-12);
        assertEquals(0.369, SequentialT.radius((ValueStats) apart.get(0).stats(), 0.025), 5e-4);
        List<Arm> close = List.of(new Arm("A", ValueStats.ofSummary(400, 10.0, 2.0)),
                new Arm("B", ValueStats.ofSummary(400, 10.5, 2.0)));
        Verdict wait = StoppingCheck.decide(close, exact(0.1, 0.9), ONE_DAY, config);
        assertEquals(VerdictReason.BELOW_THRESHOLD, wait.reason());
        assertTrue(wait.statistic() < wait.threshold());
    }

    @Test
    void glrCannotStopBeforeEveryArmHasData() {
        Verdict d = StoppingCheck.decide(List.of(bernoulli("A", 0, 0), bernoulli("B", 0, 0)), exact(0.5, 0.5),
                ONE_DAY, StoppingConfig.glr(0.05).withGlrThreshold(GlrThreshold.LIGHTER_NOT_PROVEN));
        assertEquals(VerdictReason.BELOW_THRESHOLD, d.reason());
        assertEquals(0.0, d.statistic());
    }

    @Test
    void posteriorRuleJudgesTheWilsonLowerBoundOfMonteCarloAlpha() {
        StoppingConfig config = StoppingConfig.posterior(0.05);
        // Reference: Commons Math WilsonScoreInterval (Wilson 1927) at the two-sided level of z = 3.
        double level = 1 - 2 * new NormalDistribution().cumulativeProbability(-3);
        double wilson10k = new WilsonScoreInterval().createInterval(10_000, 9_700, level).getLowerBound();
        Verdict stop = StoppingCheck.decide(moderateGap(), monteCarlo(new double[] {0.03, 0.97}, 10_000), ONE_DAY,
                config);
        assertEquals(VerdictReason.POSTERIOR, stop.reason());
        assertEquals("B", stop.leaderName());
        assertEquals(wilson10k, stop.statistic(), 1e-12);
        assertEquals(0.95, stop.threshold(), 1e-15);
        // 1,000 draws: the Wilson bound 0.9492 < 0.95: CONTINUE, although alpha itself is above 0.95.
        double wilson1k = new WilsonScoreInterval().createInterval(1_000, 970, level).getLowerBound();
        Verdict wait = StoppingCheck.decide(moderateGap(), monteCarlo(new double[] {0.03, 0.97}, 1_000), ONE_DAY,
                config);
        assertEquals(VerdictReason.BELOW_THRESHOLD, wait.reason());
        assertEquals(wilson1k, wait.statistic(), 1e-12);
        assertTrue(wilson1k < 0.95);
        // z = 1 with 1,000 draws: bound 0.9641: STOP.
        assertEquals(VerdictReason.POSTERIOR, StoppingCheck.decide(moderateGap(), monteCarlo(new double[] {0.03, 0.97},
                1_000), ONE_DAY, config.withZ(1)).reason());
        // Exact alpha has standard error 0: 0.951 >= 0.95.
        assertEquals(VerdictReason.POSTERIOR, StoppingCheck.decide(moderateGap(), exact(0.049, 0.951), ONE_DAY, config)
                .reason());
    }

    @Test
    void posteriorRuleDoesNotStopWhenEveryDrawPicksALeaderBelowTheTarget() {
        // Issue 14, bug 5. Two near-normal posteriors (Student-t, 1e9 degrees of freedom, scale 1) whose
        // difference has mean d sqrt(2) and variance 2: P(best) = Phi(d) = 0.999768 for d = Phi^-1(0.999768).
        // With 10,000 Monte Carlo draws every draw picks the leader with probability 0.999768^10000 = 9.8%;
        // the Wald bound alpha - 3 se is then 1 and the rule stopped at delta 1e-4 although P(best) < 1 - delta.
        // The Wilson bound (Wilson 1927) at 10,000 of 10,000 is 10000 / (10000 + 9) < 0.9999, so the rule
        // cannot stop on any seed. Tolerance: none (0 stops of 400 seeds); the old bound's stops on the same
        // seeds are counted as a check that the seeds reach the degenerate case (expected 39 of 400; more
        // than 15 with probability above 1 - 1e-6 by the binomial(400, 0.098) tail).
        double d = new NormalDistribution().inverseCumulativeProbability(0.999768);
        List<Posterior> ps = List.of(new StudentTPosterior(d * Math.sqrt(2), 1, 1e9), new StudentTPosterior(0, 1, 1e9));
        assertEquals(0.999768, new ExactProbabilityBest().estimate(ps, 0).alpha(0), 1e-7);
        StoppingConfig config = StoppingConfig.posterior(1e-4);
        MonteCarloProbabilityBest estimator = new MonteCarloProbabilityBest(10_000);
        int stops = 0;
        int waldStops = 0;
        for (long seed = 0; seed < 400; seed++) {
            ProbabilityBest best = estimator.estimate(ps, seed);
            if (StoppingCheck.decide(moderateGap(), best, ONE_DAY, config).action() == Verdict.Action.STOP) {
                stops++;
            }
            if (best.alpha(0) - 3 * best.standardError(0) >= 1 - 1e-4) {
                waldStops++;
            }
        }
        assertEquals(0, stops);
        assertTrue(waldStops > 15, "Wald bound stopped on " + waldStops + " of 400 seeds");
    }

    /**
     * P(theta_leader >= max_{j != leader} theta_j - epsilon) for independent Beta posteriors, by Commons Math
     * Legendre-Gauss integration of f_leader(x) prod_j F_j(x + epsilon) over [0, 1 - epsilon], plus
     * P(theta_leader > 1 - epsilon) where every F_j(x + epsilon) is 1: the independent reference injected in
     * place of the engine's exact integration.
     */
    private static LeaderConfidence integrated(List<BetaDistribution> posteriors) {
        return (leader, epsilon) -> {
            BetaDistribution l = posteriors.get(leader);
            IterativeLegendreGaussIntegrator integrator = new IterativeLegendreGaussIntegrator(8, 1e-10, 1e-12);
            double below = integrator.integrate(100_000, x -> {
                double p = l.density(x);
                for (int j = 0; j < posteriors.size(); j++) {
                    if (j != leader) {
                        p *= posteriors.get(j).cumulativeProbability(x + epsilon);
                    }
                }
                return p;
            }, 0, 1 - epsilon);
            return below + (1 - l.cumulativeProbability(1 - epsilon));
        };
    }

    @Test
    void indifferenceRuleStopsNearTiesOnceTheLeaderIsWithinEpsilon() {
        // Two arms tied at 500/1000: posteriors Beta(501, 501) under a uniform prior. The difference has
        // standard deviation sqrt(2 * 0.25 / 1002) = 0.0223, so P(within 0.05) ~ Phi(2.24) ~ 0.987 (normal
        // approximation, by hand) and P(within 0.01) ~ Phi(0.45) ~ 0.67.
        List<Arm> arms = List.of(bernoulli("A", 1000, 500), bernoulli("B", 1000, 500));
        List<BetaDistribution> posteriors = List.of(new BetaDistribution(null, 501, 501),
                new BetaDistribution(null, 501, 501));
        LeaderConfidence reference = integrated(posteriors);
        Verdict stop = StoppingCheck.decide(arms, exact(0.5, 0.5), ONE_DAY, StoppingConfig.indifference(0.05, 0.05),
                reference);
        assertEquals(VerdictReason.INDIFFERENCE, stop.reason());
        assertEquals(reference.probabilityWithin(0, 0.05), stop.statistic());
        assertEquals(0.987, stop.statistic(), 0.003);
        Verdict wait = StoppingCheck.decide(arms, exact(0.5, 0.5), ONE_DAY, StoppingConfig.indifference(0.05, 0.01),
                reference);
        assertEquals(VerdictReason.BELOW_THRESHOLD, wait.reason());
        assertEquals(0.67, wait.statistic(), 0.01);
        assertEquals(0.95, wait.threshold(), 1e-15);
    }

    @Test
    void indifferenceRuleAsksAboutTheArmWithTheLargestAlpha() {
        List<Arm> arms = List.of(bernoulli("A", 100, 40), bernoulli("B", 100, 55), bernoulli("C", 100, 50));
        List<BetaDistribution> posteriors = List.of(new BetaDistribution(null, 41, 61),
                new BetaDistribution(null, 56, 46), new BetaDistribution(null, 51, 51));
        List<String> calls = new ArrayList<>();
        LeaderConfidence recording = (leader, epsilon) -> {
            calls.add(leader + "@" + epsilon);
            return integrated(posteriors).probabilityWithin(leader, epsilon);
        };
        Verdict d = StoppingCheck.decide(arms, exact(0.02, 0.74, 0.24), ONE_DAY,
                StoppingConfig.indifference(0.05, 0.1), recording);
        assertEquals(List.of("1@0.1"), calls);
        assertEquals("B", d.leaderName());
        assertEquals(0.74, d.leaderConfidence());
    }

    @Test
    void indifferenceRuleWithoutAConfidenceFunctionIsRejected() {
        assertEquals("the indifference rule needs a LeaderConfidence", assertThrows(IllegalArgumentException.class,
                () -> StoppingCheck.decide(largeGap(), exact(0.9, 0.1), ONE_DAY,
                        StoppingConfig.indifference(0.05, 0.01))).getMessage());
    }

    @Test
    void minimumTrialsPerArmHoldsAFiringRuleBack() {
        StoppingConfig config = StoppingConfig.glr(0.05).withMinTrialsPerArm(2001);
        Verdict d = StoppingCheck.decide(largeGap(), exact(0.999, 0.001), ONE_DAY, config);
        assertEquals(Verdict.Action.CONTINUE, d.action());
        assertEquals(VerdictReason.MIN_TRIALS, d.reason());
        assertEquals("min-trials", d.reason().label());
        assertEquals(2000, d.guards().fewestTrials());
        assertFalse(d.guards().minTrialsMet());
        assertEquals(VerdictReason.GLR, StoppingCheck.decide(largeGap(), exact(0.999, 0.001), ONE_DAY,
                config.withMinTrialsPerArm(2000)).reason());
    }

    @Test
    void minimumDurationHoldsAFiringRuleBack() {
        StoppingConfig config = StoppingConfig.glr(0.05).withMinDuration(Duration.ofDays(7));
        Verdict early = StoppingCheck.decide(largeGap(), exact(0.999, 0.001), ONE_DAY, config);
        assertEquals(VerdictReason.MIN_DURATION, early.reason());
        assertEquals(Duration.ofDays(1), early.guards().elapsed());
        Timing week = new Timing(START, START.plus(Duration.ofDays(7)));
        assertEquals(VerdictReason.GLR, StoppingCheck.decide(largeGap(), exact(0.999, 0.001), week, config).reason());
    }

    @Test
    void spentTrialBudgetStopsWithTheBestArmByAlpha() {
        // Rule does not fire (Z = 6.04 < 9.39); 300 trials reach the budget of 300.
        StoppingConfig config = StoppingConfig.glr(0.05).withBudgetTrials(300);
        Verdict d = StoppingCheck.decide(moderateGap(), exact(0.3, 0.7), ONE_DAY, config);
        assertEquals(Verdict.Action.STOP, d.action());
        assertEquals(VerdictReason.BUDGET, d.reason());
        assertEquals("budget", d.reason().label());
        assertEquals("B", d.leaderName());
        assertEquals(0.7, d.leaderConfidence());
        assertTrue(d.guards().trialBudgetSpent());
        assertEquals(Math.log(2.0 * 300 / 0.05), d.threshold(), 1e-12);
        assertEquals(VerdictReason.BELOW_THRESHOLD, StoppingCheck.decide(moderateGap(), exact(0.3, 0.7), ONE_DAY,
                config.withBudgetTrials(301)).reason());
    }

    @Test
    void passedDeadlineStopsForBudget() {
        StoppingConfig config = StoppingConfig.glr(0.05).withDeadline(START.plus(Duration.ofHours(24)));
        Verdict d = StoppingCheck.decide(moderateGap(), exact(0.8, 0.2), ONE_DAY, config);
        assertEquals(VerdictReason.BUDGET, d.reason());
        assertTrue(d.guards().deadlinePassed());
        Timing before = new Timing(START, START.plus(Duration.ofHours(23)));
        assertEquals(VerdictReason.BELOW_THRESHOLD, StoppingCheck.decide(moderateGap(), exact(0.8, 0.2), before, config)
                .reason());
    }

    @Test
    void budgetOverridesGuardsButAFiringRuleKeepsItsOwnReason() {
        StoppingConfig config = StoppingConfig.glr(0.05).withBudgetTrials(4000);
        assertEquals(VerdictReason.GLR, StoppingCheck.decide(largeGap(), exact(0.999, 0.001), ONE_DAY, config).reason());
        assertEquals(VerdictReason.BUDGET, StoppingCheck.decide(largeGap(), exact(0.999, 0.001), ONE_DAY,
                config.withMinTrialsPerArm(10_000)).reason());
    }

    @Test
    void sameInputsGiveEqualDecisions() {
        StoppingConfig config = StoppingConfig.glr(0.05).withMinTrialsPerArm(10);
        assertEquals(StoppingCheck.decide(largeGap(), exact(0.999, 0.001), ONE_DAY, config),
                StoppingCheck.decide(largeGap(), exact(0.999, 0.001), ONE_DAY, config));
    }

    @Test
    void rejectsInconsistentInputsNamingTheProblem() {
        StoppingConfig config = StoppingConfig.posterior(0.05);
        assertEquals("probability of being best has 3 entries but there are 2 arms",
                assertThrows(IllegalArgumentException.class, () -> StoppingCheck.decide(moderateGap(),
                        exact(0.5, 0.3, 0.2), ONE_DAY, config)).getMessage());
        assertEquals("alpha of arm 'B' must be in [0.0, 1.0], got 1.5",
                assertThrows(IllegalArgumentException.class, () -> StoppingCheck.decide(moderateGap(),
                        exact(0.2, 1.5), ONE_DAY, config)).getMessage());
        assertEquals("need at least 2 arms, got 1", assertThrows(IllegalArgumentException.class,
                () -> StoppingCheck.decide(List.of(bernoulli("A", 1, 1)), exact(1.0), ONE_DAY, config)).getMessage());
        assertThrows(IllegalArgumentException.class, () -> StoppingCheck.decide(moderateGap(), exact(0.5, 0.5),
                ONE_DAY, StoppingConfig.indifference(0.05, 0.1), (leader, eps) -> 1.2));
    }
}
