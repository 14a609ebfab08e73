package dev.runoff.engine.planning;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

class OptimalAllocationTest {

    /** Bernoulli KL written out here, independently of the code under test (standard definition). */
    private static double kl(double p, double q) {
        return p * Math.log(p / q) + (1 - p) * Math.log((1 - p) / (1 - q));
    }

    /** Pairwise cost of the best arm (rate m1, weight w1) and arm a (rate ma, weight wa), weighted-mean form. */
    private static double bernoulliCost(double m1, double w1, double ma, double wa) {
        double m = (w1 * m1 + wa * ma) / (w1 + wa);
        return w1 * kl(m1, m) + wa * kl(ma, m);
    }

    /** Gaussian pairwise cost, written as the explicit infimum over m at the precision-weighted mean. */
    private static double gaussianCost(double m1, double v1, double w1, double ma, double va, double wa) {
        double m = (w1 * m1 / v1 + wa * ma / va) / (w1 / v1 + wa / va);
        return w1 * (m1 - m) * (m1 - m) / (2 * v1) + wa * (ma - m) * (ma - m) / (2 * va);
    }

    private static void assertWeights(double[] expected, double[] actual, double tolerance) {
        assertEquals(expected.length, actual.length);
        for (int i = 0; i < expected.length; i++) {
            assertEquals(expected[i], actual[i], tolerance, "weight of arm " + i);
        }
    }

    private static double sum(double[] w) {
        double s = 0;
        for (double v : w) {
            s += v;
        }
        return s;
    }

    @Test
    void matchesPublishedOptimalWeightsForFourBernoulliArms() {
        // Garivier & Kaufmann (2016), "Optimal Best Arm Identification with Fixed Confidence", COLT,
        // numerical experiments: w*(0.5, 0.45, 0.43, 0.4) = (0.417, 0.390, 0.136, 0.057), 3 decimals.
        TargetAllocation w = OptimalAllocation.optimal(ArmModel.bernoulli(0.5, 0.45, 0.43, 0.4));
        assertWeights(new double[] {0.417, 0.390, 0.136, 0.057}, w.weights(), 0.001);
        assertEquals(0, w.best());
    }

    @Test
    void matchesPublishedOptimalWeightsForFiveBernoulliArms() {
        // Garivier & Kaufmann (2016), numerical experiments: w*(0.3, 0.21, 0.2, 0.19, 0.18)
        // = (0.336, 0.251, 0.177, 0.132, 0.104), 3 decimals.
        TargetAllocation w = OptimalAllocation.optimal(ArmModel.bernoulli(0.3, 0.21, 0.2, 0.19, 0.18));
        assertWeights(new double[] {0.336, 0.251, 0.177, 0.132, 0.104}, w.weights(), 0.001);
    }

    @Test
    void weightsFollowTheArmsWhenTheBestIsNotFirst() {
        // Same instance as above (Garivier & Kaufmann 2016), arms permuted: weights permute with them.
        TargetAllocation w = OptimalAllocation.optimal(ArmModel.bernoulli(0.43, 0.4, 0.5, 0.45));
        assertWeights(new double[] {0.136, 0.057, 0.417, 0.390}, w.weights(), 0.001);
        assertEquals(2, w.best());
    }

    @Test
    void optimalBernoulliWeightsEqualiseEveryPairwiseCost() {
        // Garivier & Kaufmann (2016), Lemma 3 / Theorem 5: at w* all pairwise costs
        // w_1 d(mu_1, m) + w_a d(mu_a, m) are equal, and their common value is 1 / T*.
        double[] mu = {0.1, 0.2, 0.3, 0.4, 0.5};
        TargetAllocation opt = OptimalAllocation.optimal(ArmModel.bernoulli(mu));
        double[] w = opt.weights();
        assertEquals(1.0, sum(w), 1e-12);
        for (int a = 0; a < 4; a++) {
            double cost = bernoulliCost(mu[4], w[4], mu[a], w[a]);
            assertEquals(1 / opt.characteristicTime(), cost, 1e-9 / opt.characteristicTime(), "arm " + a);
        }
    }

    @Test
    void optimalGaussianWeightsEqualiseEveryPairwiseCost() {
        // Same equalisation (Garivier & Kaufmann 2016, Lemma 3), Gaussian arms with different known variances.
        double[] mu = {1.0, 0.6, 0.5, 0.2};
        double[] var = {1.0, 2.0, 0.5, 4.0};
        TargetAllocation opt = OptimalAllocation.optimal(ArmModel.gaussian(mu, var));
        double[] w = opt.weights();
        assertEquals(1.0, sum(w), 1e-12);
        for (int a = 1; a < 4; a++) {
            double cost = gaussianCost(mu[0], var[0], w[0], mu[a], var[a], w[a]);
            assertEquals(1 / opt.characteristicTime(), cost, 1e-9 / opt.characteristicTime(), "arm " + a);
        }
    }

    @Test
    void optimalWeightsBeatRandomWeights() {
        // Definition of T* (Garivier & Kaufmann 2016, Theorem 1): T*^-1 = sup_w min_a cost_a(w), so no
        // weight vector achieves a larger smallest cost. 2000 seeded random weight vectors.
        double[] mu = {0.5, 0.45, 0.43, 0.4};
        double best = 1 / OptimalAllocation.optimal(ArmModel.bernoulli(mu)).characteristicTime();
        SplittableRandom rng = new SplittableRandom(20160601L);
        for (int i = 0; i < 2000; i++) {
            double[] w = new double[4];
            for (int a = 0; a < 4; a++) {
                w[a] = -Math.log(rng.nextDouble());
            }
            double s = sum(w);
            double min = Double.POSITIVE_INFINITY;
            for (int a = 1; a < 4; a++) {
                min = Math.min(min, bernoulliCost(mu[0], w[0] / s, mu[a], w[a] / s));
            }
            assertTrue(min <= best * (1 + 1e-12), "random weights beat w*: " + min + " > " + best);
        }
    }

    @Test
    void twoGaussianArmsWithEqualVariancesSplitEvenly() {
        // Kaufmann, Cappe & Garivier (2016), "On the Complexity of Best-Arm Identification in Multi-Armed
        // Bandit Models", JMLR, two Gaussian arms: optimal proportions sigma_a / (sigma_1 + sigma_2) and
        // complexity 2 (sigma_1 + sigma_2)^2 / Delta^2, i.e. (1/2, 1/2) and 8 sigma^2 / Delta^2 for equal
        // variances (from memory; it also follows in two lines from the closed-form pairwise cost).
        double sigma2 = 2.5;
        double delta = 0.3;
        TargetAllocation opt = OptimalAllocation.optimal(ArmModel.gaussianCommonVariance(sigma2, 1.0, 1.0 - delta));
        assertWeights(new double[] {0.5, 0.5}, opt.weights(), 1e-9);
        double expected = 8 * sigma2 / (delta * delta);
        assertEquals(expected, opt.characteristicTime(), 1e-9 * expected);
    }

    @Test
    void twoGaussianArmsWithUnequalVariancesSplitInProportionToStandardDeviations() {
        // Kaufmann, Cappe & Garivier (2016), JMLR, two Gaussian arms (from memory):
        // w_a = sigma_a / (sigma_1 + sigma_2), T* = 2 (sigma_1 + sigma_2)^2 / Delta^2.
        double s1 = 1.0;
        double s2 = 3.0;
        double delta = 0.5;
        TargetAllocation opt = OptimalAllocation.optimal(
                ArmModel.gaussian(new double[] {0.0, -delta}, new double[] {s1 * s1, s2 * s2}));
        assertWeights(new double[] {0.25, 0.75}, opt.weights(), 1e-9);
        double expected = 2 * (s1 + s2) * (s1 + s2) / (delta * delta);
        assertEquals(expected, opt.characteristicTime(), 1e-9 * expected);
    }

    @Test
    void betaOptimalWeightsFixTheBestArmAndEqualiseCosts() {
        // Russo (2020), "Simple Bayesian Algorithms for Best-Arm Identification", Operations Research:
        // the beta-optimal allocation puts beta on the best arm and equalises the other arms' pairwise costs.
        double[] mu = {0.2, 0.5, 0.3, 0.45, 0.1};
        TargetAllocation half = OptimalAllocation.betaOptimal(ArmModel.bernoulli(mu), 0.5);
        double[] w = half.weights();
        assertEquals(0.5, w[1], 1e-15);
        assertEquals(1.0, sum(w), 1e-12);
        for (int a : new int[] {0, 2, 3, 4}) {
            double cost = bernoulliCost(mu[1], w[1], mu[a], w[a]);
            assertEquals(1 / half.characteristicTime(), cost, 1e-9 / half.characteristicTime(), "arm " + a);
        }
    }

    @Test
    void betaOptimalGaussianWeightsEqualiseCosts() {
        // Russo (2020), beta-optimal allocation, Gaussian arms with known variances.
        double[] mu = {0.0, 1.0, 0.7};
        double[] var = {1.0, 1.5, 0.8};
        TargetAllocation b = OptimalAllocation.betaOptimal(ArmModel.gaussian(mu, var), 0.3);
        double[] w = b.weights();
        assertEquals(0.3, w[1], 1e-15);
        for (int a : new int[] {0, 2}) {
            double cost = gaussianCost(mu[1], var[1], w[1], mu[a], var[a], w[a]);
            assertEquals(1 / b.characteristicTime(), cost, 1e-9 / b.characteristicTime(), "arm " + a);
        }
    }

    @Test
    void betaAtTheOptimalBestWeightRecoversTheOptimum() {
        // Russo (2020): T* = min over beta of T_beta, attained at beta = w*_1.
        ArmModel model = ArmModel.bernoulli(0.3, 0.21, 0.2, 0.19, 0.18);
        TargetAllocation opt = OptimalAllocation.optimal(model);
        TargetAllocation atOpt = OptimalAllocation.betaOptimal(model, opt.weight(0));
        assertWeights(opt.weights(), atOpt.weights(), 1e-9);
        assertEquals(opt.characteristicTime(), atOpt.characteristicTime(), 1e-9 * opt.characteristicTime());
        for (double beta : new double[] {0.2, 0.3, 0.4, 0.5, 0.6}) {
            assertTrue(OptimalAllocation.betaOptimal(model, beta).characteristicTime()
                    >= opt.characteristicTime() * (1 - 1e-12), "beta " + beta);
        }
    }

    @Test
    void halfOnTheBestArmIsAboutHalfOfUniformAndWithinTwiceTheOptimum() {
        // Rule of thumb (common practice): on Bernoulli means 0.1..0.5 the beta = 1/2 allocation needs
        // roughly half the trials of uniform allocation. Russo (2020): T_{1/2} <= 2 T*.
        ArmModel model = ArmModel.bernoulli(0.1, 0.2, 0.3, 0.4, 0.5);
        double tStar = OptimalAllocation.optimal(model).characteristicTime();
        double tHalf = OptimalAllocation.betaOptimal(model, 0.5).characteristicTime();
        double tUniform = OptimalAllocation.uniform(model).characteristicTime();
        assertTrue(tHalf / tUniform < 0.65, "T_1/2 / T_uniform = " + tHalf / tUniform);
        assertTrue(tHalf / tUniform > tStar / tUniform, "T_1/2 < T*");
        assertTrue(tHalf <= 2 * tStar, "T_1/2 = " + tHalf + " > 2 T* = " + 2 * tStar);
    }

    @Test
    void uniformCharacteristicTimeIsTheInverseOfTheSmallestCost() {
        // Definition (Garivier & Kaufmann 2016, Theorem 1) evaluated at w = 1/K.
        double[] mu = {0.5, 0.45, 0.43, 0.4};
        double min = Double.POSITIVE_INFINITY;
        for (int a = 1; a < 4; a++) {
            min = Math.min(min, bernoulliCost(mu[0], 0.25, mu[a], 0.25));
        }
        TargetAllocation u = OptimalAllocation.uniform(ArmModel.bernoulli(mu));
        assertWeights(new double[] {0.25, 0.25, 0.25, 0.25}, u.weights(), 0);
        assertEquals(1 / min, u.characteristicTime(), 1e-12 / min);
    }

    @Test
    void predictedTrialsAreCharacteristicTimeTimesLogOneOverDelta() {
        // Garivier & Kaufmann (2016), Theorem 1 and Theorem 14: E[tau] ~ T* log(1/delta) as delta -> 0;
        // the lower bound is T* kl(delta, 1 - delta).
        TargetAllocation opt = OptimalAllocation.optimal(ArmModel.bernoulli(0.5, 0.45, 0.43, 0.4));
        double t = opt.characteristicTime();
        assertEquals(t * Math.log(1 / 0.05), opt.predictedTrials(0.05), 1e-9 * t);
        assertEquals(t * kl(0.05, 0.95), opt.lowerBoundTrials(0.05), 1e-9 * t);
    }
}
