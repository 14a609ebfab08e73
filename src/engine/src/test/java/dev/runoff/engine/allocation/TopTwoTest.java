package dev.runoff.engine.allocation;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.best.ExactProbabilityBest;
import dev.runoff.engine.best.ExpectedGain;
import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.posterior.StudentTPosterior;
import java.util.List;
import org.apache.commons.math3.distribution.NormalDistribution;
import org.apache.commons.rng.UniformRandomProvider;
import org.apache.commons.rng.simple.RandomSource;
import org.junit.jupiter.api.Test;

/** The top-two rules on cases whose answer follows from their published definitions. */
class TopTwoTest {

    @Test
    void thompsonOnTwoArmsMeasuresTheLeaderWithProbabilityBeta() {
        // With two arms the challenger is always the other arm, so psi_1 = beta alpha_1 + (1 - beta) alpha_2
        // (Russo 2020, definition of top-two Thompson sampling).
        double[] psi = TopTwo.thompson(new double[] {0.8, 0.2}, 0.7);
        assertArrayEquals(new double[] {0.7 * 0.8 + 0.3 * 0.2, 0.7 * 0.2 + 0.3 * 0.8}, psi, 1e-15);
    }

    @Test
    void thompsonWithBetaOneIsThompsonSampling() {
        // beta = 1 never measures a challenger: each arm is measured with its probability of being best.
        double[] alpha = {0.1, 0.25, 0.6, 0.05};
        assertArrayEquals(alpha, TopTwo.thompson(alpha, 1.0), 1e-15);
    }

    @Test
    void thompsonMatchesTheClosedFormOnAHandComputedCase() {
        // psi_i = alpha_i (beta + (1 - beta) sum_{j != i} alpha_j / (1 - alpha_j)) (DESIGN section 3;
        // Russo 2020), evaluated by hand for alpha = (0.5, 0.3, 0.2), beta = 0.5.
        double[] psi = TopTwo.thompson(new double[] {0.5, 0.3, 0.2}, 0.5);
        double r0 = 0.5 / 0.5;
        double r1 = 0.3 / 0.7;
        double r2 = 0.2 / 0.8;
        assertArrayEquals(new double[] {0.5 * (0.5 + 0.5 * (r1 + r2)), 0.3 * (0.5 + 0.5 * (r0 + r2)),
            0.2 * (0.5 + 0.5 * (r0 + r1))}, psi, 1e-15);
    }

    @Test
    void thompsonWeightsSumToOneForManyRandomAlphas() {
        UniformRandomProvider rng = RandomSource.XO_SHI_RO_256_PP.create(5L);
        for (int trial = 0; trial < 1000; trial++) {
            double[] alpha = new double[2 + rng.nextInt(20)];
            for (int i = 0; i < alpha.length; i++) {
                alpha[i] = rng.nextDouble() < 0.2 ? 0.0 : StrictMath.pow(rng.nextDouble(), 8);
            }
            alpha[rng.nextInt(alpha.length)] += 1e-300;
            double[] psi = TopTwo.thompson(alpha, rng.nextDouble());
            assertEquals(1.0, Weights.sum(psi), 1e-12);
            for (double p : psi) {
                assertTrue(p >= 0);
            }
        }
    }

    @Test
    void thompsonWithACertainLeaderSplitsTheChallengerShareEqually() {
        // Documented convention: the randomised rule cannot find a challenger when alpha_leader = 1.
        assertArrayEquals(new double[] {0.1, 0.6, 0.1, 0.1, 0.1}, TopTwo.thompson(new double[] {0, 1, 0, 0, 0}, 0.6),
                1e-15);
    }

    @Test
    void thompsonKeepsChallengerSharesWhenTheLeaderRoundsToOne() {
        // 1 - 3e-20 rounds to 1.0, so 1 - alpha_leader by subtraction would be 0. As the other alphas
        // vanish in fixed ratios, psi_j -> (1 - beta) alpha_j / sum of the others (limit of the formula).
        double[] psi = TopTwo.thompson(new double[] {1.0 - 3e-20, 1e-20, 2e-20}, 0.5);
        assertArrayEquals(new double[] {0.5, 0.5 / 3, 1.0 / 3}, psi, 1e-15);
    }

    @Test
    void probabilitySamplingPutsBetaOnTheLeaderAndTheRestOnTheRunnerUp() {
        assertArrayEquals(new double[] {0, 0.3, 0, 0.7}, TopTwo.probability(new double[] {0.1, 0.3, 0.05, 0.55}, 0.7),
                1e-15);
    }

    @Test
    void tiesGoToTheLowestIndex() {
        assertArrayEquals(new double[] {0.5, 0.5, 0, 0}, TopTwo.probability(new double[] {0.25, 0.25, 0.25, 0.25},
                0.5), 0.0);
        assertArrayEquals(new double[] {0.0, 0.6, 0.4}, TopTwo.probability(new double[] {0.2, 0.4, 0.4}, 0.6), 1e-15);
    }

    @Test
    void valueSamplingRanksByValueOfBeingBestNotByProbability() {
        // A narrow arm that is usually best but only by a little, and a wide arm that is rarely best but
        // by a lot when it is. V_i = E[(theta_i - max_{j != i} theta_j)^+] is estimated independently here
        // by seeded Monte Carlo; alpha comes from exact integration.
        List<Posterior> ps = List.of(new StudentTPosterior(1.0, 0.05, 30), new StudentTPosterior(0.8, 0.6, 30),
                new StudentTPosterior(0.95, 0.05, 30));
        double[] alpha = new ExactProbabilityBest().estimate(ps, 0).alpha();
        double[] v = simulatedValueOfBeingBest(ps, 400_000, 21L);
        assertTrue(alpha[0] > alpha[1] && v[1] > v[0], "case separates the rankings: alpha "
                + java.util.Arrays.toString(alpha) + ", V " + java.util.Arrays.toString(v));
        int leader = v[1] > v[0] && v[1] > v[2] ? 1 : -1;
        int runnerUp = v[0] > v[2] ? 0 : 2;
        double[] expected = new double[3];
        expected[leader] = 0.6;
        expected[runnerUp] = 0.4;
        assertArrayEquals(expected, TopTwo.value(ps, 0.6), 0.0);
    }

    @Test
    void expectedImprovementChallengerIsTheWidestThreatNotTheRunnerUpByMean() {
        // Qin, Klabjan and Russo (2017): leader = argmax E[(theta_i - max_j mu_j)^+], challenger =
        // argmax_{j != leader} E[(theta_j - theta_leader)^+]. Arm 2 has a lower mean than arm 1 but is far
        // wider, so it threatens the leader more. The expectations are checked by seeded Monte Carlo here
        // (normal approximations give about 0.020, 0.0004 and 0.0064 for the leader criterion, and 0.0025
        // and 0.0077 for the two challengers).
        List<Posterior> ps = List.of(new StudentTPosterior(1.0, 0.05, 30), new StudentTPosterior(0.9, 0.05, 30),
                new StudentTPosterior(0.8, 0.15, 30));
        double lead0 = simulatedGain(ps.get(0), new StudentTPosterior(1.0, 1e-9, 30), 400_000, 30L);
        double lead2 = simulatedGain(ps.get(2), new StudentTPosterior(1.0, 1e-9, 30), 400_000, 31L);
        double gain1 = simulatedGain(ps.get(1), ps.get(0), 400_000, 32L);
        double gain2 = simulatedGain(ps.get(2), ps.get(0), 400_000, 33L);
        assertTrue(lead0 > 1.5 * lead2 && gain2 > 2 * gain1, "leader criterion " + lead0 + " vs " + lead2
                + ", challenger criterion " + gain1 + " vs " + gain2);
        assertArrayEquals(new double[] {0.8, 0, 0.2}, TopTwo.expectedImprovement(ps, 0.8), 1e-15);
    }

    @Test
    void expectedImprovementLeaderIsScoredAgainstTheBestMeanOfAllArms() {
        // Qin, Klabjan and Russo (2017), "Improving the expected improvement algorithm", NeurIPS: the TTEI
        // leader maximises the EI value v_i = E[(theta_i - max_j mu_j)^+] over the best posterior mean of all
        // arms. Posteriors N(1.0, 1) and N(0.9, 1.2^2) (Student-t with 1e9 degrees of freedom): the Gaussian
        // closed form sigma (z Phi(z) + phi(z)), z = (mu - best) / sigma (Jones, Schonlau and Welch 1998),
        // gives v_0 = 0.3989 and v_1 = 0.4304, so the second arm leads and gets beta = 0.7. Scoring against
        // the best other arm's mean (the old rule) would give v_0 = 1 * EI(z = 0.1) > v_1 and (0.7, 0.3).
        List<Posterior> ps = List.of(new StudentTPosterior(1.0, 1.0, 1e9), new StudentTPosterior(0.9, 1.2, 1e9));
        NormalDistribution normal = new NormalDistribution();
        double z = (0.9 - 1.0) / 1.2;
        double v1 = 1.2 * (z * normal.cumulativeProbability(z) + normal.density(z));
        double v0 = normal.density(0);
        assertEquals(0.4304, v1, 5e-5);
        assertEquals(0.3989, v0, 5e-5);
        assertEquals(v0, ExpectedGain.overThreshold(ps.get(0), 1.0), 1e-6);
        assertEquals(v1, ExpectedGain.overThreshold(ps.get(1), 1.0), 1e-6);
        assertArrayEquals(new double[] {0.3, 0.7}, TopTwo.expectedImprovement(ps, 0.7), 1e-15);
    }

    @Test
    void expectedImprovementLeaderCanDifferFromTheLargestMean() {
        // Arm 1 has a slightly lower mean but a much wider posterior: E[(theta_1 - mu_0)^+] is about
        // 0.4 * 0.4 = 0.16 (normal approximation, E[Z^+] = 0.399), far above arm 0's E[(theta_0 - mu_1)^+],
        // which is at most its margin 0.01 plus 0.4 * 0.01.
        List<Posterior> ps = List.of(new StudentTPosterior(1.0, 0.01, 50), new StudentTPosterior(0.99, 0.4, 50),
                new StudentTPosterior(0.5, 0.01, 50));
        assertArrayEquals(new double[] {0.5, 0.5, 0}, TopTwo.expectedImprovement(ps, 0.5), 0.0);
        assertEquals(1, Weights.argmax(TopTwo.expectedImprovement(ps, 0.9)));
    }

    @Test
    void uniformGivesEqualWeights() {
        assertArrayEquals(new double[] {0.25, 0.25, 0.25, 0.25}, TopTwo.uniform(4), 0.0);
    }

    @Test
    void rulesRejectBadInputNamingTheValue() {
        assertMessage("beta must be in [0.0, 1.0], got 1.5", () -> TopTwo.thompson(new double[] {0.5, 0.5}, 1.5));
        assertMessage("beta must be in [0.0, 1.0], got NaN", () -> TopTwo.probability(new double[] {0.5, 0.5}, Double.NaN));
        assertMessage("alpha[1] must be finite and >= 0, got NaN",
                () -> TopTwo.thompson(new double[] {0.5, Double.NaN}, 0.5));
        assertMessage("alpha[0] must be finite and >= 0, got -0.1",
                () -> TopTwo.probability(new double[] {-0.1, 1.1}, 0.5));
        assertMessage("alpha must not all be 0", () -> TopTwo.thompson(new double[] {0, 0, 0}, 0.5));
        assertMessage("alpha needs at least two arms, got 1", () -> TopTwo.thompson(new double[] {1}, 0.5));
        assertMessage("number of arms must be >= 1, got 0", () -> TopTwo.uniform(0));
        assertMessage("posterior mean of arm 1 must be a finite number, got NaN", () -> TopTwo.expectedImprovement(
                List.of(new BetaPosterior(1, 1), new StudentTPosterior(0, 1, 0.5)), 0.5));
    }

    @Test
    void ruleNamesHaveCommandLineSpellings() {
        assertEquals("top-two-thompson", AllocationMethod.TOP_TWO_THOMPSON.cliName());
        assertEquals("top-two-ei", AllocationMethod.TOP_TWO_EI.cliName());
        for (AllocationMethod r : AllocationMethod.values()) {
            assertEquals(r, AllocationMethod.fromCliName(r.cliName()));
        }
        assertMessage("unknown rule 'thompson', expected one of top-two-thompson, top-two-probability, "
                + "top-two-value, top-two-ei, uniform, top-two-adaptive", () -> AllocationMethod.fromCliName("thompson"));
    }

    private static void assertMessage(String expected, Runnable call) {
        assertEquals(expected, assertThrows(IllegalArgumentException.class, call::run).getMessage());
    }

    private static double[] simulatedValueOfBeingBest(List<Posterior> ps, int draws, long seed) {
        UniformRandomProvider rng = RandomSource.XO_SHI_RO_256_PP.create(seed);
        Posterior.Sampler[] s = ps.stream().map(p -> p.sampler(rng)).toArray(Posterior.Sampler[]::new);
        double[] v = new double[s.length];
        double[] x = new double[s.length];
        for (int d = 0; d < draws; d++) {
            for (int i = 0; i < s.length; i++) {
                x[i] = s[i].draw();
            }
            for (int i = 0; i < s.length; i++) {
                double others = Double.NEGATIVE_INFINITY;
                for (int j = 0; j < s.length; j++) {
                    others = j == i ? others : Math.max(others, x[j]);
                }
                v[i] += Math.max(0, x[i] - others) / draws;
            }
        }
        return v;
    }

    private static double simulatedGain(Posterior x, Posterior y, int draws, long seed) {
        UniformRandomProvider rng = RandomSource.XO_SHI_RO_256_PP.create(seed);
        Posterior.Sampler sx = x.sampler(rng);
        Posterior.Sampler sy = y.sampler(rng);
        double sum = 0;
        for (int d = 0; d < draws; d++) {
            sum += Math.max(0, sx.draw() - sy.draw());
        }
        return sum / draws;
    }
}
