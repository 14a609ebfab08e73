package dev.runoff.engine.special;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.SplittableRandom;
import org.apache.commons.math3.distribution.BetaDistribution;
import org.apache.commons.math3.special.Beta;
import org.junit.jupiter.api.Test;

/**
 * Engine 1.6's sweeps of the Beta distribution function and density ({@link SweptBeta}) against Commons Math
 * 3.6.1 ({@code Beta.regularizedBeta}, {@code BetaDistribution.logDensity}) along walks of increasing points
 * like the nodes of the zero-win integration: long chains of Taylor steps, steps of up to three standard
 * deviations, deep lower tails where a distribution function is far below 1e-100.
 */
class SweptBetaTest {
    /** Commons Math's continued fraction run to this relative precision. */
    private static final double COMMONS_EPSILON = 1e-15;
    /**
     * Absolute difference of {@code log I_x} and of the log density allowed (relative, of the values). Measured:
     * 1.3e-12 for {@code log I_x} (the project's continued fraction at the same points: also 1.3e-12 from Commons
     * Math, 2.8e-13 from the sweep), 4.3e-11 for the log density (Commons Math's own: the project's kernel form
     * at the same points is as far from it, and 4.5e-13 from the sweep).
     */
    private static final double LOG_TOLERANCE = 1e-10;

    @Test
    void stepsOfTheDistributionFunctionAgreeWithCommonsMathFromDeepLowerTailsToNearOne() {
        // The pool's shapes (2,000 to 20,000 trials, rates of 2% to 12%, uniform prior), walks from 30 standard
        // deviations below the mean to 8 above, steps of up to 3 deviations. Commons Math gives I_x directly,
        // so the walk stops where it is below 1e-280 (its exponent would underflow soon after).
        SplittableRandom random = new SplittableRandom(16);
        double worst = 0;
        int points = 0;
        for (int shape = 0; shape < 60; shape++) {
            IncompleteBeta beta = poolShape(random);
            SweptBeta sweep = SweptBeta.lowerTail(beta);
            for (double z = -30; z <= 8; z += 3 * random.nextDouble()) {
                double x = at(beta, z);
                double reference = Beta.regularizedBeta(x, beta.a(), beta.b(), COMMONS_EPSILON, 100_000);
                if (!(reference > 1e-280)) {
                    continue;
                }
                sweep.moveTo(x, 1 - x);
                double logSwept = sweep.logAnchor() + Math.log(sweep.ratio());
                worst = Math.max(worst, Math.abs(logSwept - Math.log(reference)));
                assertEquals(reference, sweep.value(), 1e-10 * reference + 1e-300);
                points++;
            }
        }
        assertTrue(points > 1_000, points + " points");
        assertEquals(0.0, worst, LOG_TOLERANCE);
    }

    @Test
    void stepsOfTheDensityAgreeWithCommonsMath() {
        // The same shapes and walks, from 12 deviations below the mean (points below 0 left out) to 30 above (a
        // zero-win arm's integrand lies in its own upper tail).
        SplittableRandom random = new SplittableRandom(17);
        double worst = 0;
        int points = 0;
        for (int shape = 0; shape < 60; shape++) {
            IncompleteBeta beta = poolShape(random);
            BetaDistribution reference = new BetaDistribution(null, beta.a(), beta.b());
            SweptBeta sweep = SweptBeta.density(beta);
            for (double z = -12; z <= 30; z += 3 * random.nextDouble()) {
                double x = at(beta, z);
                if (!(x > 0 && x < 1)) {
                    continue;
                }
                sweep.moveTo(x, 1 - x);
                double logSwept = sweep.logAnchor() + Math.log(sweep.ratio());
                double expected = reference.logDensity(x);
                worst = Math.max(worst, Math.abs(logSwept - expected) / Math.max(1, Math.abs(expected)));
                points++;
            }
        }
        assertTrue(points > 1_000, points + " points");
        assertEquals(0.0, worst, LOG_TOLERANCE);
    }

    @Test
    void aPointBelowTheLastIsTakenAfreshAndTheSamePointTwiceChangesNothing() {
        // Reference: Commons Math as above, at 0.05 after a sweep that went past it.
        IncompleteBeta beta = new IncompleteBeta(401, 7601);
        SweptBeta sweep = SweptBeta.lowerTail(beta);
        for (double x = 0.045; x < 0.056; x += 0.0005) {
            sweep.moveTo(x, 1 - x);
        }
        sweep.moveTo(0.05, 0.95);
        double once = sweep.logAnchor() + Math.log(sweep.ratio());
        sweep.moveTo(0.05, 0.95);
        assertEquals(once, sweep.logAnchor() + Math.log(sweep.ratio()));
        assertEquals(Math.log(Beta.regularizedBeta(0.05, 401, 7601, COMMONS_EPSILON, 100_000)), once, LOG_TOLERANCE);
    }

    private static IncompleteBeta poolShape(SplittableRandom random) {
        long trials = 2_000 + random.nextInt(18_000);
        long wins = Math.round(trials * (0.02 + 0.1 * random.nextDouble()));
        return new IncompleteBeta(1 + wins, 1 + trials - wins);
    }

    /** The point {@code z} standard deviations from the mean. */
    private static double at(IncompleteBeta beta, double z) {
        double a = beta.a();
        double b = beta.b();
        double spread = Math.sqrt(a * b / ((a + b) * (a + b) * (a + b + 1)));
        return a / (a + b) + z * spread;
    }
}
