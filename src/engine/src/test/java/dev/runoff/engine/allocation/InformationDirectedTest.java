package dev.runoff.engine.allocation;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.planning.ArmModel;
import dev.runoff.engine.planning.OptimalAllocation;
import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.posterior.StudentTPosterior;
import java.util.List;
import org.junit.jupiter.api.Test;

/** Top-two Thompson sampling with information-directed selection of the measured arm (You et al. 2023). */
class InformationDirectedTest {

    /** A Student-t posterior of a Gaussian arm with known variance sigma^2 after n observations: scale sigma / sqrt(n). */
    private static Posterior gaussianAfter(double mean, double sigma, double n) {
        return new StudentTPosterior(mean, sigma / Math.sqrt(n), 1e6);
    }

    @Test
    void withEqualVariancesTheLeaderIsMeasuredWithTheChallengersShareOfTheTrials() {
        // You, Qin, Wang & Yang (2023), information-directed selection for Gaussian arms with a common known
        // variance: measure leader I with probability p_J / (p_I + p_J) (from memory; the paper's text was not
        // readable). Two arms: the pair is always (a, b), so the weights are exactly that split, whatever alpha.
        List<Posterior> ps = List.of(gaussianAfter(1.0, 2.0, 300), gaussianAfter(0.8, 2.0, 100));
        double[] w = InformationDirected.weights(ps, new double[] {0.9, 0.1});
        assertArrayEquals(new double[] {100.0 / 400, 300.0 / 400}, w, 1e-12);
        assertArrayEquals(w, InformationDirected.weights(ps, new double[] {0.2, 0.8}), 1e-12);
    }

    @Test
    void rateArmsUseTheAuthorsCoinOnTheBernoulliGlrCost() {
        // The selection coin of the authors' code (github.com/zihaophys/topk_colt23, algorithm.jl, "toss a
        // biased optimized coin"): p_I d(mu_I, m) / (p_I d(mu_I, m) + p_J d(mu_J, m)), m the p-weighted mean,
        // d the Bernoulli KL. Beta(11, 91) and Beta(31, 271): means 11/102 and 31/302, counts 102 and 302,
        // m = 42/404; KL written out here.
        double m = 42.0 / 404;
        double cx = 102 * kl(11.0 / 102, m);
        double cy = 302 * kl(31.0 / 302, m);
        List<Posterior> ps = List.of(new BetaPosterior(11, 91), new BetaPosterior(31, 271));
        assertArrayEquals(new double[] {cx / (cx + cy), cy / (cx + cy)},
                InformationDirected.weights(ps, new double[] {0.3, 0.7}), 1e-12);
    }

    @Test
    void forTwoRateArmsTheCoinKeepsTheOptimalAllocationInPlace() {
        // Two Bernoulli arms: w* of Garivier & Kaufmann (2016) maximises w_1 d(mu_1, m) + w_2 d(mu_2, m), so
        // (envelope theorem) d(mu_1, m) = d(mu_2, m) there, and the coin measures arm 1 with probability w_1:
        // the allocation is a fixed point. Counts 10^6 w*, posterior means exactly 0.12 and 0.1.
        double[] w = OptimalAllocation.optimal(ArmModel.bernoulli(0.12, 0.1)).weights();
        double n1 = 1e6 * w[0];
        double n2 = 1e6 * w[1];
        double share = InformationDirected.pairShare(new BetaPosterior(0.12 * n1, 0.88 * n1),
                new BetaPosterior(0.1 * n2, 0.9 * n2));
        assertEquals(w[0], share, 1e-6, "w* = " + java.util.Arrays.toString(w));
    }

    @Test
    void equalMeansTakeTheLimitOfTheCoin() {
        // Both parts of the cost are 0; the limit as the means meet is p_J / (p_I + p_J) = 80 / 120.
        assertEquals(80.0 / 120, InformationDirected.pairShare(new BetaPosterior(10, 30), new BetaPosterior(20, 60)),
                1e-15);
    }

    private static double kl(double p, double q) {
        return p * Math.log(p / q) + (1 - p) * Math.log((1 - p) / (1 - q));
    }

    @Test
    void threeArmsMatchTheClosedFormWorkedByHand() {
        // pi_ij = a_i a_j / (1 - a_i) + a_j a_i / (1 - a_j); psi_i = sum_j pi_ij v_i / (v_i + v_j).
        // alpha (0.5, 0.3, 0.2), variances 1, 2, 2 (scales 1, sqrt 2, sqrt 2):
        // pi_01 = 0.15/0.5 + 0.15/0.7, pi_02 = 0.1/0.5 + 0.1/0.8, pi_12 = 0.06/0.7 + 0.06/0.8.
        double pi01 = 0.15 / 0.5 + 0.15 / 0.7;
        double pi02 = 0.1 / 0.5 + 0.1 / 0.8;
        double pi12 = 0.06 / 0.7 + 0.06 / 0.8;
        double[] expected = {pi01 / 3 + pi02 / 3, pi01 * 2 / 3 + pi12 / 2, pi02 * 2 / 3 + pi12 / 2};
        List<Posterior> ps = List.of(new StudentTPosterior(0, 1, 5), new StudentTPosterior(0, Math.sqrt(2), 5),
                new StudentTPosterior(0, Math.sqrt(2), 5));
        double[] w = InformationDirected.weights(ps, new double[] {0.5, 0.3, 0.2});
        assertEquals(1.0, pi01 + pi02 + pi12, 1e-15);
        assertArrayEquals(expected, w, 1e-12);
    }

    @Test
    void atTheOptimalAllocationTheSelectionKeepsEveryShareInPlace() {
        // The design argument: with h_J = w_J / (w_1 + w_J) the long-run shares satisfy w_1^2 = sum_J w_J^2,
        // which the optimal allocation of Garivier & Kaufmann (2016) satisfies for Gaussian arms with a common
        // variance. Checked here against OptimalAllocation's w* (computed independently, by their
        // characterisation) on four Gaussian arms with variance 1.
        double[] w = OptimalAllocation.optimal(ArmModel.gaussianCommonVariance(1.0, 1.0, 0.8, 0.7, 0.4)).weights();
        double others = w[1] * w[1] + w[2] * w[2] + w[3] * w[3];
        assertEquals(w[0] * w[0], others, 1e-6 * others, "w* = " + java.util.Arrays.toString(w));
    }

    @Test
    void aLeaderWithAlphaOneIsPairedWithEveryOtherArmEqually() {
        List<Posterior> ps = List.of(gaussianAfter(1, 1, 100), gaussianAfter(0, 1, 100), gaussianAfter(0, 1, 300));
        double[] w = InformationDirected.weights(ps, new double[] {1, 0, 0});
        // pairs (0, 1) and (0, 2) with probability 1/2 each; splits 1/2 : 1/2 and 3/4 : 1/4.
        assertArrayEquals(new double[] {0.5 * 0.5 + 0.5 * 0.75, 0.25, 0.125}, w, 1e-12);
    }

    @Test
    void badInputIsRejectedNamingWhatIsWrong() {
        List<Posterior> two = List.of(gaussianAfter(1, 1, 10), gaussianAfter(0, 1, 10));
        assertEquals("alpha must not all be 0", assertThrows(IllegalArgumentException.class,
                () -> InformationDirected.weights(two, new double[] {0, 0})).getMessage());
        assertEquals("got 2 posteriors but 3 alphas", assertThrows(IllegalArgumentException.class,
                () -> InformationDirected.weights(two, new double[] {0.5, 0.25, 0.25})).getMessage());
    }

    @Test
    void theRuleIsSelectableAndIgnoresBeta() {
        List<Posterior> ps = List.of(new BetaPosterior(30, 70), new BetaPosterior(20, 80), new BetaPosterior(5, 15));
        double[] alpha = {0.6, 0.1, 0.3};
        double[] w = AllocationMethod.TOP_TWO_ADAPTIVE.weights(ps, alpha, 0.9);
        assertArrayEquals(w, AllocationMethod.TOP_TWO_ADAPTIVE.weights(ps, alpha, 0.1), 0.0);
        assertEquals(AllocationMethod.TOP_TWO_ADAPTIVE, AllocationMethod.fromCliName("top-two-adaptive"));
        assertTrue(w[0] > w[1], java.util.Arrays.toString(w));
    }
}
