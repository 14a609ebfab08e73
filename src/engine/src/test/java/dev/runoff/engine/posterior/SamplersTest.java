package dev.runoff.engine.posterior;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.apache.commons.math3.distribution.BetaDistribution;
import org.apache.commons.math3.distribution.RealDistribution;
import org.apache.commons.math3.distribution.TDistribution;
import org.apache.commons.math3.stat.inference.KolmogorovSmirnovTest;
import org.apache.commons.rng.simple.RandomSource;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.junit.jupiter.api.Test;

/**
 * Seeded statistical checks of the exact samplers against Apache Commons Math distributions.
 *
 * <p>Tolerances: sample moments within 4 standard errors (a false alarm about 6e-5 per check for a correct
 * sampler, by the normal approximation); Kolmogorov-Smirnov p-value above 0.001. The seeds are fixed, so a
 * pass or a failure repeats exactly.
 */
class SamplersTest {
    private static final int MOMENT_DRAWS = 100_000;
    private static final int KS_DRAWS = 20_000;
    private static final double KS_MIN_P = 1e-3;

    private static double[] draw(Posterior.Sampler sampler, int n) {
        double[] x = new double[n];
        for (int i = 0; i < n; i++) {
            x[i] = sampler.draw();
        }
        return x;
    }

    private static Posterior.Sampler beta(long seed, double a, double b) {
        return Samplers.beta(RandomSource.XO_SHI_RO_256_PP.create(seed), a, b);
    }

    private static Posterior.Sampler studentT(long seed, double location, double scale, double dof) {
        return Samplers.studentT(RandomSource.XO_SHI_RO_256_PP.create(seed), location, scale, dof);
    }

    /**
     * Checks the sample mean against {@code mean} and, when {@code variance} is finite, the sample variance
     * against {@code variance}, each within 4 standard errors. The standard error of the sample variance is
     * {@code sqrt((m4 - s^4) / n)} with the sample fourth central moment m4 (the large-sample variance of
     * the sample variance; common practice).
     */
    static void assertMoments(double[] x, double mean, double variance) {
        int n = x.length;
        double sum = 0;
        for (double v : x) {
            sum += v;
        }
        double m = sum / n;
        double m2 = 0;
        double m4 = 0;
        for (double v : x) {
            double d = (v - m) * (v - m);
            m2 += d;
            m4 += d * d;
        }
        m2 /= n;
        m4 /= n;
        double meanSe = StrictMath.sqrt(variance / n);
        assertEquals(mean, m, 4 * meanSe, "sample mean");
        double varianceSe = StrictMath.sqrt((m4 - m2 * m2) / n);
        assertEquals(variance, m2, 4 * varianceSe, "sample variance");
    }

    private static void assertKolmogorovSmirnov(RealDistribution reference, double[] x) {
        double p = new KolmogorovSmirnovTest().kolmogorovSmirnovTest(reference, x);
        assertTrue(p > KS_MIN_P, "Kolmogorov-Smirnov p-value " + p + " against " + reference);
    }

    // Beta moments a/(a+b) and ab/((a+b)^2 (a+b+1)): Commons Math BetaDistribution as the reference.
    @ParameterizedTest
    @CsvSource({"0.005, 0.002", "0.3, 0.5", "0.5, 3", "4, 0.7", "1, 1", "2.5, 7.5", "101, 901",
            "1000, 1200"})
    void betaSampleMomentsMatchBetaMoments(double a, double b) {
        BetaDistribution reference = new BetaDistribution(null, a, b);
        double[] x = draw(beta(11, a, b), MOMENT_DRAWS);
        assertMoments(x, reference.getNumericalMean(), reference.getNumericalVariance());
    }

    // Reference CDF: Commons Math BetaDistribution; test: Commons Math KolmogorovSmirnovTest. Shapes far
    // below 1 are left to the moment test: many of their draws round to exactly 1.0, and such ties break the
    // continuous-distribution assumption of the Kolmogorov-Smirnov test.
    @ParameterizedTest
    @CsvSource({"0.1, 0.9", "0.9, 0.2", "0.3, 0.5", "0.5, 3", "4, 0.7", "1, 1", "1, 3", "2.5, 7.5", "101, 901",
            "1000, 1200", "1000, 1000"})
    void betaDrawsPassKolmogorovSmirnovAgainstCommonsMath(double a, double b) {
        double[] x = draw(beta(23, a, b), KS_DRAWS);
        assertKolmogorovSmirnov(new BetaDistribution(null, a, b), x);
    }

    @Test
    void betaWithTinyShapesStaysInsideUnitInterval() {
        double[] x = draw(beta(5, 0.005, 0.002), MOMENT_DRAWS);
        for (double v : x) {
            assertTrue(v >= 0 && v <= 1, "draw " + v);
        }
    }

    // Student-t moments: mean = location, variance = scale^2 dof / (dof - 2), Commons Math TDistribution.
    // The variance check needs a finite fourth moment (dof > 4).
    @ParameterizedTest
    @CsvSource({"-3, 2, 5", "10, 0.5, 30", "0, 1, 2000", "0.25, 0.01, 7.5"})
    void studentTSampleMomentsMatchStudentTMoments(double location, double scale, double dof) {
        TDistribution standard = new TDistribution(null, dof);
        double[] x = draw(studentT(13, location, scale, dof), MOMENT_DRAWS);
        assertMoments(x, location, scale * scale * standard.getNumericalVariance());
    }

    // Reference CDF: Commons Math TDistribution of (x - location) / scale; test: KolmogorovSmirnovTest.
    @ParameterizedTest
    @CsvSource({"0, 1, 0.5", "0, 1, 1", "1.5, 0.2, 1.7", "0, 1, 2", "-3, 2, 4", "10, 0.5, 30",
            "0, 1, 2000"})
    void studentTDrawsPassKolmogorovSmirnovAgainstCommonsMath(double location, double scale, double dof) {
        double[] x = draw(studentT(29, location, scale, dof), KS_DRAWS);
        for (int i = 0; i < x.length; i++) {
            x[i] = (x[i] - location) / scale;
        }
        assertKolmogorovSmirnov(new TDistribution(null, dof), x);
    }

    @Test
    void sameSeedRepeatsTheSameDraws() {
        assertArrayEquals(draw(beta(7, 0.4, 9), 1000), draw(beta(7, 0.4, 9), 1000));
        assertArrayEquals(draw(studentT(7, 1, 2, 0.8), 1000), draw(studentT(7, 1, 2, 0.8), 1000));
    }
}
