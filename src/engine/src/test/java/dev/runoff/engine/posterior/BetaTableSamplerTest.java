package dev.runoff.engine.posterior;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Arrays;
import org.apache.commons.math3.distribution.BetaDistribution;
import org.apache.commons.math3.stat.inference.KolmogorovSmirnovTest;
import org.apache.commons.rng.simple.RandomSource;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/**
 * Seeded statistical checks of the table-based Beta sampler against Apache Commons Math's
 * {@link BetaDistribution} (distribution function, moments, quantiles).
 *
 * <p>Tolerances: Kolmogorov-Smirnov test at level 0.001 (the p-value must exceed 1e-3); moments and tail
 * counts within 4 standard errors (a false alarm about 6e-5 per check for a correct sampler, by the normal
 * approximation). The seeds are fixed, so a pass or a failure repeats exactly.
 */
class BetaTableSamplerTest {
    private static final int KS_DRAWS = 20_000;
    private static final int MOMENT_DRAWS = 200_000;
    private static final int TAIL_DRAWS = 500_000;
    private static final double KS_MIN_P = 1e-3;

    private static BetaTableSampler sampler(long seed, double a, double b) {
        return BetaTableSampler.of(RandomSource.XO_SHI_RO_256_PP.create(seed), a, b);
    }

    private static double[] draw(Posterior.Sampler sampler, int n) {
        double[] x = new double[n];
        for (int i = 0; i < n; i++) {
            x[i] = sampler.draw();
        }
        return x;
    }

    // Reference CDF: Commons Math BetaDistribution; test: Commons Math KolmogorovSmirnovTest at level 0.001.
    // Shapes from the uniform to (1e6, 1e7); skewed ones have a tail beyond the table's body on one side or
    // both, and (1, b) and (a, 1) put the mode at an end of the support.
    @ParameterizedTest
    @CsvSource({"1, 1", "1, 3", "3, 1", "2, 3", "1.5, 40", "40, 1.5", "1, 1000", "101, 901", "1000, 1200",
            "1, 100000", "20, 200000", "1000000, 10000000", "10000000, 1000000", "1, 999999999999"})
    void drawsPassKolmogorovSmirnovAgainstCommonsMath(double a, double b) {
        double[] x = draw(sampler(31, a, b), KS_DRAWS);
        double p = new KolmogorovSmirnovTest().kolmogorovSmirnovTest(new BetaDistribution(null, a, b), x);
        assertTrue(p > KS_MIN_P, "Kolmogorov-Smirnov p-value " + p + " for Beta(" + a + ", " + b + ")");
    }

    // Beta moments a/(a+b) and ab/((a+b)^2 (a+b+1)) from Commons Math BetaDistribution, each within 4
    // standard errors (SamplersTest.assertMoments says how they are computed).
    @ParameterizedTest
    @CsvSource({"1, 1", "1, 7", "2.5, 7.5", "101, 901", "1000, 1200", "1000000, 10000000"})
    void sampleMomentsMatchBetaMoments(double a, double b) {
        BetaDistribution reference = new BetaDistribution(null, a, b);
        double[] x = draw(sampler(17, a, b), MOMENT_DRAWS);
        SamplersTest.assertMoments(x, reference.getNumericalMean(), reference.getNumericalVariance());
    }

    /**
     * The share of draws beyond the table's body (drawn from the exponential tail envelopes) and beyond a
     * deeper quantile match Commons Math's distribution function within 4 binomial standard errors.
     */
    @ParameterizedTest
    @CsvSource({"1, 50", "50, 1", "2, 30", "30, 2", "3, 400"})
    void tailMassesBeyondTheBodyMatchTheDistributionFunction(double a, double b) {
        BetaDistribution reference = new BetaDistribution(null, a, b);
        double[] body = body(a, b);
        assertTrue(body[0] > 0 || body[1] < 1, "the case has a tail beyond the body");
        double deepLow = reference.inverseCumulativeProbability(2e-4);
        double deepHigh = reference.inverseCumulativeProbability(1 - 2e-4);
        double[] x = draw(sampler(43, a, b), TAIL_DRAWS);
        assertShare(x, v -> v < body[0], reference.cumulativeProbability(body[0]), "below the body");
        assertShare(x, v -> v > body[1], 1 - reference.cumulativeProbability(body[1]), "above the body");
        assertShare(x, v -> v < deepLow, 2e-4, "below the 2e-4 quantile");
        assertShare(x, v -> v > deepHigh, 2e-4, "above the 1 - 2e-4 quantile");
    }

    /** The body {@code [mode - K sd, mode + K sd]} clipped to [0, 1], as the sampler builds it. */
    private static double[] body(double a, double b) {
        double mode = (a - 1) / (a + b - 2);
        double s = a + b;
        double sd = Math.sqrt((a / s) * (b / s) / (s + 1));
        return new double[] {Math.max(0, mode - BetaTableSampler.K * sd), Math.min(1, mode + BetaTableSampler.K * sd)};
    }

    private static void assertShare(double[] x, java.util.function.DoublePredicate in, double p, String what) {
        long count = Arrays.stream(x).filter(in).count();
        double se = Math.sqrt(p * (1 - p) / x.length);
        assertEquals(p, (double) count / x.length, 4 * se + 1e-12, "share of draws " + what);
    }

    @Test
    void sameSeedRepeatsTheSameDraws() {
        assertArrayEquals(draw(sampler(7, 12, 340), 5_000), draw(sampler(7, 12, 340), 5_000));
        assertFalse(Arrays.equals(draw(sampler(7, 12, 340), 100), draw(sampler(8, 12, 340), 100)));
    }

    @Test
    void aBlockHoldsTheDrawsOneByOneWouldGive() {
        double[] block = new double[3_000];
        sampler(12, 3, 70).fill(block, block.length);
        assertArrayEquals(draw(sampler(12, 3, 70), block.length), block);
    }

    @Test
    void drawsStayInsideTheSupport() {
        for (double[] ab : new double[][] {{1, 1}, {1, 1e7}, {1e7, 1}, {1.0001, 1.0001}, {2, 2}}) {
            for (double v : draw(sampler(3, ab[0], ab[1]), 50_000)) {
                assertTrue(v >= 0 && v <= 1, "draw " + v + " of Beta(" + ab[0] + ", " + ab[1] + ")");
            }
        }
    }

    @Test
    void shapesBelowOneOrBeyondTheLargestSumAreNotSupported() {
        assertTrue(BetaTableSampler.supports(1, 1));
        assertFalse(BetaTableSampler.supports(0.999, 5));
        assertFalse(BetaTableSampler.supports(5, 0.5));
        assertFalse(BetaTableSampler.supports(Double.POSITIVE_INFINITY, 5));
        assertFalse(BetaTableSampler.supports(Double.NaN, 5));
        assertTrue(BetaTableSampler.supports(1e7, 1e15 - 1e7));
        assertFalse(BetaTableSampler.supports(1e200, 1e200));
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> sampler(1, 0.5, 3));
        assertTrue(e.getMessage().contains("a=0.5"), e.getMessage());
    }
}
