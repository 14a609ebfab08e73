package dev.runoff.engine.stopping;

import dev.runoff.engine.stopping.Divergence;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import org.apache.commons.math3.analysis.UnivariateFunction;
import org.apache.commons.math3.optim.MaxEval;
import org.apache.commons.math3.optim.nonlinear.scalar.GoalType;
import org.apache.commons.math3.optim.univariate.BrentOptimizer;
import org.apache.commons.math3.optim.univariate.SearchInterval;
import org.apache.commons.math3.optim.univariate.UnivariateObjectiveFunction;
import org.junit.jupiter.api.Test;

class DivergenceTest {

    /** Minimum over [lo, hi] by Commons Math's Brent optimiser: an independent check of the closed forms. */
    private static double minimum(UnivariateFunction f, double lo, double hi) {
        return new BrentOptimizer(1e-12, 1e-15).optimize(new MaxEval(10_000), GoalType.MINIMIZE,
                new UnivariateObjectiveFunction(f), new SearchInterval(lo, hi)).getValue();
    }

    @Test
    void bernoulliDivergenceMatchesHandValues() {
        // KL(B(1/2), B(1/4)) = 1/2 ln 2 + 1/2 ln(2/3) = 1/2 ln(4/3) (definition, by hand).
        assertEquals(0.5 * Math.log(4.0 / 3), Divergence.bernoulli(0.5, 0.25), 1e-15);
        // 0 log 0 = 0: KL(B(1), B(q)) = ln(1/q); KL(B(0), B(q)) = ln(1/(1-q)).
        assertEquals(Math.log(1 / 0.3), Divergence.bernoulli(1, 0.3), 1e-15);
        assertEquals(Math.log(1 / 0.7), Divergence.bernoulli(0, 0.3), 1e-15);
        assertEquals(Double.POSITIVE_INFINITY, Divergence.bernoulli(0.5, 0));
        assertEquals(0.0, Divergence.bernoulli(0.3, 0.3));
    }

    @Test
    void gaussianDivergenceIsSquaredDifferenceOverTwiceTheVariance() {
        // KL(N(mu, s^2), N(l, s^2)) = (mu - l)^2 / (2 s^2) (standard result).
        assertEquals(9.0 / 8, Divergence.gaussian(1, -2, 4), 1e-15);
    }

    @Test
    void bernoulliPairCostIsTheMinimumOverTheCommonMean() {
        // Garivier & Kaufmann (2016), section 3: inf over m of w_a d(mu_a, m) + w_b d(mu_b, m) is attained at
        // the weighted mean; checked against a numerical minimisation over m.
        double expected = minimum(m -> 3 * Divergence.bernoulli(0.6, m) + 5 * Divergence.bernoulli(0.35, m),
                0.35, 0.6);
        assertEquals(expected, Divergence.bernoulliPairCost(0.6, 3, 0.35, 5), 1e-12);
    }

    @Test
    void gaussianPairCostIsTheMinimumOverTheCommonMean() {
        // Same infimum for Gaussian arms with known variances 2 and 0.5, against a numerical minimisation.
        double expected = minimum(m -> 3 * Divergence.gaussian(1.0, m, 2) + 5 * Divergence.gaussian(0.2, m, 0.5),
                0.2, 1.0);
        assertEquals(expected, Divergence.gaussianPairCost(1.0, 2, 3, 0.2, 0.5, 5), 1e-12);
        double m = Divergence.gaussianPairMean(1.0, 2, 3, 0.2, 0.5, 5);
        assertEquals(expected, 3 * Divergence.gaussian(1.0, m, 2) + 5 * Divergence.gaussian(0.2, m, 0.5), 1e-12);
    }

    @Test
    void pairCostIsZeroWithAZeroWeight() {
        assertEquals(0.0, Divergence.bernoulliPairCost(0.6, 0, 0.35, 5));
        assertEquals(0.0, Divergence.gaussianPairCost(1, 1, 3, 0, 1, 0));
    }

    @Test
    void rejectsBadArgumentsNamingThem() {
        assertEquals("Bernoulli rate p must be in [0.0, 1.0], got 1.5",
                assertThrows(IllegalArgumentException.class, () -> Divergence.bernoulli(1.5, 0.5)).getMessage());
        assertEquals("Gaussian variance must be a finite number > 0, got 0.0",
                assertThrows(IllegalArgumentException.class, () -> Divergence.gaussian(1, 0, 0)).getMessage());
        assertEquals("weight of b must be a finite number >= 0, got -1.0", assertThrows(
                IllegalArgumentException.class, () -> Divergence.bernoulliPairCost(0.5, 1, 0.4, -1)).getMessage());
        assertEquals("variances of a and b must not both be 0", assertThrows(IllegalArgumentException.class,
                () -> Divergence.gaussianPairCost(1, 0, 1, 0, 0, 1)).getMessage());
    }
}
