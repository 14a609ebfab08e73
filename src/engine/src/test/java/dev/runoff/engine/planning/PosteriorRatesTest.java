package dev.runoff.engine.planning;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.SplittableRandom;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;
import org.junit.jupiter.api.Test;

class PosteriorRatesTest {

    /**
     * The two instances of Garivier &amp; Kaufmann (2016), "Optimal Best Arm Identification with Fixed
     * Confidence", COLT, numerical experiments.
     */
    private static final double[][] PUBLISHED = {{0.5, 0.45, 0.43, 0.4}, {0.3, 0.21, 0.2, 0.19, 0.18}};

    /** Bernoulli KL divergence, written out here (standard definition). */
    private static double kl(double p, double q) {
        return p * Math.log(p / q) + (1 - p) * Math.log((1 - p) / (1 - q));
    }

    /** min over x of w1 kl(m1, x) + wa kl(ma, x): for Bernoulli arms x is the weighted mean (common practice). */
    private static double rate(double m1, double w1, double ma, double wa) {
        double x = (w1 * m1 + wa * ma) / (w1 + wa);
        return w1 * kl(m1, x) + wa * kl(ma, x);
    }

    private static double smallestRate(double[] mu, double[] w) {
        double min = Double.POSITIVE_INFINITY;
        for (int a = 1; a < mu.length; a++) {
            min = Math.min(min, rate(mu[0], w[0], mu[a], w[a]));
        }
        return min;
    }

    @ParameterizedTest
    @ValueSource(ints = {0, 1})
    void gammaAtOneHalfIsTheInverseOfTheHalfOptimalCharacteristicTime(int instance) {
        // Russo 2020, Gamma*_beta = max_{w_best = beta} min_i C_i(w); Garivier & Kaufmann 2016, Theorem 1,
        // T_w^-1 = min_i C_i(w) with the same C_i and the same normalisation (all trials counted, weights
        // summing to 1), so Gamma*_1/2 = 1 / T*_1/2 with no factor. T*_1/2 comes from the solver's root,
        // Gamma*_1/2 from the pairwise costs at its weights: they agree only if the weights equalise the costs.
        ArmModel model = ArmModel.bernoulli(PUBLISHED[instance]);
        double gamma = PosteriorRates.betaOptimal(model, 0.5);
        double tHalf = OptimalAllocation.betaOptimal(model, 0.5).characteristicTime();
        assertEquals(1 / tHalf, gamma, 1e-9 * gamma);
        // and the costs written out here, independently of ArmModel, give the same value
        assertEquals(gamma, smallestRate(PUBLISHED[instance], OptimalAllocation.betaOptimal(model, 0.5).weights()),
                1e-12);
    }

    @ParameterizedTest
    @ValueSource(ints = {0, 1})
    void noSplitWithHalfOnTheBestArmRulesOutFaster(int instance) {
        // Definition of Gamma*_beta (Russo 2020) as a maximum: 3000 seeded random splits of the other half.
        double[] mu = PUBLISHED[instance];
        double gamma = PosteriorRates.betaOptimal(ArmModel.bernoulli(mu), 0.5);
        SplittableRandom rng = new SplittableRandom(2020L + instance);
        double bestFound = 0;
        for (int i = 0; i < 3000; i++) {
            double[] w = new double[mu.length];
            double s = 0;
            for (int a = 1; a < mu.length; a++) {
                w[a] = -Math.log(rng.nextDouble());
                s += w[a];
            }
            for (int a = 1; a < mu.length; a++) {
                w[a] *= 0.5 / s;
            }
            w[0] = 0.5;
            bestFound = Math.max(bestFound, smallestRate(mu, w));
        }
        assertTrue(bestFound <= gamma * (1 + 1e-12), bestFound + " > " + gamma);
        assertTrue(bestFound > 0.9 * gamma, "random search reaches near the maximum: " + bestFound + " vs " + gamma);
    }

    @ParameterizedTest
    @ValueSource(ints = {0, 1})
    void halfOptimalRateLiesBetweenRussosBoundAndTheOptimalRate(int instance) {
        // Russo 2020 (from memory: the lemma relating Gamma*_beta to Gamma*):
        // Gamma*_beta >= min(beta / beta*, (1 - beta) / (1 - beta*)) Gamma*, where beta* = w*_best and
        // Gamma* = 1 / T* (Garivier & Kaufmann 2016, Theorem 1); and Gamma*_beta <= Gamma* by definition.
        ArmModel model = ArmModel.bernoulli(PUBLISHED[instance]);
        TargetAllocation optimal = OptimalAllocation.optimal(model);
        double gammaStar = 1 / optimal.characteristicTime();
        double betaStar = optimal.weight(0);
        double half = PosteriorRates.betaOptimal(model, 0.5);
        double factor = Math.min(0.5 / betaStar, 0.5 / (1 - betaStar));
        assertTrue(half >= factor * gammaStar * (1 - 1e-12), half + " < " + factor + " * " + gammaStar);
        assertTrue(half <= gammaStar * (1 + 1e-12), half + " > " + gammaStar);
        // at beta = beta* the constraint is the optimum's own: Gamma*_beta* = Gamma* = 1 / T*
        assertEquals(gammaStar, PosteriorRates.betaOptimal(model, betaStar), 1e-9 * gammaStar);
    }

    @Test
    void uniformRateIsTheSlowestPairAtEqualShares() {
        // C_i(1/K, 1/K) written out; the uniform split's rate is the smallest of them (Russo 2020).
        double[] mu = PUBLISHED[0];
        double[] w = {0.25, 0.25, 0.25, 0.25};
        assertEquals(smallestRate(mu, w), PosteriorRates.uniform(ArmModel.bernoulli(mu)), 1e-15);
        double[] perArm = PosteriorRates.perArm(ArmModel.bernoulli(mu), w);
        assertTrue(Double.isNaN(perArm[0]));
        assertEquals(rate(mu[0], 0.25, mu[3], 0.25), perArm[3], 1e-15);
        // the uniform split is slower than the half-optimal one on this instance (Russo 2020: Gamma*_beta is a maximum
        // over splits with beta on the best arm, and uniform puts 1/4 there)
        ArmModel model = ArmModel.bernoulli(mu);
        assertTrue(PosteriorRates.uniform(model) < PosteriorRates.betaOptimal(model, 0.5));
    }

    @Test
    void tiedBestArmsHaveNoRate() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> PosteriorRates.betaOptimal(ArmModel.bernoulli(0.3, 0.3, 0.1), 0.5));
        assertTrue(e.getMessage().contains("share the best mean"), e.getMessage());
    }
}
