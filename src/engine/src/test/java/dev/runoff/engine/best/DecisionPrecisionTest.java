package dev.runoff.engine.best;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.allocation.TopTwo;
import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.function.UnaryOperator;
import org.junit.jupiter.api.Test;

/**
 * Engine 1.3's draw policy: where it stops drawing and why. The draw counts below follow from the stopping
 * conditions by hand (stated beside each), with stages of 1,000, 2,000, 4,000, ... draws; the estimator itself
 * is the one {@link AdaptiveMonteCarloTest} checks against outside references, and one of its cases is
 * repeated here under this policy.
 */
class DecisionPrecisionTest {
    private static final long SEED = 20_261_202L;
    private static final UnaryOperator<double[]> THOMPSON = alpha -> TopTwo.thompson(alpha, 0.5);
    private static final AlphaReaders WEIGHTS = new AlphaReaders(THOMPSON, 1, null);

    private static List<Posterior> betas(double... ab) {
        List<Posterior> list = new ArrayList<>();
        for (int i = 0; i < ab.length; i += 2) {
            list.add(new BetaPosterior(ab[i], ab[i + 1]));
        }
        return list;
    }

    private static ProbabilityBest estimate(AlphaReaders readers, int cap, List<Posterior> arms) {
        return new AdaptiveMonteCarlo(cap, new DecisionPrecision(readers), DrawSource.POSTERIOR,
                ExactAlphas.QUADRATURE).estimate(arms, SEED);
    }

    @Test
    void aClearLeaderWithKnownWeightsStopsAtTheFirstStage() {
        // Beta(11, 91) against Beta(61, 41): the second arm wins every draw; one arm with wins has no variance.
        assertEquals(DecisionPrecision.FIRST_STAGE, estimate(WEIGHTS, 40_000, betas(11, 91, 61, 41)).draws());
    }

    @Test
    void tiedArmsDrawUntilTheDifferencesStandardErrorReachesTheTieResolution() {
        // Two identical posteriors: d is about 0, s = sqrt((p_a + p_b) / M) = sqrt(1 / M); s <= 0.01 needs
        // M >= 10,000, first reached at the stage of 16,000 draws (8,000 gives 0.0112).
        ProbabilityBest pb = estimate(AlphaReaders.LEADER, 40_000, betas(51, 451, 51, 451));
        assertEquals(16_000, pb.draws(), pb.toString());
    }

    @Test
    void aThresholdOnTheLeadersAlphaIsSettledBeforeDrawingStops() {
        // The second arm wins every draw (share 1). Wilson lower bound at share 1: M / (M + z^2) (WilsonBound);
        // with z = 3 it reaches 0.95 at M = 1,000 (0.991) but 0.999 only at M >= 8,991: the stage of 16,000.
        List<Posterior> clear = betas(11, 91, 61, 41);
        assertEquals(1_000, estimate(new AlphaReaders(null, 1, new LeaderThreshold(0.95, 3)), 40_000, clear).draws());
        assertEquals(16_000, estimate(new AlphaReaders(null, 1, new LeaderThreshold(0.999, 3)), 40_000, clear).draws());
    }

    @Test
    void aLeaderClearlyBelowTheThresholdNeedsNoMoreDraws() {
        // Beta(21, 81) against Beta(23, 79) and Beta(22, 80): the leader's alpha is near 0.4, far below 0.95,
        // so only the ordering and the weights decide; with the leader's identity alone read, ties settle at
        // the tie resolution (as above) whatever the threshold says.
        List<Posterior> close = betas(21, 81, 23, 79, 22, 80);
        ProbabilityBest without = estimate(AlphaReaders.LEADER, 40_000, close);
        ProbabilityBest with = estimate(new AlphaReaders(null, 1, new LeaderThreshold(0.95, 3)), 40_000, close);
        assertEquals(without, with);
    }

    @Test
    void theWeightsStandardErrorOfNormalisedAlphasIsTheBinomialOne() {
        // With weights = the alphas themselves, the delta method must give each weight the binomial standard
        // error of a multinomial cell, sqrt(p (1 - p) / M) (common practice); the largest is that of p = 0.5.
        UnaryOperator<double[]> identity = alpha -> {
            double sum = Arrays.stream(alpha).sum();
            return Arrays.stream(alpha).map(a -> a / sum).toArray();
        };
        DecisionPrecision policy = new DecisionPrecision(new AlphaReaders(identity, 1, null));
        long[] wins = {500, 300, 200};
        assertEquals(Math.sqrt(0.25 / 1000), policy.largestWeightError(wins, 1000, () -> new double[3]), 1e-6);
    }

    @Test
    void aChallengerThatWonFewDrawsIsJudgedAgainstTheIntegratedAlphasOfThoseThatWonNone() {
        // Leader 998 wins, two challengers 1 win each, one none. Top-two Thompson splits the challengers' share by
        // their alphas: beside a zero-win arm integrated at 1e-12 the split of the two one-win arms is as
        // uncertain as their counts; beside one at 2e-3 (twice their shares) the one-win arms' weights move
        // with their counts far more. Either way the policy must not settle on counts of one.
        long[] wins = {998, 1, 1, 0};
        DecisionPrecision policy = new DecisionPrecision(WEIGHTS);
        double negligible = policy.largestWeightError(wins, 1000, () -> new double[] {0, 0, 0, 1e-12});
        double comparable = policy.largestWeightError(wins, 1000, () -> new double[] {0, 0, 0, 2e-3});
        assertTrue(negligible > DecisionPrecision.WEIGHT_ERROR && comparable > DecisionPrecision.WEIGHT_ERROR,
                negligible + ", " + comparable);
        assertFalse(policy.settled(wins, 1000, () -> new double[] {0, 0, 0, 1e-12}));
        // One arm that won draws: no variance, and the integration is not asked for.
        assertEquals(0.0, policy.largestWeightError(new long[] {1000, 0, 0}, 1000, () -> {
            throw new AssertionError("integrated although one arm won every draw");
        }));
    }

    @Test
    void theRecordedDrawsAsTheCapReproduceTheEstimateBitForBit() {
        List<Posterior> close = betas(101, 901, 104, 898, 104, 897);
        ProbabilityBest first = estimate(WEIGHTS, 1_000_000, close);
        assertTrue(first.draws() > DecisionPrecision.FIRST_STAGE, first.toString());
        assertEquals(first, estimate(WEIGHTS, first.draws(), close));
        ProbabilityBest capped = estimate(WEIGHTS, 3_000, close);
        assertEquals(3_000, capped.draws());
        assertEquals(capped, estimate(WEIGHTS, capped.draws(), close));
    }

    @Test
    void tailArmsStillGetTheirIntegratedAlphas() {
        // The reference of AdaptiveMonteCarloTest (mpmath 1.3.0 quadrature at 30 digits, computed for that
        // test): the first three arms win no draw and are integrated to a relative 1e-9; the other two lie
        // within 4 standard errors.
        double[] reference = {1.4721517607301097e-44, 1.0076515288349021e-21, 1.1441345260978008e-11,
                0.0029926502582656737, 0.99700734973029298};
        ProbabilityBest pb = estimate(WEIGHTS, 40_000, betas(41, 361, 91, 331, 121, 291, 181, 251, 231, 221));
        for (int i = 0; i < 3; i++) {
            assertTrue(pb.conditional(i), pb.toString());
            assertEquals(reference[i], pb.alpha(i), 1e-9 * reference[i], pb.toString());
        }
        for (int i = 3; i < 5; i++) {
            assertEquals(reference[i], pb.alpha(i), 4 * pb.standardError(i) + 1e-12, pb.toString());
        }
    }

    @Test
    void topTwoProbabilityOrdersTheRunnerUpToo() {
        // A leader near alpha 0.5 and two identical challengers near 0.25 each: the leader is ordered at the first
        // stage (d about 0.25, s about 0.026); the two challengers tie, s = sqrt(0.5 / M) > 0.01 at M = 1,000.
        // (Challengers that won no draw would count as settled: their alphas are integrated, not counted.)
        List<Posterior> arms = betas(131, 871, 121, 881, 121, 881);
        assertEquals(1_000, estimate(AlphaReaders.LEADER, 40_000, arms).draws());
        assertTrue(estimate(new AlphaReaders(null, 2, null), 40_000, arms).draws() > 1_000);
    }

    @Test
    void badArgumentsAreRejectedNamingThem() {
        assertTrue(assertThrows(IllegalArgumentException.class, () -> new AlphaReaders(null, 3, null)).getMessage()
                .contains("orderedRanks"));
        assertTrue(assertThrows(IllegalArgumentException.class, () -> new LeaderThreshold(1.5, 3)).getMessage()
                .contains("level"));
        assertTrue(assertThrows(IllegalArgumentException.class, () -> new LeaderThreshold(0.9, -1)).getMessage()
                .contains("z"));
        assertArrayEquals(new int[] {1, 0, 2}, Ranking.byWins(new long[] {5, 7, 5}, 3));
    }
}
